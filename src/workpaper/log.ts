/**
 * The append-only change log of a workpaper, chained by hashes.
 *
 * Each save appends one entry per answered step: who, when, which step, an optional reason, and
 * every changed value as (path, old, new). `stateHash` is the SHA-256 of the workpaper without
 * its log after the entry; `hash` is the SHA-256 of the entry (without `hash`) and so covers
 * `prevHash`, the previous entry's hash. Replaying every entry's new values from an empty object
 * rebuilds the workpaper, so an edit made outside the tool is both detected (hashes) and named
 * (the paths where the replayed and the actual workpaper differ).
 */
import { createHash } from 'node:crypto';
import type { LogChange, LogEntry } from './schema.js';

export const GENESIS_HASH = '0'.repeat(64);

type Path = Array<string | number>;

/** JSON with keys sorted at every level and undefined members dropped: one text per value. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(sortDeep(value));
}

function sortDeep(v: unknown): unknown {
  if (Array.isArray(v)) return v.map((x) => (x === undefined ? null : sortDeep(x)));
  if (v && typeof v === 'object') {
    const out: Record<string, unknown> = {};
    for (const k of Object.keys(v as object).sort()) {
      const x = (v as Record<string, unknown>)[k];
      if (x !== undefined) out[k] = sortDeep(x);
    }
    return out;
  }
  return v;
}

export function sha256(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** The workpaper without its log: what `stateHash` covers. */
export function content(wp: object): Record<string, unknown> {
  const { log: _log, ...rest } = wp as Record<string, unknown>;
  return JSON.parse(canonicalJson(rest)) as Record<string, unknown>;
}

export function stateHash(wp: object): string {
  return sha256(canonicalJson(content(wp)));
}

/** Equality of two JSON values as canonicalJson sees them (undefined members do not count). */
function jsonEqual(a: unknown, b: unknown): boolean {
  if (a === b) return true;
  if (Array.isArray(a) || Array.isArray(b)) {
    if (!Array.isArray(a) || !Array.isArray(b) || a.length !== b.length) return false;
    return a.every((x, i) => jsonEqual(x ?? null, b[i] ?? null));
  }
  if (isObject(a) && isObject(b)) {
    const ka = Object.keys(a).filter((k) => a[k] !== undefined);
    const kb = Object.keys(b).filter((k) => b[k] !== undefined);
    return ka.length === kb.length && ka.every((k) => jsonEqual(a[k], b[k]));
  }
  return false;
}

function isObject(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v);
}

/**
 * Every difference between two JSON values as changes. Objects are compared member by member,
 * arrays of equal length element by element; an array whose length changed is replaced whole.
 */
export function diff(oldV: unknown, newV: unknown, path: Path = []): LogChange[] {
  if (jsonEqual(oldV, newV)) return [];
  if (isObject(oldV) && isObject(newV)) {
    const out: LogChange[] = [];
    const keys = [...new Set([...Object.keys(oldV), ...Object.keys(newV)])].sort();
    for (const k of keys) {
      if (newV[k] === undefined && oldV[k] !== undefined) out.push({ path: [...path, k], old: oldV[k], deleted: true });
      else if (oldV[k] === undefined) out.push({ path: [...path, k], new: newV[k] });
      else out.push(...diff(oldV[k], newV[k], [...path, k]));
    }
    return out;
  }
  if (Array.isArray(oldV) && Array.isArray(newV) && oldV.length === newV.length) {
    return oldV.flatMap((x, i) => diff(x, newV[i], [...path, i]));
  }
  const change: LogChange = { path, new: newV };
  if (oldV !== undefined) change.old = oldV;
  return [change];
}

function clone<T>(v: T): T {
  return v === undefined ? v : (JSON.parse(JSON.stringify(v)) as T);
}

/** Apply changes to `root` in place (values taken from the changes are copied). */
function applyInPlace(root: Record<string, unknown>, changes: readonly LogChange[]): Record<string, unknown> {
  for (const c of changes) {
    if (c.path.length === 0) {
      root = c.deleted ? {} : (clone(c.new ?? null) as Record<string, unknown>);
      continue;
    }
    let node = root as Record<string | number, unknown>;
    for (let i = 0; i < c.path.length - 1; i++) {
      const k = c.path[i]!;
      if (node[k] === undefined || node[k] === null || typeof node[k] !== 'object') {
        node[k] = typeof c.path[i + 1] === 'number' ? [] : {};
      }
      node = node[k] as Record<string | number, unknown>;
    }
    const last = c.path[c.path.length - 1]!;
    if (c.deleted) delete node[last];
    else node[last] = clone(c.new ?? null);
  }
  return root;
}

