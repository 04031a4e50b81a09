/**
 * Reading results back from the filled fieldwork sheet.
 *
 * Column conventions (written into the sheet's header row at selection, one group per
 * attribute; the bracketed part of a header is a reminder and is ignored when reading):
 *
 *   A1 result [C/D/V]     C = conforms (also: conforms, ok, pass)
 *                         D = deviation (also: deviation, exception, fail)
 *                         V = void: the document was properly cancelled; the item is replaced
 *                             by the next spare. A document that cannot be found is a D, not a V.
 *   A1 found              what was found, for a D (required)
 *   A1 cause [code]       for a D: not-performed, performed-late, wrong-performer,
 *                         evidence-missing, system, other (or the words: "performed late"...)
 *   A1 intent [no/suspected/yes]        for a D (required: it is never assumed)
 *   A1 pattern [isolated/systemic/unclear]  for a D (required)
 *   Void reason           for a V (required)
 *   Tested by             who tested the item           } for every tested item, when the
 *   Date tested           YYYY-MM-DD                    } sheet has these columns (a sheet
 *   Evidence              references, separated by ;    } written before them has not)
 *   Note                  optional
 *
 * A row is matched to the selected item by its `Seq` and `Key` columns. Nothing is guessed:
 * every cell that cannot be read is reported with its row, column, value and why.
 */
import { basename, extname } from 'node:path';
import { readRegularFile } from '../io/read.js';
import { withoutQuotes } from '../io/messages.js';
import { parse } from 'csv-parse/sync';
import { FileInputError } from '../errors.js';
import { FIELDWORK_SHEET, INSTRUCTIONS_SHEET, KEY_COLUMN, NOTE_COLUMN, restoreCell, SEQ_COLUMN } from '../selection/index.js';
import { cellText } from '../population/index.js';
import { CAUSE_LABELS, evidenceRefs, testedOnProblem } from '../control-test/index.js';
import { CAUSES, INTENT, PATTERNS, type Attribute, type AttributeResult, type Cause, type SelectedItem } from '../workpaper/schema.js';

export { SEQ_COLUMN, KEY_COLUMN };
export const VOID_COLUMN = 'Void reason';
export const TESTED_BY_COLUMN = 'Tested by';
export const TESTED_ON_COLUMN = 'Date tested [YYYY-MM-DD]';
export const EVIDENCE_COLUMN = 'Evidence [references; separated by ;]';

/** The fieldwork columns after the results (the Note column follows them, last). */
export const FIELDWORK_COLUMNS: readonly string[] = [TESTED_BY_COLUMN, TESTED_ON_COLUMN, EVIDENCE_COLUMN];

/** The result columns for one attribute, as written in the header. */
export function attributeColumns(id: string): { result: string; found: string; cause: string; intent: string; pattern: string } {
  return {
    result: `${id} result [C/D/V]`,
    found: `${id} found`,
    cause: `${id} cause [code]`,
    intent: `${id} intent [no/suspected/yes]`,
    pattern: `${id} pattern [isolated/systemic/unclear]`,
  };
}

/** Every result column, in order: the attributes' groups, then the void reason. */
export function resultColumns(attributes: readonly Pick<Attribute, 'id'>[]): string[] {
  return [...attributes.flatMap((a) => Object.values(attributeColumns(a.id))), VOID_COLUMN];
}

/** The pick lists of the XLSX sheet, by column: result codes, causes, intent and pattern. */
export function pickLists(attributes: readonly Pick<Attribute, 'id'>[]): Record<string, readonly string[]> {
  const out: Record<string, readonly string[]> = {};
  for (const a of attributes) {
    const c = attributeColumns(a.id);
    out[c.result] = ['C', 'D', 'V'];
    out[c.cause] = CAUSES;
    out[c.intent] = INTENT;
    out[c.pattern] = PATTERNS;
  }
  return out;
}

/** The conventions as short lines (for the sheet's notes and the interview's help). */
export const SHEET_CONVENTIONS: readonly string[] = [
  'Result: C = conforms, D = deviation, V = void (properly cancelled document, replaced by the next spare).',
  'A document that cannot be found is a deviation (D), not a void.',
  `For a D fill found, cause (${CAUSES.join(', ')}), intent (no/suspected/yes) and pattern (isolated/systemic/unclear).`,
  'For a V fill the void reason. Leave the rows of unused spares blank.',
  'For every tested item fill who tested it, the date tested (YYYY-MM-DD) and the evidence inspected (references separated by ;); the note is optional.',
  'A piece of evidence that is a file in the workpaper\'s folder (e.g. evidence/PI-253098.pdf) is fingerprinted (SHA-256) when the sheet is read.',
];

