/**
 * Load, validate and save workpaper files. Saving is atomic (temporary file in the same folder,
 * flushed, then renamed over the target), so a killed process leaves either the old or the new
 * file, never half of one. Every save appends a change-log entry (see log.ts).
 */
import { randomUUID } from 'node:crypto';
import { closeSync, fsyncSync, openSync, readFileSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { FileInputError } from '../errors.js';
import { SCHEMA_VERSION, Workpaper } from './schema.js';
import { nextEntry, replay } from './log.js';

export const WORKPAPER_SUFFIX = '.tolrate.json';

/** A new, empty workpaper (header only). */
export function newWorkpaper(toolVersion: string, now = new Date()): Workpaper {
  const at = now.toISOString();
  return {
    schemaVersion: SCHEMA_VERSION,
    tool: { name: 'tolrate', version: toolVersion },
    id: randomUUID(),
    createdAt: at,
    updatedAt: at,
    log: [],
  };
}

function formatIssuePath(path: readonly PropertyKey[]): string {
  let s = '';
  for (const p of path) s += typeof p === 'number' ? `[${p}]` : s === '' ? String(p) : `.${String(p)}`;
  return s || '(top level)';
}

/** Validate a parsed JSON value as a workpaper; a failure names every field and why. */
export function parseWorkpaper(data: unknown, source = 'workpaper'): Workpaper {
  if (data && typeof data === 'object' && 'schemaVersion' in data) {
    const v = (data as { schemaVersion: unknown }).schemaVersion;
    if (typeof v === 'number' && v > SCHEMA_VERSION) {
      throw new FileInputError(source, `${source} was written by a newer tolrate (schema version ${v}; this one reads ${SCHEMA_VERSION}). Update tolrate to open it.`);
    }
  }
  const r = Workpaper.safeParse(data);
  if (!r.success) {
    const details = r.error.issues.slice(0, 20).map((i) => `${formatIssuePath(i.path)}: ${i.message}`);
    if (r.error.issues.length > 20) details.push(`... and ${r.error.issues.length - 20} more`);
    throw new FileInputError(source, `${source} is not a valid workpaper file:`, details);
  }
  return r.data;
}

/** Read and validate a workpaper file. */
export function loadWorkpaper(path: string): Workpaper {
  let raw: string;
  try {
    raw = readFileSync(path, 'utf8');
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new FileInputError(path, code === 'ENOENT' ? `No workpaper file at ${path}.` : `Cannot read ${path}: ${(e as Error).message}`);
  }
  let data: unknown;
  try {
    data = JSON.parse(raw.replace(/^\uFEFF/, ''));
  } catch (e) {
    throw new FileInputError(path, `${path} is not valid JSON: ${(e as Error).message}`);
  }
  return parseWorkpaper(data, path);
}

/** Write text to `path` atomically. */
export function writeFileAtomic(path: string, text: string | Uint8Array): void {
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.${randomUUID().slice(0, 8)}.tmp`);
  const fd = openSync(tmp, 'w');
  try {
    writeSync(fd, typeof text === 'string' ? Buffer.from(text, 'utf8') : text);
    fsyncSync(fd);
  } finally {
    closeSync(fd);
  }
  try {
    renameSync(tmp, path);
  } catch (e) {
    try {
      unlinkSync(tmp);
    } catch {
      // nothing to clean
    }
    throw new FileInputError(path, `Cannot write ${path}: ${(e as Error).message}`);
  }
}

export interface SaveMeta {
  /** Who made the change (the preparer's or reviewer's name, or "tolrate" for computed steps). */
  by: string;
  /** The interview step or command, e.g. "plan.engagement", "record", "conclude". */
  step: string;
  /** In which role `by` makes the change (absent for what the tool computes). */
  role?: 'preparer' | 'reviewer';
  /** Required by the interview when a signed-off workpaper is edited. */
  reason?: string;
  at?: Date;
}

/**
 * Validate `wp`, append a log entry for what changed since the state its log records, and write
 * it atomically. Returns the saved workpaper (with the new log entry). A save that changes
 * nothing writes nothing.
 */
export function saveWorkpaper(path: string, wp: Workpaper, meta: SaveMeta): Workpaper {
  const at = (meta.at ?? new Date()).toISOString();
  const before = replay(wp.log);
  const checked = parseWorkpaper(JSON.parse(JSON.stringify({ ...wp, updatedAt: at })) as unknown, 'the workpaper being saved');
  const entry = nextEntry(wp.log, before, checked, { by: meta.by, step: meta.step, reason: meta.reason, at, ...(meta.role ? { role: meta.role } : {}) });
  // Nothing but the time of saving would change: write nothing (the first save always writes).
  if (!entry || (wp.log.length > 0 && entry.changes.every((c) => c.path.length === 1 && c.path[0] === 'updatedAt'))) return wp;
  const saved: Workpaper = { ...checked, log: [...wp.log, entry] };
  writeFileAtomic(path, `${JSON.stringify(saved, null, 2)}\n`);
  return saved;
}



