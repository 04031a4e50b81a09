import { resolve } from 'node:path';
import { parseFlags, str } from '../args.js';
import { FileSystemError, UsageError, WorkpaperChangedError, WorkpaperLockedError } from '../../errors.js';
import type { CommandContext } from '../types.js';

export function help(): string {
  return `tolrate memo — write the DOCX workpaper memo from a workpaper file

Usage: tolrate memo FILE [--out MEMO.docx] [--template DIR] [--oc] [--draft]

  FILE               the workpaper file (NAME.tolrate.json)
  --out MEMO.docx    where to write the memo (default: NAME.memo.docx beside FILE)
  --template DIR     a copy of tolrate's templates/memo folder with your firm's wording
                     (and, optionally, a styles.docx whose Word styles the memo takes);
                     default: the memo template folder the engagement folder file names,
                     if any, else the shipped wording
  --oc               add Appendix D: each attribute's operating characteristic (the chance of
                     relying on the control at each true deviation rate), as a table and a picture
  --draft            for a file changed outside tolrate: write a DRAFT that lists the changes
                     (without it, no memo is written for such a file)
  -h, --help         show this help

The memo holds the engagement and control, the attributes and deviation definitions, the
population and its tie-out, the approach and sample size rationale, the selection and the
population fingerprint, the results per attribute with a chart of the rates against the
tolerable rate, the deviations and their causes, the qualitative review, the conclusion,
the follow-up actions, the severity, sign-off lines, and appendices listing every item and
how to re-perform the test. Upper limits and risks are rounded up; exact values are in the
appendix. The memo is final only when every step is answered and signed off, the file is as
tolrate last wrote it, and every recorded figure follows from the recorded results; otherwise
it is marked DRAFT on every page and lists why (missing sections say "not yet evaluated").
Each memo written is recorded in the workpaper (its SHA-256, when, and the state it shows),
so \`tolrate reperform FILE --memo MEMO.docx\` can tell which state of the file it belongs to.

A template folder is checked when it is read: every placeholder such as {{entity}} must be
one the memo knows; a problem names the file, the key and the placeholder.

Characters a Word document cannot hold (control characters, U+FFFE, U+FFFF) are left out of
the memo, and its appendix says how many and from where. The memo is checked with a strict XML
parser, then written to a temporary file and renamed over MEMO.docx: on a full or read-only
disk the old memo stays as it was and the message says what to do (exit 2). Reading the
workpaper needs no lock; recording the memo in it does, so while another session has the file
open the memo is written but not recorded (run the command again later to record it).

Examples:
  tolrate memo C-310.tolrate.json
  tolrate memo C-310.tolrate.json --out review/C-310-memo.docx --template firm-templates/memo

The tool computes; whether the control can be relied on, and the severity of a deficiency,
are the practitioner's judgement under the applicable standards (e.g. AU-C 530, ISA 530,
AS 2315) and the firm's methodology.
`;
}

