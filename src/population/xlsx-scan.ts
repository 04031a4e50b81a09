import { cellText } from './cell-text.js';

/**
 * Byte scanners for the two big parts of a workbook: a worksheet's XML (the rows) and the
 * shared-strings table. The small parts (workbook, relationships, styles) are read with saxes.
 *
 * Why a scanner of our own here: measured on this project's 2-core machine with Node 20, saxes
 * tokenizes worksheet XML at about 60 MB/s (34 MB of rows in 567 ms), so the 233 MB sheet of a
 * 1,048,575-row, 4-column workbook would take about 3.9 s per pass and two passes (fingerprint,
 * then the selected rows) about 8 s, against a goal of 5 s. Jumping between tags with
 * Buffer.indexOf and reading only the few names and attributes a cell needs (`row`, `c` with
 * r/s/t, `v`, `f`, `is`/`t`) goes through the same bytes in about a tenth of that.
 *
 * What it understands (ECMA-376 Part 1, 18.3.1 sheetData/row/c and 18.4 shared strings): any
 * namespace prefix, attributes in any order with either quote, self-closing elements, comments,
 * processing instructions, CDATA sections, the five predefined entities and character references,
 * and XML's end-of-line rule (CR LF and a lone CR read as LF, XML 1.0 section 2.11). Cells and
 * rows without an `r` follow the one before. Text is decoded as UTF-8 only once a whole element
 * is in hand, so a character cut by a chunk boundary is never damaged.
 */

export class ScanError extends Error {
  constructor(
    message: string,
    readonly kind: 'cap' | 'damaged',
  ) {
    super(message);
    this.name = 'ScanError';
  }
}

/** The most a worksheet can hold (ECMA-376 and spreadsheet programs: 1,048,576 rows, 16,384 columns). */
export const SHEET_MAX_ROWS = 1_048_576;
export const SHEET_MAX_COLUMNS = 16_384;
/** One element (a cell with its value, or one shared string) longer than this is refused. */
export const MAX_ELEMENT_BYTES = 4 * 1024 * 1024;

const LT = 0x3c;
const GT = 0x3e;
const SLASH = 0x2f;
const AMP = 0x26;
const CR = 0x0d;
const LF = 0x0a;

function isSpace(c: number): boolean {
  return c === 0x20 || c === 0x09 || c === LF || c === CR;
}

/** A growable byte buffer for decoded text. */
class Bytes {
  b = Buffer.allocUnsafe(1024);
  n = 0;
  reserve(k: number): void {
    if (this.n + k > this.b.length) {
      const next = Buffer.allocUnsafe(Math.max(this.b.length * 2, this.n + k));
      this.b.copy(next, 0, 0, this.n);
      this.b = next;
    }
  }
  push(c: number): void {
    if (this.n === this.b.length) this.reserve(1);
    this.b[this.n++] = c;
  }
  pushRange(d: Buffer, s: number, e: number): void {
    this.reserve(e - s);
    d.copy(this.b, this.n, s, e);
    this.n += e - s;
  }
  pushCode(cp: number): void {
    this.reserve(4);
    this.n += this.b.write(String.fromCodePoint(cp), this.n, 'utf8');
  }
}

const ENTITIES: Record<string, number> = { amp: 0x26, lt: 0x3c, gt: 0x3e, quot: 0x22, apos: 0x27 };

/** Append the character data d[s, e) with entities decoded and line ends normalised. */
function appendText(d: Buffer, s: number, e: number, out: Bytes): void {
  let i = s;
  while (i < e) {
    let j = i;
    while (j < e) {
      const c = d[j]!;
      if (c === AMP || c === CR) break;
      j++;
    }
    if (j > i) out.pushRange(d, i, j);
    if (j >= e) return;
    if (d[j] === CR) {
      out.push(LF);
      j++;
      if (j < e && d[j] === LF) j++;
      i = j;
      continue;
    }
    const semi = d.indexOf(0x3b, j);
    if (semi < 0 || semi >= e || semi - j > 12) {
      out.push(AMP);
      i = j + 1;
      continue;
    }
    const name = d.toString('latin1', j + 1, semi);
    let cp: number | undefined;
    if (name.charCodeAt(0) === 0x23) {
      cp = name[1] === 'x' || name[1] === 'X' ? parseInt(name.slice(2), 16) : parseInt(name.slice(1), 10);
      if (!Number.isFinite(cp) || cp < 0 || cp > 0x10ffff) cp = undefined;
    } else cp = ENTITIES[name];
    if (cp === undefined) {
      out.pushRange(d, j, semi + 1);
    } else if (cp < 0x80) out.push(cp);
    else out.pushCode(cp);
    i = semi + 1;
  }
}

