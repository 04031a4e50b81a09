/**
 * The workpaper memo (DOCX), written from the workpaper file alone and the memo templates.
 *
 *   renderMemo(workpaper, opts)  -> the .docx bytes
 *   writeMemo({ workpaper, workpaperPath, out?, templateDir? }) -> { path, bytes }
 *
 * A workpaper of a test in progress renders too: the missing sections say "not yet evaluated"
 * and the memo is marked DRAFT.
 */
import { existsSync, statSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { stateHash } from '../workpaper/log.js';
import { FileInputError } from '../errors.js';
import { saveWorkpaper, writeFileAtomic } from '../workpaper/file.js';
import type { MemoRecord, Workpaper } from '../workpaper/schema.js';
import { buildModel, type MemoModel } from './model.js';
import { buildDocument, packDocument } from './render.js';
import { loadTemplate, type MemoTemplate } from './template.js';

export interface RenderMemoOptions {
  /** A copy of templates/memo with the firm's wording (default: the templates shipped with tolrate). */
  templateDir?: string;
  /** An already loaded template (takes precedence over templateDir). */
  template?: MemoTemplate;
  /** The workpaper file, for the names and the re-performance command shown in the memo. */
  workpaperPath?: string;
  /** The generation time shown in the footer (default: now). */
  now?: Date;
  /** Draw the picture of the rates (default true). */
  chart?: boolean;
  /** Further reasons the memo is not final, listed under its DRAFT banner. */
  extraNotFinal?: string[];
}

export interface WriteMemoOptions {
  workpaper: Workpaper;
  workpaperPath: string;
  /** Default: beside the workpaper, `NAME.memo.docx` for `NAME.tolrate.json`. */
  out?: string;
  templateDir?: string;
  /** An already loaded template (takes precedence over templateDir). */
  template?: MemoTemplate;
  now?: Date;
  extraNotFinal?: string[];
}

/** The default memo path for a workpaper file: `x/NAME.tolrate.json` -> `x/NAME.memo.docx`. */
export function defaultMemoPath(workpaperPath: string): string {
  const base = basename(workpaperPath).replace(/\.tolrate\.json$/i, '').replace(/\.json$/i, '');
  return join(dirname(workpaperPath), `${base}.memo.docx`);
}

/** The memo's content, before layout (for callers that want to know what is missing). */
export async function memoModel(workpaper: Workpaper, opts: RenderMemoOptions = {}): Promise<MemoModel> {
  const template = opts.template ?? (await loadTemplate(opts.templateDir));
  return buildModel(workpaper, template, modelOptions(opts));
}

function modelOptions(opts: RenderMemoOptions) {
  return {
    ...(opts.workpaperPath ? { workpaperPath: opts.workpaperPath } : {}),
    ...(opts.now ? { now: opts.now } : {}),
    ...(opts.extraNotFinal ? { extraNotFinal: opts.extraNotFinal } : {}),
  };
}

/** Render the memo of a workpaper to DOCX bytes. */
export async function renderMemo(workpaper: Workpaper, opts: RenderMemoOptions = {}): Promise<Buffer> {
  const template = opts.template ?? (await loadTemplate(opts.templateDir));
  const model = buildModel(workpaper, template, modelOptions(opts));
  const doc = await buildDocument(model, template, { chart: opts.chart ?? true });
  return packDocument(doc, opts.now ?? new Date());
}

/** Render the memo and write it (atomically) to `out` or beside the workpaper. */
export async function writeMemo(opts: WriteMemoOptions): Promise<{ path: string; bytes: number; sha256: string }> {
  const path = resolve(opts.out ?? defaultMemoPath(opts.workpaperPath));
  if (!/\.docx$/i.test(path)) {
    throw new FileInputError(path, `The memo must be written to a .docx file; ${path} does not end in .docx.`);
  }
  const dir = dirname(path);
  if (!existsSync(dir) || !statSync(dir).isDirectory()) {
    throw new FileInputError(path, `Cannot write the memo to ${path}: the folder ${dir} does not exist.`);
  }
  if (existsSync(path) && statSync(path).isDirectory()) {
    throw new FileInputError(path, `Cannot write the memo to ${path}: it is a folder.`);
  }
  const buf = await renderMemo(opts.workpaper, {
    workpaperPath: opts.workpaperPath,
    ...(opts.templateDir ? { templateDir: opts.templateDir } : {}),
    ...(opts.template ? { template: opts.template } : {}),
    ...(opts.now ? { now: opts.now } : {}),
    ...(opts.extraNotFinal ? { extraNotFinal: opts.extraNotFinal } : {}),
  });
  writeFileAtomic(path, buf);
  return { path, bytes: buf.length, sha256: createHash('sha256').update(buf).digest('hex') };
}

/**
 * The record of a memo written from `workpaper` (as it was when written: the state its figures
 * show), to be kept in the workpaper so that a reviewer can tell which memo belongs to which state.
 */
export function memoRecord(workpaper: Workpaper, workpaperPath: string, written: { path: string; sha256: string }, o: { at: Date; final: boolean; templateDir?: string }): MemoRecord {
  const last = workpaper.log[workpaper.log.length - 1];
  const base = dirname(resolve(workpaperPath));
  const rel = relative(base, written.path);
  const tpl = o.templateDir ? relative(base, resolve(o.templateDir)) : undefined;
  return {
    sha256: written.sha256,
    path: rel && !rel.startsWith('..') && !isAbsolute(rel) ? rel.split('\\').join('/') : written.path,
    at: o.at.toISOString(),
    stateHash: stateHash(workpaper),
    logSeq: workpaper.log.length,
    logHash: last?.hash ?? '',
    final: o.final,
    ...(tpl !== undefined ? { template: tpl.split('\\').join('/') || '.' } : {}),
  };
}

export { loadTemplate, TemplateError, PLACEHOLDERS, ATTRIBUTE_PLACEHOLDERS, ATTRIBUTE_SCOPED_KEYS, DEFAULT_TEMPLATE_DIR } from './template.js';
export type { MemoTemplate, TemplateProblem } from './template.js';
export type { MemoModel, Outcome } from './model.js';
export { chartSvg } from './chart.js';
/** Keep the record of a written memo in the workpaper (one save, one change-log entry). */
export function recordMemo(
  workpaper: Workpaper,
  workpaperPath: string,
  written: { path: string; sha256: string },
  o: { at: Date; final: boolean; templateDir?: string },
): { record: MemoRecord; saved: Workpaper } {
  const record = memoRecord(workpaper, workpaperPath, written, o);
  const saved = saveWorkpaper(workpaperPath, { ...workpaper, memos: [...(workpaper.memos ?? []), record] }, { by: workpaper.engagement?.preparer ?? 'tolrate', step: 'memo', at: o.at });
  return { record, saved };
}

export { readMemoBlocks, compareMemoBlocks, type MemoBlock, type MemoDifference } from './read.js';
