/**
 * The engagement folder file (`tolrate-engagement.json`): what every test in one folder shares —
 * the entity, the period, the engagement reference, the team (names and roles) and the firm's
 * defaults (confidence, sampling policy file, memo template folder, control library). A test
 * planned in the folder takes these as its answered defaults.
 *
 * The name deliberately does not end in `.tolrate.json`, so it is never taken for a workpaper.
 */
import { existsSync, readdirSync } from 'node:fs';
import { dirname, isAbsolute, join, resolve } from 'node:path';
import * as z from 'zod';
import { FileInputError } from '../errors.js';
import { readRegularText } from '../io/read.js';
import { jsonErrorWhere } from '../io/messages.js';
import { writeFileAtomic, WORKPAPER_SUFFIX } from '../workpaper/file.js';

export const FOLDER_FILE = 'tolrate-engagement.json';
export const FOLDER_SCHEMA_VERSION = 1;
export const TEAM_ROLES = ['partner', 'manager', 'reviewer', 'preparer'] as const;
export type TeamRole = (typeof TEAM_ROLES)[number];

const text = z.string().trim().min(1, 'must not be empty');
const isoDate = z.iso.date({ error: 'must be a date written YYYY-MM-DD' });

export const EngagementFolder = z
  .object({
    schemaVersion: z.literal(FOLDER_SCHEMA_VERSION, { error: `must be ${FOLDER_SCHEMA_VERSION}` }),
    entity: text,
    periodStart: isoDate,
    periodEnd: isoDate,
    /** The engagement's own reference (each workpaper has its own reference as well). */
    reference: text,
    team: z
      .array(z.object({ name: text, role: z.enum(TEAM_ROLES, { error: `must be one of ${TEAM_ROLES.join(', ')}` }) }))
      .min(1, 'name at least one member of the team'),
    defaults: z
      .object({
        /** Planned confidence, a fraction (0.95). */
        confidence: z.number().gte(0.5, 'must be at least 0.5 (50%)').lt(1, 'must be below 1 (100%)').optional(),
        /** The firm's sampling policy file, relative to this file's folder. */
        policy: z.string().trim().min(1).optional(),
        /** The firm's memo template folder, relative to this file's folder. */
        memoTemplate: z.string().trim().min(1).optional(),
        /** The firm's library of standard controls, relative to this file's folder. */
        library: z.string().trim().min(1).optional(),
      })
      .default({}),
  })
  .superRefine((f, ctx) => {
    if (f.periodStart > f.periodEnd) ctx.addIssue({ code: 'custom', message: 'the period must not end before it starts', path: ['periodEnd'] });
    const names = f.team.map((m) => m.name.toLowerCase());
    f.team.forEach((m, i) => {
      if (names.indexOf(m.name.toLowerCase()) !== i) ctx.addIssue({ code: 'custom', message: `${m.name} is named twice`, path: ['team', i, 'name'] });
    });
    if (!f.team.some((m) => m.role === 'preparer')) ctx.addIssue({ code: 'custom', message: 'the team needs at least one preparer', path: ['team'] });
    if (!f.team.some((m) => m.role !== 'preparer')) ctx.addIssue({ code: 'custom', message: 'the team needs at least one reviewer, manager or partner', path: ['team'] });
  });
export type EngagementFolder = z.infer<typeof EngagementFolder>;
export type EngagementFolderInput = z.input<typeof EngagementFolder>;

function issuePath(path: readonly PropertyKey[]): string {
  let s = '';
  for (const p of path) s += typeof p === 'number' ? `[${p}]` : s === '' ? String(p) : `.${String(p)}`;
  return s || '(top level)';
}

/** Validate a parsed folder file; a failure names every problem. */
export function parseFolder(data: unknown, source: string): EngagementFolder {
  const r = EngagementFolder.safeParse(data);
  if (!r.success) throw new FileInputError(source, `${source} is not a valid engagement folder file:`, r.error.issues.map((i) => `${issuePath(i.path)}: ${i.message}`));
  return r.data;
}

export function folderFilePath(dir: string): string {
  return join(dir, FOLDER_FILE);
}

/** The folder file of `dir`, or undefined when there is none. A file that is there but wrong is an error naming every problem. */
export function loadFolder(dir: string): EngagementFolder | undefined {
  const path = folderFilePath(dir);
  if (!existsSync(path)) return undefined;
  // Only a regular file is read, and a parse error gives its place, never the file's text.
  const raw = readRegularText(path, 'The engagement folder file').replace(/^\uFEFF/, '');
  let data: unknown;
  try {
    data = JSON.parse(raw);
  } catch (e) {
    throw new FileInputError(path, `${path} is not valid JSON: ${jsonErrorWhere(e, raw)}.`);
  }
  return parseFolder(data, path);
}

/** Write the folder file (validated first, so a bad one is never written). */
export function saveFolder(dir: string, f: EngagementFolderInput): EngagementFolder {
  const path = folderFilePath(dir);
  const checked = parseFolder(f, path);
  writeFileAtomic(path, `${JSON.stringify(checked, null, 2)}\n`, 'the engagement file');
  return checked;
}

/** A path named in the folder file, resolved against the file's folder. */
export function folderPath(dir: string, p: string): string {
  return isAbsolute(p) ? p : resolve(dir, p);
}

/** The folder a workpaper path is in, with its folder file (if any). */
export function folderOf(workpaperPath: string): { dir: string; folder: EngagementFolder | undefined } {
  const dir = dirname(workpaperPath);
  return { dir, folder: loadFolder(dir) };
}

/** The workpaper files of a folder, sorted by name. */
export function workpaperFiles(dir: string): string[] {
  let names: string[];
  try {
    names = readdirSync(dir);
  } catch (e) {
    throw new FileInputError(dir, `Cannot read the folder ${dir}: ${(e as Error).message}`);
  }
  return names.filter((n) => n.endsWith(WORKPAPER_SUFFIX)).sort();
}

/** Members who may prepare, and who may review (anyone but a preparer). */
export function preparers(f: EngagementFolder): string[] {
  return f.team.filter((m) => m.role === 'preparer').map((m) => m.name);
}
export function reviewers(f: EngagementFolder): string[] {
  return f.team.filter((m) => m.role !== 'preparer').map((m) => m.name);
}