/** Local name of the tag whose name starts at s (after `<` or `</`): its [start, end) without a prefix. */
function tagName(d: Buffer, s: number, limit: number): [number, number] {
  let e = s;
  let local = s;
  while (e < limit) {
    const c = d[e]!;
    if (isSpace(c) || c === SLASH || c === GT) break;
    if (c === 0x3a) local = e + 1;
    e++;
  }
  return [local, e];
}

function nameIs(d: Buffer, s: number, e: number, name: string): boolean {
  if (e - s !== name.length) return false;
  for (let i = 0; i < name.length; i++) if (d[s + i] !== name.charCodeAt(i)) return false;
  return true;
}

/**
 * Find where a `<` at lt that is not an element tag ends (comment, CDATA, PI, declaration):
 * the index after it, or -1 when it is not complete in d.
 */
function skipSpecial(d: Buffer, lt: number, limit: number): number {
  if (d[lt + 1] === 0x21) {
    if (d[lt + 2] === 0x2d && d[lt + 3] === 0x2d) {
      const k = d.indexOf('-->', lt + 4);
      return k < 0 || k + 3 > limit ? -1 : k + 3;
    }
    if (d[lt + 2] === 0x5b) {
      const k = d.indexOf(']]>', lt + 3);
      return k < 0 || k + 3 > limit ? -1 : k + 3;
    }
  }
  if (d[lt + 1] === 0x3f) {
    const k = d.indexOf('?>', lt + 2);
    return k < 0 || k + 2 > limit ? -1 : k + 2;
  }
  const k = d.indexOf(GT, lt);
  return k < 0 || k >= limit ? -1 : k + 1;
}

/** Attributes of the tag d[lt, gt) that the scanner needs, by (unprefixed) name. */
interface Attrs {
  r: string | undefined;
  s: string | undefined;
  t: string | undefined;
}

function readAttrs(d: Buffer, from: number, gt: number, a: Attrs): void {
  a.r = a.s = a.t = undefined;
  let i = from;
  while (i < gt) {
    while (i < gt && (isSpace(d[i]!) || d[i] === SLASH)) i++;
    if (i >= gt) return;
    const ns = i;
    while (i < gt && d[i] !== 0x3d && !isSpace(d[i]!)) i++;
    const ne = i;
    while (i < gt && d[i] !== 0x22 && d[i] !== 0x27) i++;
    if (i >= gt) return;
    const q = d[i]!;
    const vs = i + 1;
    const ve = d.indexOf(q, vs);
    if (ve < 0 || ve > gt) return;
    i = ve + 1;
    if (ne - ns !== 1) continue;
    const n = d[ns];
    if (n === 0x72) a.r = d.toString('latin1', vs, ve);
    else if (n === 0x73) a.s = d.toString('latin1', vs, ve);
    else if (n === 0x74) a.t = d.toString('latin1', vs, ve);
  }
}

/**
 * Read character data of the element whose content starts at `from`, up to its closing tag
 * (the next `<` that is not CDATA), appending it to out. Returns the index of that `<`.
 */
function readContent(d: Buffer, from: number, limit: number, out: Bytes): number {
  let i = from;
  for (;;) {
    const lt = d.indexOf(LT, i);
    if (lt < 0 || lt >= limit) {
      appendText(d, i, limit, out);
      return limit;
    }
    appendText(d, i, lt, out);
    if (d[lt + 1] === 0x21 && d[lt + 2] === 0x5b) {
      // <![CDATA[ ... ]]>: taken as written (line ends still normalised).
      const k = d.indexOf(']]>', lt + 9);
      const end = k < 0 || k > limit ? limit : k;
      for (let j = lt + 9; j < end; j++) {
        const c = d[j]!;
        if (c === CR) {
          out.push(LF);
          if (d[j + 1] === LF && j + 1 < end) j++;
        } else out.push(c);
      }
      i = end + 3;
      continue;
    }
    if (d[lt + 1] === 0x21 && d[lt + 2] === 0x2d) {
      const k = d.indexOf('-->', lt + 4);
      i = k < 0 || k > limit ? limit : k + 3;
      continue;
    }
    return lt;
  }
}