/** Apply changes to a copy of a JSON value. */
export function applyChanges(base: Record<string, unknown>, changes: readonly LogChange[]): Record<string, unknown> {
  return applyInPlace(clone(base), changes);
}

/** Rebuild the workpaper content from its log alone (one working copy, changed in place). */
export function replay(log: readonly LogEntry[]): Record<string, unknown> {
  let state: Record<string, unknown> = {};
  for (const e of log) state = applyInPlace(state, e.changes);
  return state;
}

export function entryHash(e: Omit<LogEntry, 'hash'>): string {
  const { hash: _h, ...rest } = e as LogEntry;
  return sha256(canonicalJson(rest));
}

/** Build the next log entry for a save that turns `before` into `after` (both without log). */
export function nextEntry(
  log: readonly LogEntry[],
  before: object,
  after: object,
  meta: { by: string; step: string; reason?: string; at?: string; role?: 'preparer' | 'reviewer' },
): LogEntry | undefined {
  const changes = diff(content(before), content(after));
  if (changes.length === 0) return undefined;
  const prev = log[log.length - 1];
  const e: Omit<LogEntry, 'hash'> = {
    seq: (prev?.seq ?? 0) + 1,
    at: meta.at ?? new Date().toISOString(),
    by: meta.by,
    ...(meta.role ? { role: meta.role } : {}),
    step: meta.step,
    ...(meta.reason ? { reason: meta.reason } : {}),
    changes,
    stateHash: stateHash(after),
    prevHash: prev?.hash ?? GENESIS_HASH,
  };
  return { ...e, hash: entryHash(e) };
}

export interface IntegrityProblem {
  /** Where: "log entry 4", or the workpaper path that differs, e.g. "results.items[3].attributes.A1.result". */
  where: string;
  message: string;
}

export function formatPath(path: readonly (string | number)[]): string {
  let s = '';
  for (const p of path) s += typeof p === 'number' ? `[${p}]` : s === '' ? p : `.${p}`;
  return s || '(whole file)';
}

function shortValue(v: unknown): string {
  if (v === undefined) return '(absent)';
  const t = JSON.stringify(v);
  return t.length > 60 ? `${t.slice(0, 57)}...` : t;
}

/**
 * Check the log chain and that the workpaper is what its log says it is. Returns every problem
 * found; an empty list means the file is as the tool last wrote it.
 */
export function verifyLog(wp: { log?: readonly LogEntry[] } & object): IntegrityProblem[] {
  const log = wp.log ?? [];
  const problems: IntegrityProblem[] = [];
  if (log.length === 0) {
    problems.push({ where: 'log', message: 'the change log is empty: the file was not written by tolrate or its log was removed' });
    return problems;
  }
  let prevHash = GENESIS_HASH;
  let state: Record<string, unknown> = {};
  log.forEach((e, i) => {
    const label = `log entry ${e.seq}`;
    if (e.seq !== i + 1) problems.push({ where: label, message: `is numbered ${e.seq} but stands at place ${i + 1}: an entry was removed or reordered` });
    if (e.prevHash !== prevHash) problems.push({ where: label, message: 'does not follow on from the entry before it (chain broken: an entry was removed, inserted or edited)' });
    if (entryHash(e) !== e.hash) problems.push({ where: label, message: `was edited after it was written (step "${e.step}", by ${e.by}, ${e.at})` });
    state = applyInPlace(state, e.changes);
    if (sha256(canonicalJson(state)) !== e.stateHash) {
      problems.push({ where: label, message: 'its changes do not produce the state it records' });
    }
    prevHash = e.hash;
  });
  const actual = content(wp);
  for (const c of diff(state, actual)) {
    problems.push({
      where: formatPath(c.path),
      message: `was changed outside tolrate: the log says ${shortValue(c.old)}, the file has ${c.deleted ? '(removed)' : shortValue(c.new)}`,
    });
  }
  return problems;
}
