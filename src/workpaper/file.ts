/**
 * Load, validate and save workpaper files. Saving is atomic (temporary file in the same folder,
 * flushed, then renamed over the target), so a killed process leaves either the old or the new
 * file, never half of one. Every save appends a change-log entry (see log.ts).
 */
import { randomUUID } from 'node:crypto';
import { FileInputError } from '../errors.js';
import { readRegularText } from '../io/read.js';
import { jsonErrorWhere } from '../io/messages.js';
import { writeFileSafely } from '../io/write.js';
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

/** Read and validate a workpaper file (a regular file only: a pipe or device is refused). */
export function loadWorkpaper(path: string): Workpaper {
  return loadWorkpaperText(path).wp;
}

/** The workpaper and the exact text it was read from (for the check before a save). */
export function loadWorkpaperText(path: string): { wp: Workpaper; text: string } {
  let raw: string;
  try {
    raw = readRegularText(path, 'The workpaper');
  } catch (e) {
    const code = (e as { errno?: string }).errno;
    if (code === 'ENOENT') throw new FileInputError(path, `No workpaper file at ${path}.`);
    throw e;
  }
  let data: unknown;
  try {
    data = JSON.parse(raw);
  } catch (e) {
    throw new FileInputError(path, `${path} is not a workpaper file: ${jsonErrorWhere(e, raw)}.`);
  }
  return { wp: parseWorkpaper(data, path), text: raw };
}

/**
 * Write text to `path` atomically (the one writer, src/io/write.ts: every byte checked, flushed,
 * mode and symbolic link kept, nothing left behind on failure).
 */
export function writeFileAtomic(path: string, text: string | Uint8Array, what = 'the file'): void {
  writeFileSafely(path, text, { what });
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
  /** Called just before the file is written (the interview checks the file on disk there). */
  beforeWrite?: () => void;
  /** Called with the text written. */
  afterWrite?: (text: string) => void;
}

/** The text of a workpaper file. */
export function workpaperText(wp: Workpaper): string {
  return `${JSON.stringify(wp, null, 2)}\n`;
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
  const text = workpaperText(saved);
  if (meta.beforeWrite) meta.beforeWrite();
  writeFileSafely(path, text, { what: 'the workpaper' });
  if (meta.afterWrite) meta.afterWrite(text);
  return saved;
}