export interface SheetProblem {
  /** The file (and, for a workbook, its sheet) the problem is in, when more than one may be read. */
  sheet?: string;
  /** Row in the sheet as a spreadsheet shows it (header = 1). */
  row: number;
  column: string;
  value: string;
  why: string;
}

export interface SheetItem {
  seq: number;
  key: string;
  row: number;
  /** Nothing entered in any result column. */
  blank: boolean;
  void?: { reason: string };
  attributes: Record<string, AttributeResult>;
  /** Tester, date tested, evidence references and note, as read (evidence not yet fingerprinted). */
  fieldwork: { testedBy?: string; testedOn?: string; evidence: string[]; note?: string };
  problems: SheetProblem[];
}

export interface SheetOptions {
  /** Today (YYYY-MM-DD): a date tested after it is refused. */
  today?: string;
  /** The period's start: a date tested before it is refused. */
  periodStart?: string;
  /** Named in every problem (file, and sheet of a workbook). */
  sheet?: string;
  /**
   * Items (by Seq) whose attributes may be left blank: under a two-stage plan the second-stage
   * items and the spares, which are tested only for the attributes the worklist names (the
   * worklist's isComplete decides whether what was read is enough).
   */
  blankAllowed?: (seq: number) => boolean;
}

export interface SheetRead {
  /** Rows by seq. */
  items: Map<number, SheetItem>;
  /** Problems not tied to one item (missing columns, unknown rows). */
  problems: SheetProblem[];
}

/** The file (and sheet) an item was read from. */
const SOURCE = new WeakMap<SheetItem, string>();
function sheetOf(it: SheetItem): string {
  return SOURCE.get(it) ?? '';
}

/** Header text as compared: lower case, bracketed reminder removed, spaces collapsed. */
function norm(h: string): string {
  return h.replace(/\s*[[(][^\])]*[\])]\s*$/, '').trim().replace(/\s+/g, ' ').toLowerCase();
}

const RESULT_WORDS: Record<string, 'conforms' | 'deviation' | 'void'> = {
  c: 'conforms', conforms: 'conforms', conform: 'conforms', ok: 'conforms', pass: 'conforms',
  d: 'deviation', deviation: 'deviation', exception: 'deviation', fail: 'deviation',
  v: 'void', void: 'void',
};

function words(t: string): string {
  return t.trim().toLowerCase().replace(/[\s_]+/g, '-');
}

export function readCause(t: string): Cause | undefined {
  const w = words(t);
  const byId = CAUSES.find((c) => c === w);
  if (byId) return byId;
  return CAUSES.find((c) => words(CAUSE_LABELS[c]) === w);
}

function choice<T extends string>(list: readonly T[], t: string): T | undefined {
  const w = words(t);
  return list.find((x) => x === w);
}

/** Parse the filled sheet text (CSV) against the selection and the attributes. */
export function parseResultsSheet(text: string, items: readonly SelectedItem[], attributes: readonly Attribute[], o: SheetOptions = {}): SheetRead {
  let records: string[][];
  try {
    records = parse(text.replace(/^\uFEFF/, ''), { relax_column_count: true, skip_empty_lines: true }) as string[][];
  } catch (e) {
    throw new FileInputError(o.sheet ?? 'sheet', `The sheet is not a readable CSV file: ${withoutQuotes((e as Error).message)}`);
  }
  return parseResultsRows(records, items, attributes, o);
}

/** Parse the filled sheet's rows (header first, every cell as text) against the selection and the attributes. */
export function parseResultsRows(records: readonly string[][], items: readonly SelectedItem[], attributes: readonly Attribute[], o: SheetOptions = {}): SheetRead {
  const read = parseRows(records, items, attributes, o);
  if (o.sheet) {
    for (const p of read.problems) p.sheet = o.sheet;
    for (const it of read.items.values()) {
      SOURCE.set(it, o.sheet);
      for (const p of it.problems) p.sheet = o.sheet;
    }
  }
  return read;
}

