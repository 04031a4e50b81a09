import type { Stats } from 'node:fs';
import type { FileHandle } from 'node:fs/promises';
import { basename, posix } from 'node:path';
import { SaxesParser } from 'saxes';
import { FileInputError } from '../errors.js';
import { fileError, openFile } from './file.js';
import { ScanError, SharedStrings, SheetScanner, SHEET_MAX_ROWS, MAX_ELEMENT_BYTES, type CellFormats, type SheetRowSink } from './xlsx-scan.js';
import { entryChunks, readEntry, readZipDirectory, ZipError, type ZipEntry } from './zip.js';

/**
 * An XLSX workbook read straight from its zip: the sheet list (with each sheet's visibility),
 * the cell formats that make a number a date, the shared strings, and one worksheet's rows,
 * streamed. No temporary files; nothing but the shared strings and one row is held in memory.
 * Caps, each named in its message: a part's uncompressed size, the shared strings' bytes, and
 * the rows of a sheet (a worksheet holds at most 1,048,576).
 */

export interface WorkbookLimits {
  /** Largest uncompressed size of a worksheet or the shared-strings part. */
  maxPartBytes: number;
  /** Largest size of the shared strings as held (UTF-8 text plus 8 bytes a string). */
  maxSharedStringBytes: number;
  /** Highest row number read. */
  maxRows: number;
}

export const DEFAULT_LIMITS: WorkbookLimits = {
  maxPartBytes: 2 * 1024 * 1024 * 1024,
  maxSharedStringBytes: 64 * 1024 * 1024,
  maxRows: SHEET_MAX_ROWS,
};

/** Parts that are parsed whole (workbook, relationships, styles) are refused above this size. */
const MAX_SMALL_PART = 32 * 1024 * 1024;

export interface SheetInfo {
  name: string;
  /** 'visible', 'hidden' or 'veryHidden' (hidden so that only a macro can show it). */
  state: string;
  hidden: boolean;
  /** Path of its part in the zip. */
  part: string;
}

const mib = (n: number) => (n >= 1 << 30 ? `${n / (1 << 30)} GiB` : `${Math.round(n / (1 << 20))} MiB`);

/** A sheet name as lists show it: quoted, hidden ones marked. */
export function sheetLabel(s: SheetInfo): string {
  return `"${s.name}"${s.hidden ? ' (hidden)' : ''}`;
}

function parseXml(text: string, onOpen: (name: string, attrs: Record<string, string>) => void): void {
  const p = new SaxesParser({ xmlns: false });
  p.on('opentag', (node) => {
    const name = node.name.includes(':') ? node.name.slice(node.name.indexOf(':') + 1) : node.name;
    onOpen(name, node.attributes as Record<string, string>);
  });
  p.write(text).close();
}

function attr(a: Record<string, string>, local: string): string | undefined {
  if (a[local] !== undefined) return a[local];
  for (const k of Object.keys(a)) if (k.endsWith(`:${local}`)) return a[k];
  return undefined;
}

function resolveTarget(from: string, target: string): string {
  if (target.startsWith('/')) return target.slice(1);
  return posix.normalize(posix.join(posix.dirname(from), target));
}

/** Date formats as exceljs decides them: any of y m d h M s b outside quotes and brackets. */
function isDateFormat(code: string | undefined): boolean {
  if (!code) return false;
  const f = code.replace(/\[[^\]]*]/g, '').replace(/"[^"]*"/g, '');
  return /[ymdhMsb]+/.test(f);
}

/** The built-in number formats (ECMA-376 Part 1, 18.8.30) that are dates or times. */
const BUILTIN_DATE_FORMATS = new Set([14, 15, 16, 17, 18, 19, 20, 21, 22, 45, 46, 47]);

/**
 * The shared strings of the last workbook read, kept for the next pass over the same file (the
 * fingerprint pass is followed by the pass that fetches the selected rows). Only one is kept,
 * and only while the file's size, modification time and inode are unchanged.
 */
let lastShared: { key: string; sst: SharedStrings } | undefined;

/** Forget the shared strings kept from the last read. */
export function forgetSharedStrings(): void {
  lastShared = undefined;
}