function kb(bytes: number): string {
  return bytes < 1024 ? `${bytes} bytes` : `${Math.round(bytes / 1024)} KB`;
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('memo', args, { out: { type: 'string', short: 'o' }, template: { type: 'string' }, draft: { type: 'boolean' }, oc: { type: 'boolean' } }, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const t = ctx.invocation ?? 'tolrate';
  const file = p.positionals[0];
  if (!file) throw new UsageError('tolrate memo: name the workpaper file.', ['Usage: tolrate memo FILE [--out MEMO.docx] [--template DIR] [--oc] [--draft]', 'See: tolrate memo --help']);
  const workpaperPath = resolve(ctx.cwd, file);
  const out = str(p, 'out');
  const templateDir = str(p, 'template');
  if (out === '') throw new UsageError('tolrate memo: --out needs a file name.', ['See: tolrate memo --help']);
  if (templateDir === '') throw new UsageError('tolrate memo: --template needs a folder.', ['See: tolrate memo --help']);
  // Loaded here, not at the top, so that `tolrate memo --help` does not load docx.
  const { loadWorkpaperText } = await import('../../workpaper/file.js');
  const { testState } = await import('../../control-test/index.js');
  const { loadTemplate, recordMemo, writeMemo } = await import('../../memo/index.js');
  const { wp: workpaper, text: loadedText } = loadWorkpaperText(workpaperPath);
  // Without --template, the firm's memo template folder named in the engagement folder file, if any.
  const { folderOf, folderPath } = await import('../../engagement/folder.js');
  const { dir: wpDir, folder } = folderOf(workpaperPath);
  const dir = templateDir !== undefined ? resolve(ctx.cwd, templateDir) : folder?.defaults.memoTemplate ? folderPath(wpDir, folder.defaults.memoTemplate) : undefined;
  const template = await loadTemplate(dir);
  // The integrity check first: a file changed outside tolrate gives no final memo.
  const state = testState(workpaper);
  let extraNotFinal: string[] | undefined;
  if (state.integrity.length > 0) {
    ctx.stderr.write(`${file} was changed outside tolrate since it was last saved:\n`);
    for (const x of state.integrity.slice(0, 30)) ctx.stderr.write(`  ${x.where}: ${x.message}\n`);
    if (state.integrity.length > 30) ctx.stderr.write(`  ... and ${state.integrity.length - 30} more\n`);
    if (!p.values.draft) {
      ctx.stderr.write(
        'No memo was written: a memo of this file would not show what its change log records.\n' +
          `  Open it with \`${t} ${file}\` to review the changes and accept them (with a reason), or restore the file;\n` +
          `  or write a DRAFT that lists these differences: ${t} memo ${file} --draft\n`,
      );
      return 1;
    }
    extraNotFinal = state.integrity.map((x) => `changed outside tolrate: ${x.where}: ${x.message}`);
  }
  const now = new Date();
  const oc = p.values.oc === true;
  const written = await writeMemo({ workpaper, workpaperPath, template, now, ...(out !== undefined ? { out: resolve(ctx.cwd, out) } : {}), ...(extraNotFinal ? { extraNotFinal } : {}), ...(oc ? { operatingCharacteristic: true } : {}) });
  ctx.stdout.write(`Memo written: ${written.path} (${kb(written.bytes)}), SHA-256 ${written.sha256}\n`);
  if (extraNotFinal) {
    ctx.stdout.write('It is a DRAFT that lists the changes made outside tolrate. It is not recorded in the workpaper, which is left as it is.\n');
    return 0;
  }
  // Recorded in the workpaper (and so in its change log): which memo shows which state. That is a
  // save, so it takes the workpaper's lock and first checks that the file is the one read.
  const { acquireLock } = await import('../../io/lock.js');
  const { readRegularText } = await import('../../io/read.js');
  let lock: import('../../io/lock.js').HeldLock | undefined;
  try {
    lock = acquireLock(workpaperPath, now);
  } catch (e) {
    if (!(e instanceof WorkpaperLockedError || e instanceof FileSystemError)) throw e;
    ctx.stdout.write(`Not recorded in the workpaper: ${e.message}\n  The memo is written; run \`${t} memo ${file}\` again once the workpaper is free to record which state it shows.\n`);
  }
  if (lock) {
    try {
      const { record, saved } = recordMemo(workpaper, workpaperPath, written, {
        at: now,
        final: !written.draft,
        ...(dir ? { templateDir: dir } : {}),
        ...(oc ? { operatingCharacteristic: true } : {}),
        beforeWrite: () => {
          if (readRegularText(workpaperPath, 'The workpaper') !== loadedText) {
            throw new WorkpaperChangedError(workpaperPath, `${file} changed while the memo was being written; the memo is not recorded in it.`, [`Run \`${t} memo ${file}\` again.`]);
          }
        },
      });
      ctx.stdout.write(`Recorded in the workpaper (change-log entry ${saved.log.length}): the memo shows the state after entry ${record.logSeq}.\n`);
    } finally {
      lock.release();
    }
  }
  if (written.draft) {
    ctx.stdout.write('DRAFT: the memo is marked DRAFT on every page, because:\n');
    for (const r of written.notFinal) ctx.stdout.write(`  - ${r}\n`);
    const first = state.open[0];
    if (first) ctx.stdout.write(`Continue with: ${t} ${first.startsWith('plan.') ? 'plan' : first === 'record' ? 'record' : 'conclude'} ${file}\n`);
  } else if (!workpaper.signoffs?.reviewer) {
    ctx.stdout.write('The reviewer has not signed off yet: the memo leaves the reviewer\'s signature and date blank.\n');
  }
  return 0;
}