/** Index after the closing tag `</...local>` found from `from` (any prefix), or -1. */
function findClose(d: Buffer, from: number, limit: number, local: string): number {
  let i = from;
  for (;;) {
    const lt = d.indexOf(LT, i);
    if (lt < 0 || lt >= limit) return -1;
    if (d[lt + 1] === SLASH) {
      const [s, e] = tagName(d, lt + 2, limit);
      if (nameIs(d, s, e, local)) {
        const gt = d.indexOf(GT, e);
        return gt < 0 || gt >= limit ? -1 : gt + 1;
      }
    }
    i = lt + 1;
  }
}

/** Text runs of an inline string or a shared string item (`t` directly or in `r`; not in `rPh`). */
function readStringItem(d: Buffer, from: number, limit: number, out: Bytes): void {
  let i = from;
  for (;;) {
    const lt = d.indexOf(LT, i);
    if (lt < 0 || lt >= limit) return;
    const c1 = d[lt + 1];
    if (c1 === SLASH || c1 === 0x21 || c1 === 0x3f) {
      const k = c1 === SLASH ? d.indexOf(GT, lt) : skipSpecial(d, lt, limit) - 1;
      if (k < 0) return;
      i = k + 1;
      continue;
    }
    const [s, e] = tagName(d, lt + 1, limit);
    const gt = d.indexOf(GT, e);
    if (gt < 0 || gt >= limit) return;
    if (nameIs(d, s, e, 'rPh')) {
      const k = d[gt - 1] === SLASH ? gt + 1 : findClose(d, gt + 1, limit, 'rPh');
      if (k < 0) return;
      i = k;
      continue;
    }
    if (nameIs(d, s, e, 't') && d[gt - 1] !== SLASH) {
      i = readContent(d, gt + 1, limit, out);
      continue;
    }
    i = gt + 1;
  }
}

export interface SharedStringLimits {
  /** Cap on decoded text plus 8 bytes per string. */
  maxBytes: number;
  capMessage: string;
}

/** The shared-strings table, held as UTF-8 bytes with an offset per string (not as JS strings). */
export class SharedStrings {
  private text = new Bytes();
  private offsets = new Uint32Array(1024);
  count = 0;
  private carry: Buffer | null = null;
  private prefixDone = false;
  constructor(private readonly limits: SharedStringLimits) {
    this.offsets[0] = 0;
  }

  /** Bytes held (text and offsets). */
  get bytes(): number {
    return this.text.n + this.count * 8;
  }

  push(chunk: Buffer): void {
    let d = chunk;
    if (this.carry) {
      d = Buffer.concat([this.carry, chunk]);
      this.carry = null;
    }
    const p = this.parse(d);
    if (p < d.length) {
      if (d.length - p > MAX_ELEMENT_BYTES) throw new ScanError(this.limits.capMessage, 'cap');
      this.carry = Buffer.from(d.subarray(p));
    }
  }

  private add(): void {
    if (this.count + 2 > this.offsets.length) {
      const next = new Uint32Array(this.offsets.length * 2);
      next.set(this.offsets);
      this.offsets = next;
    }
    this.count++;
    this.offsets[this.count] = this.text.n;
    if (this.bytes > this.limits.maxBytes) throw new ScanError(this.limits.capMessage, 'cap');
  }

