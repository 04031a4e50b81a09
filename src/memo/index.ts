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
import { saveWorkpaper } from '../workpaper/file.js';
import { writeFileSafely } from '../io/write.js';
import { xmlSafeDeep, type Removal } from '../io/text.js';
import { zipXmlProblems } from '../io/xml.js';
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
  /** Add the appendix with each attribute's operating characteristic (default false). */
  operatingCharacteristic?: boolean;
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
  /** Add the appendix with each attribute's operating characteristic. */
  operatingCharacteristic?: boolean;
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

/**
 * The workpaper and the template with every character XML 1.0 forbids removed (src/io/text.ts),
 * and the note for the memo's appendix saying how many and where, when there were any.
 */
export function cleanForMemo(workpaper: Workpaper, template: MemoTemplate): { workpaper: Workpaper; template: MemoTemplate; note: string | undefined } {
  // The change log is not shown in the memo (only its last hash), so it is left as it is.
  const { log, ...rest } = workpaper;
  const w = xmlSafeDeep(rest, 'workpaper');
  const { externalStyles, ...words } = template;
  const t = xmlSafeDeep(words, 'template');
  const removals: Removal[] = [...w.removals, ...t.removals];
  let note: string | undefined;
  if (removals.length) {
    const n = removals.reduce((a, r) => a + r.count, 0);
    const shown = removals.slice(0, 12).map((r) => `${r.where} (${r.count})`);
    if (removals.length > 12) shown.push(`and ${removals.length - 12} more places`);
    note = `${n} character(s) that a Word document cannot hold (control characters, U+FFFE, U+FFFF or broken surrogates) were left out of this memo: ${shown.join('; ')}. The workpaper file itself is unchanged.`;
  }
  return {
    workpaper: { ...(w.value as Omit<Workpaper, 'log'>), log } as Workpaper,
    template: { ...(t.value as Omit<MemoTemplate, 'externalStyles'>), ...(externalStyles !== undefined ? { externalStyles } : {}) } as MemoTemplate,
    note,
  };
}

/** Render the memo of a workpaper to DOCX bytes. Its XML is parsed (strictly) before it is returned. */
export async function renderMemo(workpaper: Workpaper, opts: RenderMemoOptions = {}): Promise<Buffer> {
  return (await render(workpaper, opts)).buf;
}

/** The memo's bytes and the model they were laid out from (whether it is final, and why not). */
async function render(workpaper: Workpaper, opts: RenderMemoOptions): Promise<{ buf: Buffer; model: MemoModel }> {
  const loaded = opts.template ?? (await loadTemplate(opts.templateDir));
  const clean = cleanForMemo(workpaper, loaded);
  const template = clean.template;
  const model = buildModel(clean.workpaper, template, modelOptions(opts));
  if (clean.note) model.cleanedNote = clean.note;
  const doc = await buildDocument(model, template, { chart: opts.chart ?? true, operatingCharacteristic: opts.operatingCharacteristic === true });
  const buf = await packDocument(doc, opts.now ?? new Date());
  const problems = await zipXmlProblems(buf);
  if (problems.length) {
    // The text was cleaned above, so this is tolrate's fault (or a firm's styles.docx that got past its check).
    throw new Error(`the memo's XML does not parse, so it was not written: ${problems.slice(0, 3).join('; ')}`);
  }
  return { buf, model };
}

/** Render the memo and write it (atomically) to `out` or beside the workpaper. */
export async function writeMemo(opts: WriteMemoOptions): Promise<{ path: string; bytes: number; sha256: string; draft: boolean; notFinal: string[] }> {
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
  const { buf, model } = await render(opts.workpaper, {
    workpaperPath: opts.workpaperPath,
    ...(opts.templateDir ? { templateDir: opts.templateDir } : {}),
    ...(opts.template ? { template: opts.template } : {}),
    ...(opts.now ? { now: opts.now } : {}),
    ...(opts.extraNotFinal ? { extraNotFinal: opts.extraNotFinal } : {}),
    ...(opts.operatingCharacteristic ? { operatingCharacteristic: true } : {}),
  });
  const written = writeFileSafely(path, buf, { what: 'the memo' });
  return { path: written.path, bytes: buf.length, sha256: createHash('sha256').update(buf).digest('hex'), draft: model.draft, notFinal: model.notFinal };
}

/**
 * The record of a memo written from `workpaper` (as it was when written: the state its figures
 * show), to be kept in the workpaper so that a reviewer can tell which memo belongs to which state.
 */
export function memoRecord(workpaper: Workpaper, workpaperPath: string, written: { path: string; sha256: string }, o: { at: Date; final: boolean; templateDir?: string; operatingCharacteristic?: boolean }): MemoRecord {
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
    ...(o.operatingCharacteristic ? { operatingCharacteristic: true } : {}),
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
  o: { at: Date; final: boolean; templateDir?: string; operatingCharacteristic?: boolean; beforeWrite?: () => void },
): { record: MemoRecord; saved: Workpaper } {
  const record = memoRecord(workpaper, workpaperPath, written, o);
  const saved = saveWorkpaper(workpaperPath, { ...workpaper, memos: [...(workpaper.memos ?? []), record] }, {
    by: workpaper.engagement?.preparer ?? 'tolrate',
    step: 'memo',
    at: o.at,
    ...(o.beforeWrite ? { beforeWrite: o.beforeWrite } : {}),
  });
  return { record, saved };
}

export { readMemoBlocks, compareMemoBlocks, type MemoBlock, type MemoDifference } from './read.js';