function parseRows(records: readonly string[][], items: readonly SelectedItem[], attributes: readonly Attribute[], o: SheetOptions): SheetRead {
  const problems: SheetProblem[] = [];
  const out: SheetRead = { items: new Map(), problems };
  const header = records[0];
  if (!header) {
    problems.push({ row: 1, column: '(header)', value: '', why: 'the sheet is empty' });
    return out;
  }
  const index = new Map<string, number>();
  header.forEach((h, i) => {
    if (!index.has(norm(h))) index.set(norm(h), i);
  });
  const col = (name: string) => index.get(norm(name));
  const need = [SEQ_COLUMN, KEY_COLUMN, ...resultColumns(attributes)];
  const missing = need.filter((n) => col(n) === undefined);
  for (const m of missing) problems.push({ row: 1, column: m, value: '', why: 'this column is missing from the header' });
  if (missing.length > 0) return out;
  const bySeq = new Map(items.map((it) => [it.seq, it]));
  const shownName = (name: string) => header[col(name) ?? -1] ?? name;
  const cell = (r: string[], name: string) => restoreCell((r[col(name)!] ?? '').trim());
  records.slice(1).forEach((r, i) => {
    const row = i + 2;
    const seqText = cell(r, SEQ_COLUMN);
    const keyText = cell(r, KEY_COLUMN);
    const seq = /^\d+$/.test(seqText) ? Number(seqText) : NaN;
    const sel = bySeq.get(seq);
    if (!sel) {
      problems.push({ row, column: SEQ_COLUMN, value: seqText, why: 'no selected item has this number' });
      return;
    }
    if (sel.key !== keyText) {
      problems.push({ row, column: KEY_COLUMN, value: keyText, why: `item ${seq} is ${sel.key} in the workpaper` });
      return;
    }
    if (out.items.has(seq)) {
      problems.push({ row, column: SEQ_COLUMN, value: seqText, why: `item ${seq} appears twice (first at row ${out.items.get(seq)!.row})` });
      return;
    }
    const item: SheetItem = { seq, key: sel.key, row, blank: true, attributes: {}, fieldwork: { evidence: [] }, problems: [] };
    out.items.set(seq, item);
    // Problems name the column as the sheet's header writes it.
    const bad = (column: string, value: string, why: string) => item.problems.push({ row, column: shownName(column), value, why });
    const kinds: Array<[Attribute, 'conforms' | 'deviation' | 'void' | undefined]> = [];
    for (const a of attributes) {
      const c = attributeColumns(a.id);
      const raw = cell(r, c.result);
      const others = [c.found, c.cause, c.intent, c.pattern].map((n) => cell(r, n));
      if (raw !== '' || others.some((x) => x !== '')) item.blank = false;
      if (raw === '') {
        kinds.push([a, undefined]);
        continue;
      }
      const kind = RESULT_WORDS[raw.toLowerCase()];
      if (!kind) {
        bad(c.result, raw, 'not a result: write C (conforms), D (deviation) or V (void)');
        kinds.push([a, undefined]);
        continue;
      }
      kinds.push([a, kind]);
    }
    const voidReason = cell(r, VOID_COLUMN);
    if (voidReason !== '') item.blank = false;
    const has = (name: string) => col(name) !== undefined;
    const opt = (name: string) => (has(name) ? cell(r, name) : '');
    const testedBy = opt(TESTED_BY_COLUMN);
    const testedOn = opt(TESTED_ON_COLUMN);
    const evidence = evidenceRefs(opt(EVIDENCE_COLUMN));
    const note = opt(NOTE_COLUMN);
    if (testedBy !== '' || testedOn !== '' || evidence.length > 0) item.blank = false;
    if (item.blank) return;
    item.fieldwork = { ...(testedBy ? { testedBy } : {}), ...(testedOn ? { testedOn } : {}), evidence, ...(note ? { note } : {}) };
    const isVoid = kinds.some(([, k]) => k === 'void');
    if (isVoid) {
      const tested = kinds.filter(([, k]) => k === 'conforms' || k === 'deviation');
      for (const [a] of tested) {
        bad(attributeColumns(a.id).result, cell(r, attributeColumns(a.id).result), 'the item is marked void in another column: a void item is not tested, so mark every attribute V or leave it blank');
      }
      if (voidReason === '') bad(VOID_COLUMN, '', 'a void item needs the reason it was voided');
      if (item.problems.length === 0) item.void = { reason: voidReason };
      return;
    }
    if (voidReason !== '') bad(VOID_COLUMN, voidReason, 'a void reason is given but no result is V');
    // A tested item says who tested it, when, and on what evidence (when the sheet has the columns).
    if (has(TESTED_BY_COLUMN) && testedBy === '') bad(TESTED_BY_COLUMN, '', 'a tested item needs who tested it');
    if (has(TESTED_ON_COLUMN)) {
      const why = testedOn === '' ? 'a tested item needs the date it was tested (YYYY-MM-DD)' : testedOnProblem(testedOn, { today: o.today ?? '9999-12-31', ...(o.periodStart ? { periodStart: o.periodStart } : {}) });
      if (why) bad(TESTED_ON_COLUMN, testedOn, why);
    }
    if (has(EVIDENCE_COLUMN) && evidence.length === 0) bad(EVIDENCE_COLUMN, '', 'a tested item needs the evidence inspected: document numbers or file names, separated by ;');
    for (const [a, k] of kinds) {
      const c = attributeColumns(a.id);
      if (k === undefined) {
        if (o.blankAllowed?.(seq)) continue;
        if (!item.problems.some((p) => p.column === shownName(c.result))) bad(c.result, '', 'blank: no result entered for this attribute');
        continue;
      }
      if (k === 'conforms') {
        for (const n of [c.found, c.cause, c.intent, c.pattern]) {
          const v = cell(r, n);
          if (v !== '') bad(n, v, 'filled for an item that conforms: clear it, or mark the result D');
        }
        if (!item.problems.some((p) => [c.found, c.cause, c.intent, c.pattern].map(shownName).includes(p.column))) item.attributes[a.id] = { result: 'conforms' };
        continue;
      }
      const found = cell(r, c.found);
      const causeText = cell(r, c.cause);
      const intentText = cell(r, c.intent);
      const patternText = cell(r, c.pattern);
      const before = item.problems.length;
      if (found === '') bad(c.found, '', 'a deviation needs a description of what was found');
      const cause = causeText === '' ? undefined : readCause(causeText);
      if (causeText === '') bad(c.cause, '', `a deviation needs a cause: ${CAUSES.join(', ')}`);
      else if (!cause) bad(c.cause, causeText, `not a cause: write one of ${CAUSES.join(', ')}`);
      const intentional = choice(INTENT, intentText);
      if (intentText === '') bad(c.intent, '', 'say whether the deviation looks intentional: no, suspected or yes (it is never assumed)');
      else if (!intentional) bad(c.intent, intentText, 'write no, suspected or yes');
      const pattern = choice(PATTERNS, patternText);
      if (patternText === '') bad(c.pattern, '', 'say whether it looks isolated, systemic or unclear');
      else if (!pattern) bad(c.pattern, patternText, 'write isolated, systemic or unclear');
      if (item.problems.length === before) {
        item.attributes[a.id] = { result: 'deviation', found, cause: cause!, intentional: intentional!, pattern: pattern! };
      }
    }
  });
  return out;
}

