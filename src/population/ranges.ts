import { createHash } from 'node:crypto';
import { TolrateInputError } from '../errors.js';
import { noDates } from './month-tally.js';
import { buildValidation, EXAMPLES, Problems } from './checker.js';
import type { DuplicateKeyExample, KeyLookup, PopulationRow, PopulationScan, RangesSource } from './types.js';

/**
 * A population of document numbers given as ranges, without a file: '40001-52650,60001-61200',
 * less listed exclusions (voided numbers), which may themselves be numbers or ranges.
 *
 * - Ranges are put in increasing order before positions are counted, so the same set of numbers
 *   gives the same positions however the ranges were typed; ranges that simply continue each other
 *   (1-10,11-20) are the same population as 1-20.
 * - Keys are the numbers as text. A range typed with leading zeros (000120-000480) keeps that
 *   width in its keys ('000120').
 * - Ranges that overlap are reported as duplicate keys (they are usually a typing mistake);
 *   exclusions that fall outside every range are reported as problems.
 * - The fingerprint hashes a canonical text of the ranges and exclusions (shown in the fingerprint).
 */

export const RANGES_COLUMN = 'document number';

interface Interval {
  a: number;
  b: number;
  /** Zero-padded width of the keys, 0 for none. */
  width: number;
  aText: string;
  bText: string;
}

interface Segment {
  a: number;
  b: number;
  width: number;
  /** Position of `a`. */
  offset: number;
}

function parseList(text: string, what: string): Interval[] {
  const norm = text.replace(/\s*[-\u2013\u2014]\s*/g, '-').trim();
  if (norm === '') return [];
  const out: Interval[] = [];
  for (const tok of norm.split(/[,;\s]+/)) {
    if (tok === '') continue;
    const m = /^(\d{1,15})(?:-(\d{1,15}))?$/.exec(tok);
    if (!m) {
      throw new TolrateInputError(
        `${what}: "${tok}" is not a number or a range such as 40001-52650.`,
        'INVALID_RANGE',
        ['Write ranges as FIRST-LAST separated by commas: 40001-52650,60001-61200'],
      );
    }
    const aText = m[1]!;
    const bText = m[2] ?? aText;
    const a = Number(aText);
    const b = Number(bText);
    if (a > b) throw new TolrateInputError(`${what}: the range ${tok} runs backwards (${aText} is above ${bText}).`, 'INVALID_RANGE');
    const width = aText.length > 1 && aText.startsWith('0') ? aText.length : 0;
    out.push({ a, b, width, aText, bText });
  }
  return out;
}

/** Merge intervals that overlap or touch (for exclusions). */
function merge(list: Interval[]): Interval[] {
  const s = [...list].sort((x, y) => x.a - y.a || x.b - y.b);
  const out: Interval[] = [];
  for (const iv of s) {
    const last = out[out.length - 1];
    if (last && iv.a <= last.b + 1) {
      if (iv.b > last.b) {
        last.b = iv.b;
        last.bText = iv.bText;
      }
    } else out.push({ ...iv });
  }
  return out;
}

const text = (iv: { a: number; b: number; aText: string; bText: string }) => (iv.a === iv.b ? iv.aText : `${iv.aText}-${iv.bText}`);

export interface ParsedRanges {
  ranges: Interval[];
  exclusions: Interval[];
  segments: Segment[];
  rowCount: number;
  canonical: string;
  repeatedExclusions: number;
}

