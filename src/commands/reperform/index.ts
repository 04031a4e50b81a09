import { parseFlags, str } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import { visible } from '../../io/text.js';

const HELP = `tolrate reperform — re-derive a test from its workpaper file and report any difference

Usage: tolrate reperform FILE [--population PATH] [--memo MEMO.docx [--template DIR]] [--json]

It checks:
  - the change log (hash chain, and edits made outside tolrate, named by field);
  - the population (SHA-256, row count, first and last key, amount total);
  - the selection, drawn again from the recorded seed and algorithm, item by item;
  - the sample size, every rate, upper limit, risk of overreliance, decision and extension;
  - the results against the selection: every result is for an item of the worklist (the
    sample items, and a spare for each voided item, in draw order), and none is missing;
  - the conclusion against the recomputed figures and recorded causes;
  - with --memo, the memo: that its XML parses (strict XML 1.0; a memo that does not parse
    is a difference), which recorded state of the workpaper it shows (by its SHA-256), and its
    text against the memo rendered afresh from that state, section by section and table cell
    by table cell (every difference named with its section, row and both texts).

Options:
  --population PATH  the population file, when it has moved (default: the path recorded in the
                     workpaper, relative to the workpaper file's folder)
  --memo PATH        also check this DOCX memo (its XML and its text)
  --template DIR     the memo template folder it was written with (default: the one recorded
                     with the memo, else the shipped one)
  --json             print the report as JSON
  -h, --help         this text

Exit codes: 0 everything agrees; 1 a difference was found (each is named); 2 unusable input.

Example:
  tolrate reperform demo-output/ap-approval.tolrate.json --memo demo-output/ap-approval.memo.docx

A re-performance checks the arithmetic and the record; it does not re-test the items.
`;

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('reperform', args, { population: { type: 'string' }, memo: { type: 'string' }, template: { type: 'string' }, json: { type: 'boolean' } }, 1);
  if (p.values.help) {
    ctx.stdout.write(HELP);
    return 0;
  }
  const file = p.positionals[0];
  if (!file) throw new UsageError('tolrate reperform: name the workpaper file, e.g. tolrate reperform test.tolrate.json', ['See: tolrate reperform --help']);
  const { resolve } = await import('node:path');
  const { loadWorkpaper } = await import('../../workpaper/index.js');
  const { reperform, formatReport } = await import('../../reperform/index.js');
  const workpaperPath = resolve(ctx.cwd, file);
  const workpaper = loadWorkpaper(workpaperPath);
  const population = str(p, 'population');
  const memo = str(p, 'memo');
  const template = str(p, 'template');
  if (template !== undefined && !memo) throw new UsageError('tolrate reperform: --template goes with --memo.', ['See: tolrate reperform --help']);
  const report = await reperform({
    workpaper,
    workpaperPath,
    ...(population ? { populationPath: resolve(ctx.cwd, population) } : {}),
    ...(memo ? { memoPath: resolve(ctx.cwd, memo), memoLabel: memo } : {}),
    ...(template ? { templateDir: resolve(ctx.cwd, template) } : {}),
    ...(ctx.isTTY ? { progress: process.stderr } : {}),
  });
  if (p.values.json) ctx.stdout.write(`${JSON.stringify(report, null, 2)}\n`);
  else ctx.stdout.write(visible(formatReport({ ...report, workpaperPath: file }), { keepLines: true }));
  return report.ok ? 0 : 1;
}
