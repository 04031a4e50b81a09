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

/**
 * Index of the next byte c in d from i, or -1. A plain loop: tags and values are a few bytes
 * long, and a call into Buffer.indexOf costs more than scanning them here.
 */
function findByte(d: Buffer, c: number, i: number): number {
  const n = d.length;
  for (; i < n; i++) if (d[i] === c) return i;
  return -1;
}

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

const T_NUM = 0;
const T_SST = 1;
const T_STR = 2;
const T_BOOL = 3;
const T_ERR = 4;
const T_DATE = 5;

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

/** Set by tagName: the local name (without a prefix) of the last tag read is d[nameStart, nameEnd). */
let nameStart = 0;
let nameEnd = 0;

/** Read the name of the tag whose name starts at s (after `<` or `</`) into nameStart/nameEnd. */
function tagName(d: Buffer, s: number, limit: number): void {
  let e = s;
  let local = s;
  while (e < limit) {
    const c = d[e]!;
    if (c === 0x20 || c === SLASH || c === GT || c === 0x09 || c === LF || c === CR) break;
    if (c === 0x3a) local = e + 1;
    e++;
  }
  nameStart = local;
  nameEnd = e;
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
  const k = findByte(d, GT, lt);
  return k < 0 || k >= limit ? -1 : k + 1;
}

/** Attributes of a row or cell tag that the scanner needs, read as numbers straight from the bytes. */
interface Attrs {
  /** Column and row of `r` ("AB12"); 0 when absent. */
  col: number;
  row: number;
  /** `s`, -1 when absent or not a number. */
  s: number;
  /** `t` as a type code, and whether it is exactly "str". */
  t: number;
  tStr: boolean;
}

function readAttrs(d: Buffer, from: number, gt: number, a: Attrs): void {
  a.col = 0;
  a.row = 0;
  a.s = -1;
  a.t = T_NUM;
  a.tStr = false;
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
    let ve = vs;
    while (ve < gt && d[ve] !== q) ve++;
    if (ve >= gt) return;
    i = ve + 1;
    if (ne - ns !== 1) continue;
    const n = d[ns];
    if (n === 0x72) {
      let j = vs;
      let col = 0;
      for (; j < ve; j++) {
        const c = d[j]! | 0x20;
        if (c < 0x61 || c > 0x7a) break;
        if (col <= SHEET_MAX_COLUMNS) col = col * 26 + (c - 0x60);
      }
      let row = 0;
      for (; j < ve; j++) {
        const c = d[j]! - 0x30;
        if (c < 0 || c > 9) break;
        if (row < 1e12) row = row * 10 + c;
      }
      a.col = col;
      a.row = row;
    } else if (n === 0x73) {
      let v = 0;
      let ok = ve > vs;
      for (let j = vs; j < ve; j++) {
        const c = d[j]! - 0x30;
        if (c < 0 || c > 9) {
          ok = j > vs;
          break;
        }
        if (v < 1e9) v = v * 10 + c;
      }
      a.s = ok ? v : -1;
    } else if (n === 0x74) {
      const len = ve - vs;
      const c0 = d[vs];
      if (len === 1) a.t = c0 === 0x73 ? T_SST : c0 === 0x62 ? T_BOOL : c0 === 0x65 ? T_ERR : c0 === 0x64 ? T_DATE : T_NUM;
      else if (len === 3 && c0 === 0x73 && d[vs + 1] === 0x74 && d[vs + 2] === 0x72) {
        a.t = T_STR;
        a.tStr = true;
      } else if (len === 9 && d.toString('latin1', vs, ve) === 'inlineStr') a.t = T_STR;
    }
  }
}

/**
 * Read character data of the element whose content starts at `from`, up to its closing tag
 * (the next `<` that is not CDATA), appending it to out. Returns the index of that `<`.
 */