export function parseRanges(src: RangesSource): ParsedRanges {
  const given = parseList(src.ranges ?? '', 'Ranges');
  if (given.length === 0) throw new TolrateInputError('No document-number ranges were given (e.g. 40001-52650,60001-61200).', 'INVALID_RANGE');
  const exGiven = (src.exclusions ?? []).flatMap((e) => parseList(e, 'Exclusions'));
  // Ranges in increasing order; a range that continues the previous one (same width) is joined to it.
  const sorted = [...given].sort((x, y) => x.a - y.a || x.b - y.b);
  const ranges: Interval[] = [];
  for (const iv of sorted) {
    const last = ranges[ranges.length - 1];
    if (last && iv.a === last.b + 1 && iv.width === last.width) {
      last.b = iv.b;
      last.bText = iv.bText;
    } else ranges.push({ ...iv });
  }
  const exclusions = merge(exGiven);
  const exCount = exGiven.reduce((n, e) => n + (e.b - e.a + 1), 0);
  const exMerged = exclusions.reduce((n, e) => n + (e.b - e.a + 1), 0);
  const segments: Segment[] = [];
  let offset = 0;
  for (const r of ranges) {
    let start = r.a;
    for (const e of exclusions) {
      if (e.b < start || e.a > r.b) continue;
      if (e.a > start) {
        segments.push({ a: start, b: e.a - 1, width: r.width, offset });
        offset += e.a - start;
      }
      start = Math.max(start, e.b + 1);
      if (start > r.b) break;
    }
    if (start <= r.b) {
      segments.push({ a: start, b: r.b, width: r.width, offset });
      offset += r.b - start + 1;
    }
  }
  if (!Number.isSafeInteger(offset)) throw new TolrateInputError('The ranges hold too many numbers.', 'INVALID_RANGE');
  const canonical =
    'tolrate population: document-number ranges, v1\n' +
    `ranges: ${ranges.map(text).join(',')}\n` +
    `excluded: ${exclusions.length ? exclusions.map((e) => text({ ...e, aText: String(e.a), bText: String(e.b) })).join(',') : 'none'}\n`;
  return { ranges, exclusions, segments, rowCount: offset, canonical, repeatedExclusions: exCount - exMerged };
}

export function keyOf(seg: Segment, n: number): string {
  return seg.width ? String(n).padStart(seg.width, '0') : String(n);
}

function segmentAt(p: ParsedRanges, position: number): Segment {
  let lo = 0;
  let hi = p.segments.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (p.segments[mid]!.offset <= position) lo = mid;
    else hi = mid - 1;
  }
  return p.segments[lo]!;
}

function rowAt(p: ParsedRanges, position: number): PopulationRow {
  const seg = segmentAt(p, position);
  const key = keyOf(seg, seg.a + (position - seg.offset));
  return { position, row: position + 1, key, values: { [RANGES_COLUMN]: key } };
}

/** Numbers that lie in two or more segments (overlapping ranges). */
function overlaps(p: ParsedRanges): { count: number; rows: number; examples: DuplicateKeyExample[] } {
  const segs = [...p.segments].sort((x, y) => x.a - y.a);
  const points = [...new Set(segs.flatMap((s) => [s.a, s.b + 1]))].sort((x, y) => x - y);
  let count = 0;
  let rows = 0;
  const examples: DuplicateKeyExample[] = [];
  for (let i = 0; i + 1 < points.length; i++) {
    const lo = points[i]!;
    const hi = points[i + 1]! - 1;
    const cover = segs.filter((s) => s.a <= lo && s.b >= hi);
    if (cover.length < 2) continue;
    const len = hi - lo + 1;
    count += len;
    rows += len * cover.length;
    for (let n = lo; n <= hi && examples.length < 10; n++) {
      examples.push({
        key: keyOf(cover[0]!, n),
        occurrences: cover.length,
        rows: cover.slice(0, EXAMPLES).map((s) => s.offset + (n - s.a) + 1),
      });
    }
  }
  return { count, rows, examples };
}