  private parse(d: Buffer): number {
    let p = 0;
    const end = d.length;
    for (;;) {
      const lt = d.indexOf(LT, p);
      if (lt < 0) return end;
      if (lt + 3 > end) return lt;
      const c1 = d[lt + 1];
      if (c1 === 0x21 || c1 === 0x3f) {
        const k = skipSpecial(d, lt, end);
        if (k < 0) return lt;
        p = k;
        continue;
      }
      const close = c1 === SLASH;
      const [s, e] = tagName(d, lt + 1 + (close ? 1 : 0), end);
      const gt = d.indexOf(GT, e);
      if (gt < 0) return lt;
      if (!close && nameIs(d, s, e, 'si')) {
        if (d[gt - 1] === SLASH) {
          this.add();
          p = gt + 1;
          continue;
        }
        const k = findClose(d, gt + 1, end, 'si');
        if (k < 0) return lt;
        readStringItem(d, gt + 1, k, this.text);
        this.add();
        p = k;
        continue;
      }
      p = gt + 1;
      this.prefixDone = true;
    }
  }

  end(): void {
    this.carry = null;
  }

  /** The text of string i; undefined when there is no such string. */
  get(i: number): string | undefined {
    if (!(i >= 0 && i < this.count)) return undefined;
    return this.text.b.toString('utf8', this.offsets[i]!, this.offsets[i + 1]!);
  }
}

/** What the cells of a sheet need from the styles part and the workbook. */
export interface CellFormats {
  /** Per cell format (xf) index: 1 when its number format is a date format, 0 when not. */
  dateXf: Uint8Array;
  /** Number of cell formats (xf) in the styles part. */
  xfCount: number;
  date1904: boolean;
}

export interface SheetRowSink {
  /**
   * A row: `texts[i]` is the text of column i + 1 for i < the wanted width (missing cells '');
   * `lastCol` is the last column (1-based) with any text, 0 for an empty row. Return false to stop.
   */
  row(rowNumber: number, texts: string[], lastCol: number): boolean | void;
}

export interface SheetLimits {
  maxRows: number;
  rowCapMessage: string;
  elementCapMessage: string;
}

const T_NUM = 0;
const T_SST = 1;
const T_STR = 2;
const T_BOOL = 3;
const T_ERR = 4;
const T_DATE = 5;

function typeCode(t: string | undefined): number {
  switch (t) {
    case 's':
      return T_SST;
    case 'str':
    case 'inlineStr':
      return T_STR;
    case 'b':
      return T_BOOL;
    case 'e':
      return T_ERR;
    case 'd':
      return T_DATE;
    default:
      return T_NUM;
  }
}

/** Column number (1-based) of a cell reference such as "AB12"; 0 when there are no letters. */
function columnOf(ref: string): number {
  let n = 0;
  for (let i = 0; i < ref.length; i++) {
    const c = ref.charCodeAt(i);
    if (c >= 0x41 && c <= 0x5a) n = n * 26 + (c - 0x40);
    else if (c >= 0x61 && c <= 0x7a) n = n * 26 + (c - 0x60);
    else break;
    if (n > SHEET_MAX_COLUMNS) return n;
  }
  return n;
}

function pad(n: number, w = 2): string {
  return String(n).padStart(w, '0');
}

/** An ISO 8601 date cell (t="d") as yyyy-mm-dd, with the time when there is one. */
function isoCellText(text: string): string {
  const m = /^(\d{4})-(\d{2})-(\d{2})(?:[T ](\d{2}):(\d{2})(?::(\d{2}))?)?/.exec(text.trim());
  if (!m) return text;
  const d = `${m[1]}-${m[2]}-${m[3]}`;
  const h = Number(m[4] ?? 0);
  const mi = Number(m[5] ?? 0);
  const s = Number(m[6] ?? 0);
  return h || mi || s ? `${d} ${pad(h)}:${pad(mi)}:${pad(s)}` : d;
}

/** Serial day number to a Date, as spreadsheet programs count (and as exceljs converts). */
export function serialToDate(v: number, date1904: boolean): Date {
  return new Date(Math.round((v - 25569 + (date1904 ? 1462 : 0)) * 24 * 3600 * 1000));
}

/**
 * Streams a worksheet's XML and hands out one row at a time. Memory is one row and one cell
 * element (plus the chunk), whatever the number of rows.
 */
