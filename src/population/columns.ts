import { FileInputError } from '../errors.js';
import { basename } from 'node:path';
import { editDistance } from '../util/text.js';

/** Header names as the population will show them, with the fixes noted. */
export interface HeaderNames {
  names: string[];
  notes: string[];
}

/**
 * Clean a header: names are trimmed; a blank name becomes "(column N)"; a name used again gets
 * " (2)", " (3)"... so every column can be told apart. Each fix is noted for the report.
 */
export function headerNames(raw: string[]): HeaderNames {
  const names: string[] = [];
  const notes: string[] = [];
  const seen = new Map<string, number>();
  raw.forEach((r, i) => {
    let name = r.trim();
    if (name === '') {
      name = `(column ${i + 1})`;
      notes.push(`Column ${i + 1} has no name in the header; it is shown as "${name}".`);
    }
    const times = (seen.get(name) ?? 0) + 1;
    seen.set(name, times);
    if (times > 1) {
      const renamed = `${name} (${times})`;
      notes.push(`The header names "${name}" more than once; column ${i + 1} is shown as "${renamed}".`);
      name = renamed;
    }
    names.push(name);
  });
  return { names, notes };
}


/** The column name closest to `word` (ignoring case, spaces, _ and -), if any is reasonably close. */
export function nearestColumn(word: string, names: readonly string[]): string | undefined {
  const norm = (s: string) => s.toLowerCase().replace(/[\s_\-.]+/g, '');
  const w = norm(word);
  let best: string | undefined;
  let bestScore = Infinity;
  for (const n of names) {
    const c = norm(n);
    if (c === '' || w === '') continue;
    const d = c.includes(w) || w.includes(c) ? Math.min(1, editDistance(w, c)) : editDistance(w, c);
    // Close enough: at most 2 edits, or up to 40% of the longer name.
    if (d > Math.max(2, Math.floor(0.4 * Math.max(w.length, c.length)))) continue;
    const score = d / Math.max(w.length, c.length);
    if (score < bestScore) {
      bestScore = score;
      best = n;
    }
  }
  return best;
}

/**
 * Find a column by name: exactly (after trimming), else ignoring case if that is unambiguous.
 * Otherwise a FileInputError that lists the columns and suggests the nearest one.
 */
export function findColumn(names: readonly string[], wanted: string, role: string, file: string): number {
  const w = wanted.trim();
  let i = names.indexOf(w);
  if (i >= 0) return i;
  const lower = names.map((n) => n.toLowerCase());
  i = lower.indexOf(w.toLowerCase());
  if (i >= 0 && lower.lastIndexOf(w.toLowerCase()) === i) return i;
  const guess = nearestColumn(w, names);
  const details = [`Columns in ${file}: ${names.map((n) => `"${n}"`).join(', ') || '(none)'}`];
  if (guess) details.push(`Did you mean "${guess}"?`);
  throw new FileInputError(file, `The ${role} column "${wanted}" is not in ${file}.`, details);
}

/** The header of a file resolved against the columns a source names. */
export interface ResolvedColumns {
  names: string[];
  notes: string[];
  key: number;
  amount?: number;
  date?: number;
}

/** Find the key, amount and date columns of a source in a header; unknown names are a FileInputError. */
export function resolveColumns(
  src: { path: string; keyColumn: string; amountColumn?: string; dateColumn?: string },
  raw: string[],
): ResolvedColumns {
  const { names, notes } = headerNames(raw);
  const file = basename(src.path);
  const r: ResolvedColumns = { names, notes, key: findColumn(names, src.keyColumn, 'key', file) };
  if (src.amountColumn !== undefined) r.amount = findColumn(names, src.amountColumn, 'amount', file);
  if (src.dateColumn !== undefined) r.date = findColumn(names, src.dateColumn, 'date', file);
  return r;
}
