import { parseFlags, str } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';

const SPEC = { out: { type: 'string' as const }, 'as-of': { type: 'string' as const } };

export function help(): string {
  return `tolrate summary — write the engagement summary the partner reads (DOCX and XLSX)

Usage: tolrate summary [DIR] [--out NAME] [--as-of YYYY-MM-DD]

From every workpaper (*.tolrate.json) of DIR (default: this folder) it writes NAME.docx and
NAME.xlsx with: the workpapers it was written from and their state hashes, each control tested,
its result per attribute (tested, deviations, sample rate, upper limit, tolerable rate, the
practitioner's decision) with one chart of every upper limit against its tolerable rate, every
deviation with its cause, the deficiencies with the practitioner's classification and reasons,
and every follow-up action with owner and due date. A test not yet concluded is listed as in
progress and never counted as concluded; a file that cannot be read is listed with its problem.
The XLSX has one sheet per table, typed cells and frozen header rows.

  DIR            the engagement folder (default: the current folder)
  --out NAME     the files to write, without extension (default: DIR/engagement-summary)
  --as-of DATE   the date follow-up actions are due against (default: today)
  -h, --help     show this help

Example:
  tolrate summary engagement-2025 --out engagement-2025/summary-2026-02-15
`;
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('summary', args, SPEC, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const { join, relative, resolve } = await import('node:path');
  const { existsSync, statSync } = await import('node:fs');
  const dir = resolve(ctx.cwd, p.positionals[0] ?? '.');
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new UsageError(`tolrate summary: ${dir} is not a folder.`, ['See: tolrate summary --help']);
  const asOf = str(p, 'as-of') ?? new Date().toISOString().slice(0, 10);
  if (!/^\d{4}-\d{2}-\d{2}$/.test(asOf) || Number.isNaN(Date.parse(`${asOf}T00:00:00Z`))) throw new UsageError(`tolrate summary: --as-of must be a date written YYYY-MM-DD, not "${asOf}".`);
  const out = str(p, 'out');
  const { SUMMARY_NAME, writeSummary } = await import('../../engagement/write-summary.js');
  const base = out !== undefined ? resolve(ctx.cwd, out.replace(/\.(docx|xlsx)$/i, '')) : join(dir, SUMMARY_NAME);
  const got = await writeSummary(dir, { base, asOf, now: new Date() });
  const shown = (x: string) => {
    const r = relative(ctx.cwd, x);
    return r && !r.startsWith('..') ? r : x;
  };
  const c = got.model.counts;
  ctx.stdout.write(
    `Summary of ${c.workpapers} workpaper(s): ${c.concluded} concluded, ${c.inProgress} in progress${c.unreadable ? `, ${c.unreadable} cannot be read` : ''}; ` +
      `${got.model.deviations.length} deviation(s), ${got.model.deficiencies.length} deficiency(ies), ${got.model.followUps.length} follow-up action(s).\n` +
      `  ${shown(got.docx)}\n  ${shown(got.xlsx)}\n`,
  );
  return 0;
}