export function scanRanges(src: RangesSource): PopulationScan {
  const p = parseRanges(src);
  const otherProblems: string[] = [];
  const notes: string[] = [];
  // Exclusions outside every range.
  const outside: string[] = [];
  for (const e of p.exclusions) {
    let n = e.a;
    while (n <= e.b && outside.length < 6) {
      const inside = p.ranges.find((r) => r.a <= n && r.b >= n);
      if (inside) {
        n = inside.b + 1;
        continue;
      }
      const next = p.ranges.filter((r) => r.a > n).sort((x, y) => x.a - y.a)[0];
      const end = Math.min(e.b, next ? next.a - 1 : e.b);
      outside.push(n === end ? String(n) : `${n}-${end}`);
      n = end + 1;
    }
  }
  if (outside.length) {
    otherProblems.push(`Exclusions outside every range: ${outside.slice(0, 5).join(', ')}${outside.length > 5 ? ', ...' : ''}. Check the numbers.`);
  }
  if (p.repeatedExclusions > 0) notes.push(`${p.repeatedExclusions} excluded number${p.repeatedExclusions === 1 ? ' was' : 's were'} listed more than once.`);
  const total = p.ranges.reduce((n, r) => n + (r.b - r.a + 1), 0);
  const excludedCount = total - p.rowCount;
  const validation = buildValidation({
    rowCount: p.rowCount,
    duplicates: overlaps(p),
    blankKeys: new Problems(),
    badRows: new Problems(),
    badAmounts: new Problems(),
    badEncoding: new Problems(),
    blankLines: new Problems(),
    otherProblems,
    notes,
    rowWord: 'row',
  });
  return {
    fingerprint: {
      sha256: createHash('sha256').update(p.canonical, 'utf8').digest('hex'),
      rowCount: p.rowCount,
      firstKey: p.rowCount ? rowAt(p, 0).key : '',
      lastKey: p.rowCount ? rowAt(p, p.rowCount - 1).key : '',
      columns: [RANGES_COLUMN],
      format: 'ranges',
      keyColumn: RANGES_COLUMN,
      canonical: p.canonical,
      excludedCount,
      // Document numbers carry no dates.
      monthTally: noDates(p.rowCount),
    },
    validation,
  };
}

export function rangesRowsAt(src: RangesSource, positions: readonly number[]): PopulationRow[] {
  const p = parseRanges(src);
  return positions.map((pos) => {
    if (!Number.isSafeInteger(pos) || pos < 0) {
      throw new TolrateInputError(`Row position ${String(pos)} is not a whole number from 0 up.`, 'INVALID_POSITION');
    }
    if (pos >= p.rowCount) {
      throw new TolrateInputError(
        `Row position ${pos} is beyond the population, which has ${p.rowCount.toLocaleString('en-US')} numbers (positions count from 0).`,
        'POSITION_OUT_OF_RANGE',
      );
    }
    return rowAt(p, pos);
  });
}

/**
 * Look up a list of keys in a generated population (number ranges, periods): blank entries
 * counted, repeated keys kept once, unknown keys listed; `rowsOf` gives the rows a key names
 * (more than one: the key is ambiguous and the first row is taken).
 */
export function lookupKeys(keys: readonly string[], rowCount: number, rowsOf: (key: string) => PopulationRow[]): KeyLookup {
  const seen = new Set<string>();
  const twice = new Set<string>();
  const found: PopulationRow[] = [];
  const unknown: string[] = [];
  const repeated: string[] = [];
  const ambiguous: DuplicateKeyExample[] = [];
  let blankEntries = 0;
  for (const raw of keys) {
    const k = String(raw).trim();
    if (k === '') {
      blankEntries++;
      continue;
    }
    if (seen.has(k)) {
      if (!twice.has(k)) repeated.push(k);
      twice.add(k);
      continue;
    }
    seen.add(k);
    const rows = rowsOf(k);
    if (rows.length === 0) {
      unknown.push(k);
      continue;
    }
    found.push(rows[0]!);
    if (rows.length > 1) ambiguous.push({ key: rows[0]!.key, occurrences: rows.length, rows: rows.slice(0, EXAMPLES).map((r) => r.row) });
  }
  return { found, unknown, repeated, blankEntries, ambiguous, rowCount };
}

export function rangesFindKeys(src: RangesSource, keys: readonly string[]): KeyLookup {
  const p = parseRanges(src);
  return lookupKeys(keys, p.rowCount, (k) => {
    const n = /^\d{1,15}$/.test(k) ? Number(k) : NaN;
    const hits = Number.isNaN(n) ? [] : p.segments.filter((s) => s.a <= n && s.b >= n);
    return hits.map((s) => rowAt(p, s.offset + (n - s.a)));
  });
}