/** The sheet's rows as text: a CSV file, or the "Fieldwork" sheet (else the first) of an XLSX workbook. */
async function sheetRecords(path: string): Promise<{ records: string[][] | undefined; text?: string; label: string }> {
  const name = basename(path);
  let data: Buffer;
  try {
    data = readRegularFile(path, 'The filled fieldwork sheet');
  } catch (e) {
    if ((e as { errno?: string }).errno === 'ENOENT') throw new FileInputError(path, `No sheet at ${path}.`);
    throw e;
  }
  if (extname(path).toLowerCase() !== '.xlsx') return { records: undefined, text: data.toString('utf8'), label: name };
  const ExcelJS = (await import('exceljs')).default;
  const wb = new ExcelJS.Workbook();
  try {
    await wb.xlsx.load(data as unknown as ArrayBuffer);
  } catch (e) {
    throw new FileInputError(path, `${name} is not a readable XLSX workbook: ${(e as Error).message}`);
  }
  const ws = wb.getWorksheet(FIELDWORK_SHEET) ?? wb.worksheets.find((w) => w.name !== INSTRUCTIONS_SHEET) ?? wb.worksheets[0];
  if (!ws) throw new FileInputError(path, `${name} has no sheets.`);
  const records: string[][] = [];
  const width = ws.columnCount;
  for (let r = 1; r <= ws.rowCount; r++) {
    const row = ws.getRow(r);
    const cells: string[] = [];
    for (let c = 1; c <= width; c++) {
      const v = row.getCell(c).value as unknown;
      // A formula is shown as typed (=...): it is never taken for the value it computes.
      const f = v && typeof v === 'object' && ('formula' in v || 'sharedFormula' in v) ? `=${String((v as { formula?: string; sharedFormula?: string }).formula ?? (v as { sharedFormula?: string }).sharedFormula)}` : undefined;
      cells.push(f ?? cellText(v));
    }
    if (cells.some((c) => c.trim() !== '')) records.push(cells);
    else if (records.length > 0) records.push(cells.map(() => ''));
  }
  // Rows as the spreadsheet numbers them: blank rows count; trailing blank rows are dropped.
  while (records.length > 0 && records[records.length - 1]!.every((c) => c.trim() === '')) records.pop();
  return { records, label: `${name}, sheet ${ws.name}` };
}