export class Workbook {
  sheets: SheetInfo[] = [];
  formats: CellFormats = { dateXf: new Uint8Array(0), xfCount: 0, date1904: false };
  private sharedPart: ZipEntry | undefined;
  private constructor(
    readonly path: string,
    private readonly fh: FileHandle,
    readonly size: number,
    private readonly stats: Stats,
    private readonly entries: Map<string, ZipEntry>,
    readonly limits: WorkbookLimits,
  ) {}

  get file(): string {
    return basename(this.path);
  }

  /** Tells this file apart from a changed one (path, size, modification time, inode). */
  get fileKey(): string {
    return `${this.path}\0${this.stats.size}\0${this.stats.mtimeMs}\0${this.stats.ino}`;
  }

  /** Open and read the sheet list and the cell formats. Throws FileInputError on anything wrong. */
  static async open(path: string, limits: WorkbookLimits = DEFAULT_LIMITS): Promise<Workbook> {
    const { fh, size, stats } = await openFile(path);
    let wb: Workbook | undefined;
    try {
      let entries: Map<string, ZipEntry>;
      try {
        entries = await readZipDirectory(fh, size);
      } catch (e) {
        if (e instanceof ZipError && e.kind === 'not-zip') throw await notZip(fh, size, path);
        throw e;
      }
      wb = new Workbook(path, fh, size, stats, entries, limits);
      await wb.readStructure();
      return wb;
    } catch (e) {
      await fh.close().catch(() => undefined);
      throw wb ? wb.problem(e) : problemOf(e, path);
    }
  }

  async close(): Promise<void> {
    await this.fh.close().catch(() => undefined);
  }

  private async small(name: string): Promise<string | undefined> {
    const e = this.entries.get(name);
    if (!e) return undefined;
    const b = await readEntry(this.fh, this.size, e, {
      maxBytes: MAX_SMALL_PART,
      capMessage: `its part ${name} unpacks to more than ${mib(MAX_SMALL_PART)} (the cap on that part's uncompressed size)`,
    });
    return b.toString('utf8');
  }

  private async readStructure(): Promise<void> {
    let bookPart = 'xl/workbook.xml';
    const root = await this.small('_rels/.rels');
    if (root) {
      parseXml(root, (n, a) => {
        if (n === 'Relationship' && (a.Type ?? '').endsWith('/officeDocument') && a.Target) bookPart = resolveTarget('', a.Target);
      });
    }
    const bookXml = await this.small(bookPart);
    if (bookXml === undefined) {
      throw new FileInputError(this.path, `${this.file} is a zip file but not an XLSX workbook (it has no ${bookPart}).`, [
        'Open it in a spreadsheet program and save it as .xlsx, or save the sheet as CSV UTF-8.',
      ]);
    }
    const relsPart = posix.join(posix.dirname(bookPart), '_rels', `${posix.basename(bookPart)}.rels`);
    const rels = new Map<string, { type: string; target: string }>();
    const relsXml = await this.small(relsPart);
    if (relsXml) {
      parseXml(relsXml, (n, a) => {
        if (n === 'Relationship' && a.Id && a.Target) rels.set(a.Id, { type: a.Type ?? '', target: resolveTarget(bookPart, a.Target) });
      });
    }
    const listed: Array<{ name: string; state: string; rid: string | undefined }> = [];
    parseXml(bookXml, (n, a) => {
      if (n === 'sheet') listed.push({ name: a.name ?? '', state: a.state ?? 'visible', rid: attr(a, 'id') });
      if (n === 'workbookPr') this.formats.date1904 = a.date1904 === '1' || a.date1904 === 'true';
    });
    listed.forEach((s, i) => {
      const rel = s.rid !== undefined ? rels.get(s.rid) : undefined;
      if (rel && !rel.type.endsWith('/worksheet')) return; // chart sheets and the like hold no rows
      const part = rel?.target ?? `${posix.dirname(bookPart)}/worksheets/sheet${i + 1}.xml`;
      this.sheets.push({ name: s.name, state: s.state, hidden: s.state === 'hidden' || s.state === 'veryHidden', part });
    });
    let stylesPart = `${posix.dirname(bookPart)}/styles.xml`;
    let sharedPart = `${posix.dirname(bookPart)}/sharedStrings.xml`;
    for (const r of rels.values()) {
      if (r.type.endsWith('/styles')) stylesPart = r.target;
      if (r.type.endsWith('/sharedStrings')) sharedPart = r.target;
    }
    this.sharedPart = this.entries.get(sharedPart);
    const stylesXml = await this.small(stylesPart);
    if (stylesXml) this.readStyles(stylesXml);
  }

