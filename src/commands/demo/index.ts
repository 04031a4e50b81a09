import { rmSync } from 'node:fs';
import { parseFlags, str } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import { fileLines, loadScenario, narrative, runDemoInterview, SCENARIOS, type Scenario } from '../../interview/demo.js';
import { nearest } from '../args.js';

const SPEC = { out: { type: 'string' as const }, scenario: { type: 'string' as const }, verbose: { type: 'boolean' as const }, engagement: { type: 'boolean' as const } };

/** The date the engagement demo's status and summary are written as of (invented, after its tests). */
export const ENGAGEMENT_DEMO_AS_OF = '2026-02-15';

export function help(): string {
  return `tolrate demo — run a whole test of a control on an invented scenario, with scripted answers

Usage: tolrate demo [--out DIR] [--scenario main|small] [--verbose]
       tolrate demo --engagement [--out DIR]

  --out DIR          where to write the workpaper, the fieldwork sheet and the memo
                     (default: ./demo-output); files of an earlier demo there are replaced
  --scenario NAME    main (default): 3,412 supplier invoices, results read from a filled
                     fieldwork sheet with a void and three deviations;
                     small: 318 manual journals, where the exact hypergeometric sample size is
                     visibly smaller than the binomial one
  --verbose          show the whole interview: every question, the scripted answer, and what
                     the interview showed
  --engagement       build an engagement folder instead (default --out ./demo-engagement): its
                     folder file (entity, period, team), both scenarios planned in it, a third
                     test carried forward from an invented prior year's workpaper (planned as a
                     two-stage plan, not yet tested), and a fourth done in two parts: tested to
                     an interim date, rolled forward to the period end (\`tolrate rollforward\`)
                     and concluded over the whole period; with the memo of every concluded
                     test; then print \`tolrate status\` and write \`tolrate summary\`
                     as of ${ENGAGEMENT_DEMO_AS_OF}
  -h, --help         show this help

The demo runs the same interview as \`tolrate plan\`, \`record\` and \`conclude\`, answered from
samples/demo-answers.json (or samples/small/demo-answers.json). It asks nothing and needs no
terminal. Everything in the scenario is invented.

Example:
  tolrate demo --out demo-output
`;
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('demo', args, SPEC);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  if (p.values.engagement) {
    if (str(p, 'scenario') !== undefined || p.values.verbose) throw new UsageError('tolrate demo --engagement runs both scenarios; it takes only --out.');
    return engagementDemo(ctx, str(p, 'out') ?? 'demo-engagement');
  }
  const sc = str(p, 'scenario') ?? 'main';
  if (!(SCENARIOS as readonly string[]).includes(sc)) {
    const guess = nearest(sc, SCENARIOS);
    throw new UsageError(`tolrate demo: there is no scenario "${sc}".${guess ? ` Did you mean "${guess}"?` : ''} Scenarios: ${SCENARIOS.join(', ')}.`);
  }
  const scenario = sc as Scenario;
  const out = str(p, 'out') ?? 'demo-output';
  const title = loadScenario(scenario).title;
  const got = await runDemoInterview(ctx, { out, scenario, verbose: p.values.verbose === true });
  const { defaultMemoPath, recordMemo, writeMemo } = await import('../../memo/index.js');
  rmSync(defaultMemoPath(got.workpaperPath), { force: true });
  const at = got.now();
  const memo = await writeMemo({ workpaper: got.workpaper, workpaperPath: got.workpaperPath, now: at });
  recordMemo(got.workpaper, got.workpaperPath, memo, { at, final: !memo.draft });
  got.files.push({ what: 'memo', path: memo.path });
  if (p.values.verbose) ctx.stdout.write('\n');
  ctx.stdout.write(`${narrative(got.workpaper, `tolrate demo: ${title}`).join('\n')}\n`);
  ctx.stdout.write(`${fileLines(ctx.cwd, got.files).join('\n')}\n`);
  return 0;
}

async function engagementDemo(ctx: CommandContext, out: string): Promise<number> {
  const { runEngagementDemo } = await import('../../interview/demo-engagement.js');
  const { defaultMemoPath, recordMemo, writeMemo } = await import('../../memo/index.js');
  const got = await runEngagementDemo(ctx, { out });
  // The memos of the concluded tests (the two scenarios, as the single-scenario demo writes them,
  // and the test done in two parts).
  for (const t of got.tests.filter((x) => x.workpaper.conclusion)) {
    rmSync(defaultMemoPath(t.workpaperPath), { force: true });
    const at = got.now();
    const memo = await writeMemo({ workpaper: t.workpaper, workpaperPath: t.workpaperPath, now: at });
    recordMemo(t.workpaper, t.workpaperPath, memo, { at, final: !memo.draft });
    got.files.push({ what: 'memo', path: memo.path });
  }
  const { relative } = await import('node:path');
  const rel = relative(ctx.cwd, got.dir);
  const shown = rel === '' ? '.' : rel.startsWith('..') ? got.dir : rel;
  ctx.stdout.write(`tolrate demo --engagement: ${got.folder.entity} (invented), engagement ${got.folder.reference}\n\n`);
  ctx.stdout.write(`$ tolrate status ${shown} --as-of ${ENGAGEMENT_DEMO_AS_OF}\n`);
  const status = await import('../status/index.js');
  await status.run([got.dir, '--as-of', ENGAGEMENT_DEMO_AS_OF], ctx);
  ctx.stdout.write(`$ tolrate summary ${shown} --as-of ${ENGAGEMENT_DEMO_AS_OF}\n`);
  const summary = await import('../summary/index.js');
  await summary.run([got.dir, '--as-of', ENGAGEMENT_DEMO_AS_OF], ctx);
  ctx.stdout.write(`${fileLines(ctx.cwd, got.files).join('\n')}\n`);
  return 0;
}