function readContent(d: Buffer, from: number, limit: number, out: Bytes): number {
  let i = from;
  for (;;) {
    const lt = findByte(d, LT, i);
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
    const lt = findByte(d, LT, i);
    if (lt < 0 || lt >= limit) return -1;
    if (d[lt + 1] === SLASH) {
      tagName(d, lt + 2, limit);
      const s = nameStart;
      const e = nameEnd;
      if (nameIs(d, s, e, local)) {
        const gt = findByte(d, GT, e);
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
    const lt = findByte(d, LT, i);
    if (lt < 0 || lt >= limit) return;
    const c1 = d[lt + 1];
    if (c1 === SLASH || c1 === 0x21 || c1 === 0x3f) {
      const k = c1 === SLASH ? findByte(d, GT, lt) : skipSpecial(d, lt, limit) - 1;
      if (k < 0) return;
      i = k + 1;
      continue;
    }
    tagName(d, lt + 1, limit);
      const s = nameStart;
      const e = nameEnd;
    const gt = findByte(d, GT, e);
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

/** Pages of the shared strings' text: a string never spans two (one is at most MAX_ELEMENT_BYTES). */
const PAGE = 16 * 1024 * 1024;

/**
 * The shared-strings table, held as UTF-8 bytes with an offset per string (not as JS strings).
 * The text is kept in pages of 16 MiB, so it grows without copying what it holds (a doubling
 * buffer would briefly need the old and the new copy, half as much again as the cap).
 */
export class SharedStrings {
  private readonly text = new Bytes();
  private pages: Buffer[] = [];
  /** Where the text of the current page starts counting (page index × PAGE). */
  private pageBase = 0;
  /** Start and end of each string: page index × PAGE + offset in the page. */
  private starts = new Uint32Array(1024);
  private ends = new Uint32Array(1024);
  /** Where the text of the string being read began in the current page. */
  private cur = 0;
  count = 0;
  private carry: Buffer | null = null;
  constructor(private readonly limits: SharedStringLimits) {}

  /** Bytes held (text and offsets). */
  get bytes(): number {
    return this.pageBase + this.text.n + this.count * 8;
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

  /** The string whose text has just been appended ends here. */
  private add(): void {
    if (this.count + 1 > this.starts.length) {
      const grow = (a: Uint32Array) => {
        const next = new Uint32Array(a.length * 2);
        next.set(a);
        return next;
      };
      this.starts = grow(this.starts);
      this.ends = grow(this.ends);
    }
    if (this.bytes > this.limits.maxBytes) throw new ScanError(this.limits.capMessage, 'cap');
    if (this.text.n > PAGE) {
      // Page full: it keeps the strings before this one, which moves to a new page.
      const len = this.text.n - this.cur;
      const page = Buffer.allocUnsafe(this.cur);
      this.text.b.copy(page, 0, 0, this.cur);
      this.pages.push(page);
      this.pageBase += PAGE;
      this.text.b.copy(this.text.b, 0, this.cur, this.cur + len);
      this.text.n = len;
      this.cur = 0;
    }
    this.starts[this.count] = this.pageBase + this.cur;
    this.ends[this.count] = this.pageBase + this.text.n;
    this.count++;
    this.cur = this.text.n;
  }

  private parse(d: Buffer): number {
    let p = 0;
    const end = d.length;
    for (;;) {
      const lt = findByte(d, LT, p);
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
      tagName(d, lt + 1 + (close ? 1 : 0), end);
      const s = nameStart;
      const e = nameEnd;
      const gt = findByte(d, GT, e);
      if (gt < 0) return lt;
      if (!close && nameIs(d, s, e, 'si')) {
        // The usual shape, <si><t>plain text</t></si>, without the general walk.
        const q = gt + 1;
        if (e === lt + 3 && d[q] === LT && d[q + 1] === 0x74 && d[q + 2] === GT) {
          const k = findByte(d, LT, q + 3);
          if (k < 0) return lt;
          if (k + 10 > end) return lt;
          if (
            d[k + 1] === SLASH && d[k + 2] === 0x74 && d[k + 3] === GT &&
            d[k + 4] === LT && d[k + 5] === SLASH && d[k + 6] === 0x73 && d[k + 7] === 0x69 && d[k + 8] === GT
          ) {
            if (hasSpecial(d, q + 3, k)) appendText(d, q + 3, k, this.text);
            else this.text.pushRange(d, q + 3, k);
            this.add();
            p = k + 9;
            continue;
          }
        }
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
    }
  }

  end(): void {
    this.carry = null;
  }

  /** The length in bytes of string i; 0 when there is no such string. */
  length(i: number): number {
    if (!(i >= 0 && i < this.count)) return 0;
    return this.ends[i]! - this.starts[i]!;
  }

  /** The text of string i; undefined when there is no such string. */
  get(i: number): string | undefined {
    if (!(i >= 0 && i < this.count)) return undefined;
    const s = this.starts[i]!;
    const p = Math.floor(s / PAGE);
    const page = p < this.pages.length ? this.pages[p]! : this.text.b;
    const at = s - p * PAGE;
    return page.toString('utf8', at, at + this.ends[i]! - s);
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

/** Whether d[s, e) is a number as JavaScript would print it, with at most 15 significant digits. */
function canonicalNumber(d: Buffer, s: number, e: number): boolean {
  let i = s;
  if (d[i] === 0x2d) i++;
  if (i >= e) return false;
  const first = d[i]!;
  if (first < 0x31 || first > 0x39) return false; // no leading zero (so no 0.x either), digits only
  let digits = 0;
  for (; i < e; i++) {
    const c = d[i]!;
    if (c === 0x2e) break;
    if (c < 0x30 || c > 0x39) return false;
    digits++;
  }
  if (i < e) {
    i++;
    if (i >= e) return false;
    for (; i < e; i++) {
      const c = d[i]!;
      if (c < 0x30 || c > 0x39) return false;
      digits++;
    }
    if (d[e - 1] === 0x30) return false;
  }
  return digits <= 15;
}

/** Small cache of texts by value bytes (dates and other repeated numbers). */
class TextCache {
  private map = new Map<string, string>();
  private days = new Map<number, string>();
  day(key: number, make: () => string): string {
    let v = this.days.get(key);
    if (v === undefined) {
      if (this.days.size >= 65536) this.days.clear();
      v = make();
      this.days.set(key, v);
    }
    return v;
  }
  get(key: string, make: () => string): string {
    let v = this.map.get(key);
    if (v === undefined) {
      if (this.map.size >= 4096) this.map.clear();
      v = make();
      this.map.set(key, v);
    }
    return v;
  }
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
  private rowDate = 0;
  private col = 0;
  private lastCol = 0;
  private texts: string[] = [];
  private readonly attrs: Attrs = { col: 0, row: 0, s: -1, t: T_NUM, tStr: false };
  private readonly text = new Bytes();
  private readonly dates = new TextCache();
  /** Bytes of the part pushed before the current chunk, and the offset of d[0] while parsing. */
  private consumed = 0;
  private dAbs = 0;
  /** Offset in the part of the current row's start tag, and the row number before it. */
  rowAbs = 0;
  rowPrev = 0;
  private skipTo = -1;
  private skipRow = 0;
  /** Columns whose text is kept (the rest are only checked for being empty). */
  width = Infinity;
  /** When set, only columns c with keep[c] = 1 (1-based) have their text made; the others are ''. */
  keep: Uint8Array | null = null;

  constructor(
    private readonly sst: SharedStrings | undefined,
    private readonly formats: CellFormats,
    private readonly sink: SheetRowSink,
    private readonly limits: SheetLimits,
  ) {}

  /**
   * Go on at offset `abs` of the part (the start tag of a row seen in an earlier reading), the
   * row before it being `rowBefore`; everything up to there is passed over unparsed. Only
   * forward, and only from a row callback or between chunks.
   */
  skip(abs: number, rowBefore: number): void {
    this.skipTo = abs;
    this.skipRow = rowBefore;
  }

  /** Feed the next chunk of the sheet's XML. Returns false once reading can stop. */
  push(chunk: Buffer): boolean {
    const r = this.pushChunk(chunk);
    this.consumed += chunk.length;
    return r;
  }

  private pushChunk(chunk: Buffer): boolean {
    if (this.done) return false;
    if (this.skipTo >= 0 && this.consumed + chunk.length <= this.skipTo) {
      this.carry = null;
      return true;
    }
    let d = chunk;
    let from = 0;
    const carry = this.carry;
    if (carry) {
      // Finish the element cut by the last chunk on a short join, then go on in the chunk itself.
      this.carry = null;
      let take = Math.min(chunk.length, 4096);
      for (;;) {
        const joined = Buffer.concat([carry, chunk.subarray(0, take)]);
        this.dAbs = this.consumed - carry.length;
        const p = this.parse(joined, 0);
        if (this.done) return false;
        if (p > carry.length || take === chunk.length) {
          if (p >= carry.length) from = p - carry.length;
          else {
            d = joined;
            from = p;
          }
          break;
        }
        take = Math.min(chunk.length, take * 4);
      }
      if (d === chunk && from >= chunk.length) return true;
    }
    this.dAbs = this.consumed;
    const p = d === chunk ? this.parse(chunk, from) : from;
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

  private startRow(a: Attrs | undefined): void {
    const r = a ? a.row : 0;
    this.rowNumber = r > 0 ? r : this.rowNumber + 1;
    if (this.rowNumber > this.limits.maxRows) throw new ScanError(this.limits.rowCapMessage, 'cap');
    this.rowDate = 0;
    if (a && a.s >= 0 && a.s < this.formats.xfCount) this.rowDate = this.formats.dateXf[a.s]!;
    this.rowOpen = true;
    this.col = 0;
    this.lastCol = 0;
    this.texts.length = 0;
  }

  private emitRow(): void {
    this.rowOpen = false;
    if (this.sink.row(this.rowNumber, this.texts, this.lastCol) === false) this.done = true;
  }

  /** Parse d from p; returns the first index not consumed. */
  private parse(d: Buffer, p: number): number {
    const end = d.length;
    const a = this.attrs;
    for (;;) {
      if (this.skipTo >= 0) {
        const rel = this.skipTo - this.dAbs;
        if (rel >= end) return end;
        if (rel >= p) {
          p = rel;
          this.rowNumber = this.skipRow;
          this.rowOpen = false;
          this.inData = true;
        }
        this.skipTo = -1;
      }
      const lt = findByte(d, LT, p);
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
      tagName(d, lt + 1 + (close ? 1 : 0), end);
      const s = nameStart;
      const e = nameEnd;
      const gt = findByte(d, GT, e);
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
          this.cell(d, -1, end);
          p = gt + 1;
          continue;
        }
        const k = this.cell(d, gt + 1, end);
        if (k < 0) return lt;
        p = k;
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
            if (this.skipTo >= 0) {
              p = lt;
              continue;
            }
          }
          readAttrs(d, e, gt, a);
          this.rowAbs = this.dAbs + lt;
          this.rowPrev = this.rowNumber;
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

  /**
   * One cell, its attributes in this.attrs and its content from `from` (-1: self-closing).
   * Returns the index after `</c>`, or -1 when the cell is not complete in d (nothing changed).
   */
  private cell(d: Buffer, from: number, end: number): number {
    const a = this.attrs;
    // Content: <f> (formula), <v> (value), <is> (inline string); the last <v>/<is> is the value.
    let vs = -1;
    let ve = -1;
    let decoded = false;
    let after = -1;
    if (from >= 0) {
      let i = from;
      for (;;) {
        const lt = findByte(d, LT, i);
        if (lt < 0 || lt + 2 >= end) return -1;
        const c1 = d[lt + 1];
        if (c1 === 0x21 || c1 === 0x3f) {
          const k = skipSpecial(d, lt, end);
          if (k < 0) return -1;
          i = k;
          continue;
        }
        const close = c1 === SLASH;
        tagName(d, lt + 1 + (close ? 1 : 0), end);
      const s = nameStart;
      const e = nameEnd;
        const gt = findByte(d, GT, e);
        if (gt < 0) return -1;
        const len = e - s;
        if (close) {
          if (len === 1 && d[s] === 0x63) {
            after = gt + 1;
            break;
          }
          i = gt + 1;
          continue;
        }
        const self = d[gt - 1] === SLASH;
        if (len === 1 && d[s] === 0x76 /* v */) {
          if (self) {
            vs = ve = 0;
            decoded = false;
            i = gt + 1;
            continue;
          }
          const k = findByte(d, LT, gt + 1);
          if (k < 0) return -1;
          if (d[k + 1] === SLASH && !hasSpecial(d, gt + 1, k)) {
            vs = gt + 1;
            ve = k;
            decoded = false;
          } else {
            this.text.n = 0;
            const stop = readContent(d, gt + 1, end, this.text);
            if (stop >= end) return -1;
            vs = 0;
            ve = this.text.n;
            decoded = true;
            i = stop;
            continue;
          }
          i = k;
          continue;
        }
        if (len === 1 && d[s] === 0x66 /* f */) {
          i = gt + 1;
          continue;
        }
        if (len === 2 && d[s] === 0x69 && d[s + 1] === 0x73 /* is */) {
          this.text.n = 0;
          vs = ve = 0;
          decoded = true;
          if (self) {
            i = gt + 1;
            continue;
          }
          const k = findClose(d, gt + 1, end, 'is');
          if (k < 0) return -1;
          readStringItem(d, gt + 1, k, this.text);
          ve = this.text.n;
          i = k;
          continue;
        }
        i = gt + 1;
      }
    }
    if (!this.rowOpen) this.startRow(undefined);
    let col = a.col;
    if (col === 0) col = this.col + 1;
    if (col > SHEET_MAX_COLUMNS) throw new ScanError(`row ${this.rowNumber} has a cell beyond column XFD, the last a worksheet can hold (${SHEET_MAX_COLUMNS.toLocaleString('en-US')} columns)`, 'damaged');
    this.col = col;
    if (vs < 0 || ve === vs) return from < 0 ? 0 : after;
    const b = decoded ? this.text.b : d;
    const keep = this.keep;
    if (col > this.width || (keep !== null && keep[col] !== 1)) {
      if (!this.isEmpty(b, vs, ve)) this.lastCol = col;
      return from < 0 ? 0 : after;
    }
    const text = this.valueText(b, vs, ve);
    if (text === '') return from < 0 ? 0 : after;
    this.lastCol = col;
    {
      const t = this.texts;
      while (t.length < col) t.push('');
      t[col - 1] = text;
    }
    return from < 0 ? 0 : after;
  }

  /** Whether the text of the value b[s, e) would be empty, without making it where that can be told. */
  private isEmpty(b: Buffer, s: number, e: number): boolean {
    const t = this.attrs.t;
    if (t === T_SST) {
      let idx = 0;
      for (let i = s; i < e; i++) {
        const c = b[i]! - 0x30;
        if (c < 0 || c > 9) return i === s ? true : (this.sst?.length(idx) ?? 0) === 0;
        idx = idx * 10 + c;
      }
      return (this.sst?.length(idx) ?? 0) === 0;
    }
    if (t !== T_NUM) return false;
    // A number's text is never empty; a date's is when the serial is not a number.
    const f = this.formats;
    const isDate = this.attrs.s > 0 && this.attrs.s < f.xfCount ? f.dateXf[this.attrs.s] : this.rowDate;
    return isDate ? this.valueText(b, s, e) === '' : false;
  }

  /**
   * The text of a cell's value b[s, e) (not empty). A formula's cached value is read like a
   * constant of the same type (see cell-text.ts for where this differs from exceljs).
   */
  private valueText(b: Buffer, s: number, e: number): string {
    const a = this.attrs;
    switch (a.t) {
      case T_SST: {
        let idx = 0;
        for (let i = s; i < e; i++) {
          const c = b[i]! - 0x30;
          if (c < 0 || c > 9) {
            idx = i === s ? -1 : idx;
            break;
          }
          idx = idx * 10 + c;
        }
        return this.sst?.get(idx) ?? '';
      }
      case T_STR:
      case T_ERR:
        return b.toString('utf8', s, e);
      case T_BOOL:
        return parseInt(b.toString('latin1', s, e), 10) !== 0 ? 'TRUE' : 'FALSE';
      case T_DATE:
        return isoCellText(b.toString('utf8', s, e));
      default: {
        const f = this.formats;
        const isDate = a.s > 0 && a.s < f.xfCount ? f.dateXf[a.s] : this.rowDate;
        if (isDate) {
          // Whole serial days (the usual date) are looked up by their number, without a string.
          let day = 0;
          let i = s;
          for (; i < e && i - s < 9; i++) {
            const c = b[i]! - 0x30;
            if (c < 0 || c > 9) break;
            day = day * 10 + c;
          }
          if (i === e && e > s) return this.dates.day(day, () => cellText(serialToDate(day, f.date1904)));
          const raw = b.toString('latin1', s, e);
          return this.dates.get(raw, () => cellText(serialToDate(parseFloat(raw), f.date1904)));
        }
        const raw = b.toString('latin1', s, e);
        if (canonicalNumber(b, s, e)) return raw;
        return cellText(parseFloat(raw));
      }
    }
  }
}

/** Whether d[s, e) holds an entity, a CR or CDATA (so it must be decoded). */
function hasSpecial(d: Buffer, s: number, e: number): boolean {
  for (let i = s; i < e; i++) {
    const c = d[i];
    if (c === AMP || c === CR) return true;
  }
  return false;
}