  private readStyles(xml: string): void {
    const custom = new Map<number, string>();
    const xfs: number[] = [];
    let inXfs = false;
    const p = new SaxesParser({ xmlns: false });
    const local = (n: string) => (n.includes(':') ? n.slice(n.indexOf(':') + 1) : n);
    p.on('opentag', (node) => {
      const n = local(node.name);
      const a = node.attributes as Record<string, string>;
      if (n === 'numFmt' && a.numFmtId !== undefined && a.formatCode !== undefined) {
        custom.set(parseInt(a.numFmtId, 10), a.formatCode.replace(/[\\](.)/g, '$1'));
      } else if (n === 'cellXfs') inXfs = true;
      else if (n === 'xf' && inXfs) xfs.push(parseInt(a.numFmtId ?? '0', 10));
    });
    p.on('closetag', (node) => {
      if (local(node.name) === 'cellXfs') inXfs = false;
    });
    p.write(xml).close();
    const dateXf = new Uint8Array(xfs.length);
    xfs.forEach((id, i) => {
      if (!id) return;
      const code = custom.get(id);
      dateXf[i] = (code !== undefined ? isDateFormat(code) : BUILTIN_DATE_FORMATS.has(id)) ? 1 : 0;
    });
    this.formats = { dateXf, xfCount: xfs.length, date1904: this.formats.date1904 };
  }

  /** The sheet a source names (exactly, else ignoring case), or the first visible sheet. */
  pick(wanted: string | undefined): SheetInfo {
    if (wanted !== undefined) {
      const w = wanted.trim().toLowerCase();
      const hit = this.sheets.find((s) => s.name === wanted) ?? this.sheets.find((s) => s.name.toLowerCase() === w);
      if (!hit) {
        throw new FileInputError(
          this.path,
          `There is no sheet "${wanted}" in ${this.file}.`,
          this.sheets.length ? [`Sheets: ${this.sheets.map(sheetLabel).join(', ')}`] : [],
        );
      }
      return hit;
    }
    const first = this.sheets.find((s) => !s.hidden);
    if (!first) {
      throw new FileInputError(
        this.path,
        this.sheets.length ? `Every sheet of ${this.file} is hidden; name the one to read.` : `${this.file} has no worksheet.`,
        this.sheets.length ? [`Sheets: ${this.sheets.map(sheetLabel).join(', ')}`] : [],
      );
    }
    return first;
  }

  /** The shared strings (kept from the last read of the same, unchanged file). */
  async sharedStrings(): Promise<SharedStrings | undefined> {
    const e = this.sharedPart;
    if (!e) return undefined;
    const key = `${this.path}\0${this.stats.size}\0${this.stats.mtimeMs}\0${this.stats.ino}\0${this.limits.maxSharedStringBytes}`;
    if (lastShared?.key === key) return lastShared.sst;
    lastShared = undefined;
    const sst = await this.readSharedStrings(e);
    lastShared = { key, sst };
    return sst;
  }

  private async readSharedStrings(e: ZipEntry): Promise<SharedStrings> {
    const cap = `its shared strings come to more than ${mib(this.limits.maxSharedStringBytes)} (the cap on shared-string bytes)`;
    const sst = new SharedStrings({ maxBytes: this.limits.maxSharedStringBytes, capMessage: cap });
    for await (const c of entryChunks(this.fh, this.size, e, {
      maxBytes: this.limits.maxPartBytes,
      capMessage: `its shared strings part unpacks to more than ${mib(this.limits.maxPartBytes)} (the cap on a part's uncompressed size)`,
    })) {
      sst.push(c);
    }
    sst.end();
    return sst;
  }