export class SheetScanner {
  private carry: Buffer | null = null;
  private inData = false;
  done = false;
  private rowNumber = 0;
  private rowOpen = false;
  private rowDate = -1;
  private col = 0;
  private lastCol = 0;
  private texts: string[] = [];
  private readonly attrs: Attrs = { r: undefined, s: undefined, t: undefined };
  private readonly text = new Bytes();
  /** Columns whose text is kept (the rest are only checked for being empty). */
  width = Infinity;

  constructor(
    private readonly sst: SharedStrings | undefined,
    private readonly formats: CellFormats,
    private readonly sink: SheetRowSink,
    private readonly limits: SheetLimits,
  ) {}

  /** Feed the next chunk of the sheet's XML. Returns false once reading can stop. */
  push(chunk: Buffer): boolean {
    if (this.done) return false;
    let d = chunk;
    if (this.carry) {
      d = Buffer.concat([this.carry, chunk]);
      this.carry = null;
    }
    const p = this.parse(d);
    if (!this.done && p < d.length) {
      if (d.length - p > MAX_ELEMENT_BYTES) throw new ScanError(this.limits.elementCapMessage, 'cap');
      this.carry = Buffer.from(d.subarray(p));
    }
    return !this.done;
  }

  /** The end of the part. */
  end(): void {
    if (this.rowOpen && !this.done) this.emitRow();
    this.carry = null;
  }

  private startRow(a: Attrs): void {
    const r = a.r !== undefined ? parseInt(a.r, 10) : NaN;
    this.rowNumber = Number.isFinite(r) && r > 0 ? r : this.rowNumber + 1;
    if (this.rowNumber > this.limits.maxRows) throw new ScanError(this.limits.rowCapMessage, 'cap');
    this.rowDate = -1;
    if (a.s !== undefined && a.s !== '') {
      const id = parseInt(a.s, 10);
      if (id >= 0 && id < this.formats.xfCount) this.rowDate = this.formats.dateXf[id]!;
    }
    this.rowOpen = true;
    this.col = 0;
    this.lastCol = 0;
    this.texts.length = 0;
  }

  private emitRow(): void {
    this.rowOpen = false;
    if (this.sink.row(this.rowNumber, this.texts, this.lastCol) === false) this.done = true;
  }

  private parse(d: Buffer): number {
    let p = 0;
    const end = d.length;
    const a = this.attrs;
    for (;;) {
      const lt = d.indexOf(LT, p);
      if (lt < 0) return end;
      if (lt + 3 > end) return lt;
      const c1 = d[lt + 1];
      if (c1 === 0x21 || c1 === 0x3f) {
        const k = skipSpecial(d, lt, end);
        if (k < 0) return lt;
        p = k;
        continue;
      }
      const close = c1 === SLASH;
      const [s, e] = tagName(d, lt + 1 + (close ? 1 : 0), end);
      const gt = d.indexOf(GT, e);
      if (gt < 0) return lt;
      const selfClosing = d[gt - 1] === SLASH;
      if (!this.inData) {
        if (!close && nameIs(d, s, e, 'sheetData')) {
          if (selfClosing) {
            this.done = true;
            return gt + 1;
          }
          this.inData = true;
        }
        p = gt + 1;
        continue;
      }
      const len = e - s;
      if (len === 1 && d[s] === 0x63 /* c */ && !close) {
        readAttrs(d, e, gt, a);
        if (selfClosing) {
          this.cell(a, d, -1, -1, false);
          p = gt + 1;
          continue;
        }
        const k = findClose(d, gt + 1, end, 'c');
        if (k < 0) return lt;
        this.cell(a, d, gt + 1, k, true);
        p = k;
        if (this.done) return p;
        continue;
      }
      if (len === 3 && nameIs(d, s, e, 'row')) {
        if (close) {
          if (this.rowOpen) this.emitRow();
          if (this.done) return gt + 1;
        } else {
          if (this.rowOpen) {
            this.emitRow();
            if (this.done) return lt;
          }
          readAttrs(d, e, gt, a);
          this.startRow(a);
          if (selfClosing) {
            this.emitRow();
            if (this.done) return gt + 1;
          }
        }
        p = gt + 1;
        continue;
      }
      if (close && nameIs(d, s, e, 'sheetData')) {
        if (this.rowOpen) this.emitRow();
        this.done = true;
        return gt + 1;
      }
      p = gt + 1;
    }
  }