/** Read one filled sheet (CSV or XLSX); every problem names the file (and the workbook's sheet). */
export async function readResultsSheet(path: string, items: readonly SelectedItem[], attributes: readonly Attribute[], o: SheetOptions = {}): Promise<SheetRead> {
  const got = await sheetRecords(path);
  const opts = { ...o, sheet: o.sheet ?? got.label };
  return got.records ? parseResultsRows(got.records, items, attributes, opts) : parseResultsSheet(got.text!, items, attributes, opts);
}

/**
 * Read several filled sheets (one per tester) and merge them. An item filled on more than one
 * sheet must say the same on each; when it does not, it is refused with both values and both
 * files named, and nothing is taken for it. Blank rows (items another tester has) are ignored.
 */
export async function readResultsSheets(paths: readonly string[], items: readonly SelectedItem[], attributes: readonly Attribute[], o: SheetOptions = {}): Promise<SheetRead> {
  const reads = [];
  for (const p of paths) reads.push(await readResultsSheet(p, items, attributes, o));
  if (reads.length === 1) return reads[0]!;
  const out: SheetRead = { items: new Map(), problems: reads.flatMap((r) => r.problems) };
  const from = new Map<number, SheetItem>();
  for (const read of reads) {
    for (const [seq, it] of read.items) {
      const had = from.get(seq);
      if (!had || had.blank) {
        from.set(seq, it);
        continue;
      }
      if (it.blank) continue;
      const conflict = sheetConflict(had, it, attributes);
      const problems = [...had.problems, ...it.problems, ...conflict];
      if (problems.length > had.problems.length) {
        const merged: SheetItem = { ...had, problems };
        SOURCE.set(merged, sheetOf(had));
        from.set(seq, merged);
      }
    }
  }
  out.items = from;
  return out;
}

function shownResult(it: SheetItem, id: string): string {
  if (it.void) return `V (${it.void.reason})`;
  const r = it.attributes[id];
  if (!r) return '(no readable result)';
  return r.result === 'conforms' ? 'C' : `D (${r.found}; ${r.cause}; ${r.intentional}; ${r.pattern})`;
}

/** The ways two sheets' rows of one item differ, each as a problem naming both values and both files. */
function sheetConflict(a: SheetItem, b: SheetItem, attributes: readonly Attribute[]): SheetProblem[] {
  const where = (x: SheetItem) => `${sheetOf(x)} row ${x.row}`;
  const out: SheetProblem[] = [];
  const add = (column: string, va: string, vb: string) =>
    out.push({ sheet: sheetOf(b), row: b.row, column, value: vb, why: `item ${b.seq} (${b.key}) differs between two sheets in ${column}: "${va}" in ${where(a)}, "${vb}" in ${where(b)}; nothing is taken for it until one is corrected` });
  for (const attr of attributes) {
    const va = shownResult(a, attr.id);
    const vb = shownResult(b, attr.id);
    if (va !== vb) add(`${attr.id} result`, va, vb);
    if (a.void || b.void) break;
  }
  const f = (x: SheetItem) => x.fieldwork;
  if ((f(a).testedBy ?? '') !== (f(b).testedBy ?? '')) add('Tested by', f(a).testedBy ?? '', f(b).testedBy ?? '');
  if ((f(a).testedOn ?? '') !== (f(b).testedOn ?? '')) add('Date tested', f(a).testedOn ?? '', f(b).testedOn ?? '');
  return out;
}
