import { resolve } from 'node:path';
import { parseFlags, str } from '../../cli/args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';

export function help(): string {
  return `tolrate memo — write the DOCX workpaper memo from a workpaper file

Usage: tolrate memo FILE [--out MEMO.docx] [--template DIR]

  FILE               the workpaper file (NAME.tolrate.json)
  --out MEMO.docx    where to write the memo (default: NAME.memo.docx beside FILE)
  --template DIR     a copy of tolrate's templates/memo folder with your firm's wording
                     (and, optionally, a styles.docx whose Word styles the memo takes)
  -h, --help         show this help

The memo holds the engagement and control, the attributes and deviation definitions, the
population and its tie-out, the approach and sample size rationale, the selection and the
population fingerprint, the results per attribute with a chart of the rates against the
tolerable rate, the deviations and their causes, the qualitative review, the conclusion,
the follow-up actions, the severity, sign-off lines, and appendices listing every item and
how to re-perform the test. Upper limits and risks are rounded up; exact values are in the
appendix. A test that is not yet concluded gives a memo marked DRAFT whose missing sections
say "not yet evaluated".

A template folder is checked when it is read: every placeholder such as {{entity}} must be
one the memo knows; a problem names the file, the key and the placeholder.

Characters a Word document cannot hold (control characters, U+FFFE, U+FFFF) are left out of
the memo, and its appendix says how many and from where. The memo is checked with a strict XML
parser, then written to a temporary file and renamed over MEMO.docx: on a full or read-only
disk the old memo stays as it was and the message says what to do (exit 2). The workpaper is
only read (no lock is needed while another session has it open).

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
  const p = parseFlags('memo', args, { out: { type: 'string', short: 'o' }, template: { type: 'string' } }, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const file = p.positionals[0];
  if (!file) throw new UsageError('tolrate memo: name the workpaper file.', ['Usage: tolrate memo FILE [--out MEMO.docx] [--template DIR]', 'See: tolrate memo --help']);
  const workpaperPath = resolve(ctx.cwd, file);
  const out = str(p, 'out');
  const templateDir = str(p, 'template');
  if (out === '') throw new UsageError('tolrate memo: --out needs a file name.', ['See: tolrate memo --help']);
  if (templateDir === '') throw new UsageError('tolrate memo: --template needs a folder.', ['See: tolrate memo --help']);
  // Loaded here, not at the top, so that `tolrate memo --help` does not load docx.
  const { loadWorkpaper } = await import('../../workpaper/file.js');
  const { loadTemplate, memoModel, writeMemo } = await import('../../memo/index.js');
  const workpaper = loadWorkpaper(workpaperPath);
  const dir = templateDir !== undefined ? resolve(ctx.cwd, templateDir) : undefined;
  const template = await loadTemplate(dir);
  const model = await memoModel(workpaper, { workpaperPath, template });
  const written = await writeMemo({ workpaper, workpaperPath, template, ...(out !== undefined ? { out: resolve(ctx.cwd, out) } : {}) });
  ctx.stdout.write(`Memo written: ${written.path} (${kb(written.bytes)})\n`);
  if (model.draft) {
    const next = !workpaper.selection ? 'plan' : !workpaper.results ? 'record' : 'conclude';
    const missing = model.missing.length ? ` Not yet in the workpaper: ${model.missing.join(', ')}.` : '';
    ctx.stdout.write(`DRAFT: the test is not concluded, so the memo is marked DRAFT.${missing}\n`);
    ctx.stdout.write(`Continue with: tolrate ${next} ${file}\n`);
  } else if (!workpaper.signoffs?.reviewer) {
    ctx.stdout.write('The reviewer has not signed off yet: the memo leaves the reviewer\'s signature and date blank.\n');
  }
  return 0;
}