  /** One cell: attributes in `a`, content d[from, to) (to = after its closing tag). */
  private cell(a: Attrs, d: Buffer, from: number, to: number, hasContent: boolean): void {
    if (!this.rowOpen) this.startRow({ r: undefined, s: undefined, t: undefined });
    let col = a.r !== undefined ? columnOf(a.r) : 0;
    if (col === 0) col = this.col + 1;
    if (col > SHEET_MAX_COLUMNS) throw new ScanError(`row ${this.rowNumber} has a cell beyond column XFD, the last a worksheet can hold (${SHEET_MAX_COLUMNS.toLocaleString('en-US')} columns)`, 'damaged');
    this.col = col;
    if (!hasContent) return;
    const type = typeCode(a.t);
    const styleId = a.s !== undefined ? parseInt(a.s, 10) : NaN;
    // Content: <f> (formula), <v> (value), <is> (inline string); the last <v>/<is> is the value.
    const out = this.text;
    let hasF = false;
    let hasV = false;
    let i = from;
    for (;;) {
      const lt = d.indexOf(LT, i);
      if (lt < 0 || lt >= to) break;
      const c1 = d[lt + 1];
      if (c1 === SLASH || c1 === 0x21 || c1 === 0x3f) {
        const k = c1 === SLASH ? d.indexOf(GT, lt) + 1 : skipSpecial(d, lt, to);
        if (k <= 0) break;
        i = k;
        continue;
      }
      const [s, e] = tagName(d, lt + 1, to);
      const gt = d.indexOf(GT, e);
      if (gt < 0 || gt >= to) break;
      const self = d[gt - 1] === SLASH;
      const len = e - s;
      if (len === 1 && d[s] === 0x76 /* v */) {
        hasV = true;
        out.n = 0;
        i = self ? gt + 1 : readContent(d, gt + 1, to, out);
        continue;
      }
      if (len === 1 && d[s] === 0x66 /* f */) {
        hasF = true;
        i = self ? gt + 1 : findClose(d, gt + 1, to, 'f');
        if (i < 0) break;
        continue;
      }
      if (len === 2 && d[s] === 0x69 && d[s + 1] === 0x73 /* is */) {
        hasV = true;
        out.n = 0;
        if (self) {
          i = gt + 1;
          continue;
        }
        const k = findClose(d, gt + 1, to, 'is');
        const stop = k < 0 ? to : k;
        readStringItem(d, gt + 1, stop, out);
        i = stop;
        continue;
      }
      i = gt + 1;
    }
    if (!hasV) return;
    const text = this.valueText(type, styleId, hasF, out);
    if (text === '') return;
    this.lastCol = col;
    if (col <= this.width) {
      const t = this.texts;
      while (t.length < col) t.push('');
      t[col - 1] = text;
    }
  }

  /**
   * The text of a cell's value. A formula's cached value is read like a constant of the same
   * type (see cell-text.ts for where this differs from exceljs); an empty value is blank.
   */
  private valueText(type: number, styleId: number, _hasF: boolean, v: Bytes): string {
    if (v.n === 0) return '';
    switch (type) {
      case T_SST: {
        const idx = parseInt(v.b.toString('latin1', 0, v.n), 10);
        return this.sst?.get(idx) ?? '';
      }
      case T_STR:
      case T_ERR:
        return v.b.toString('utf8', 0, v.n);
      case T_BOOL:
        return parseInt(v.b.toString('latin1', 0, v.n), 10) !== 0 ? 'TRUE' : 'FALSE';
      case T_DATE:
        return isoCellText(v.b.toString('utf8', 0, v.n));
      default: {
        const num = parseFloat(v.b.toString('latin1', 0, v.n));
        const f = this.formats;
        let isDate: number;
        if (styleId > 0 && styleId < f.xfCount) isDate = f.dateXf[styleId]!;
        else isDate = this.rowDate === 1 ? 1 : 0;
        return isDate ? cellText(serialToDate(num, f.date1904)) : cellText(num);
      }
    }
  }
}