  /**
   * Stream the rows of a sheet. `plan` is called before the first row and after every row, to
   * say which columns the next row's texts are needed for (the others are only checked for
   * being empty, which is much cheaper).
   */
  async rows(sheet: SheetInfo, sink: SheetRowSink, plan?: (s: SheetScanner) => void): Promise<void> {
    try {
      const entry = this.entries.get(sheet.part);
      if (!entry) {
        throw new FileInputError(this.path, `${this.file} is damaged: the part of sheet "${sheet.name}" (${sheet.part}) is missing from the zip.`, [
          'Open it in a spreadsheet program and save it again as .xlsx, or save the sheet as CSV UTF-8.',
        ]);
      }
      const sst = await this.sharedStrings();
      const scanner = new SheetScanner(
        sst,
        this.formats,
        {
          row: (n, texts, last) => {
            const r = sink.row(n, texts, last);
            if (plan) plan(scanner);
            return r;
          },
        },
        {
          maxRows: this.limits.maxRows,
          rowCapMessage: `sheet "${sheet.name}" has rows beyond row ${this.limits.maxRows.toLocaleString('en-US')} (the cap on rows; a worksheet holds at most ${SHEET_MAX_ROWS.toLocaleString('en-US')})`,
          elementCapMessage: `sheet "${sheet.name}" has one cell longer than ${mib(MAX_ELEMENT_BYTES)} of XML (the cap on one cell)`,
        },
      );
      if (plan) plan(scanner);
      const chunks = entryChunks(this.fh, this.size, entry, {
        maxBytes: this.limits.maxPartBytes,
        capMessage: `sheet "${sheet.name}" unpacks to more than ${mib(this.limits.maxPartBytes)} of XML (the cap on a part's uncompressed size)`,
      });
      for await (const c of chunks) {
        if (!scanner.push(c)) break;
      }
      scanner.end();
    } catch (e) {
      throw this.problem(e);
    }
  }

  problem(e: unknown): Error {
    return problemOf(e, this.path);
  }
}

function problemOf(e: unknown, path: string): Error {
  if (e instanceof FileInputError) return e;
  const file = basename(path);
  if (e instanceof ZipError || e instanceof ScanError) {
    const cap = (e as ZipError | ScanError).kind === 'cap';
    return new FileInputError(path, `${file} cannot be read as an XLSX workbook: ${e.message}.`, [
      cap
        ? 'Save the sheet as CSV UTF-8 and read that instead.'
        : 'Open it in a spreadsheet program and save it again as .xlsx, or save the sheet as CSV UTF-8.',
    ]);
  }
  if (e instanceof Error && /^(Unexpected|Unclosed|Text data|Invalid|disallowed|unexpected|unclosed)|\d+:\d+: /.test(e.message)) {
    return new FileInputError(path, `${file} cannot be read as an XLSX workbook: one of its parts is not well-formed XML (${e.message.split('\n')[0]}).`, [
      'Open it in a spreadsheet program and save it again as .xlsx, or save the sheet as CSV UTF-8.',
    ]);
  }
  const f = fileError(e, path);
  return f;
}

async function notZip(fh: FileHandle, size: number, path: string): Promise<FileInputError> {
  const head = Buffer.alloc(Math.min(size, 4096));
  if (head.length) await fh.read(head, 0, head.length, 0);
  const file = basename(path);
  if (head.length >= 8 && head.readUInt32BE(0) === 0xd0cf11e0) {
    return new FileInputError(path, `${file} is an old Excel (.xls) workbook or a password-protected one, not an .xlsx workbook.`, [
      'Save it as .xlsx without a password, or as CSV UTF-8.',
    ]);
  }
  if (size === 0) return new FileInputError(path, `${file} is empty: it is not an XLSX workbook.`);
  const text = !head.includes(0);
  return new FileInputError(
    path,
    text ? `${file} is text, not an XLSX workbook (perhaps a CSV file named .xlsx).` : `${file} is not an XLSX workbook (it is not a zip file).`,
    text ? ['Give it a name ending in .csv and read it as CSV.'] : ['Open it in a spreadsheet program and save it as .xlsx, or save the sheet as CSV UTF-8.'],
  );
}

/** The sheets of a workbook, in order, hidden ones included and marked. */
export async function listSheets(path: string): Promise<SheetInfo[]> {
  const wb = await Workbook.open(path);
  try {
    return wb.sheets;
  } finally {
    await wb.close();
  }
}
