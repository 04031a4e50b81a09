import { parseFlags, str } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import type { Asker } from '../../interview/asker.js';
import { needsTerminal, terminalAsker, type InterviewOptions } from '../../interview/command.js';
import { planInterview } from '../../interview/stages.js';

const SPEC = { policy: { type: 'string' as const }, from: { type: 'string' as const } };

export function help(): string {
  return `tolrate plan — plan a test of a control: engagement, control, attributes, population,
approach and sample size, selection of the items and the fieldwork sheet

Usage: tolrate plan [FILE] [--policy POLICY.json] [--from LAST.tolrate.json]

  FILE               the workpaper file (NAME.tolrate.json; ".tolrate.json" is added to a
                     bare name). A new file is started; an existing one is continued at the
                     first unanswered step, or you may change an answered step.
  --policy FILE      the firm's non-statistical sampling policy (a copy of
                     templates/sampling-policy.json); default: the one shipped with tolrate
  --from FILE        start a new FILE from last year's workpaper of the same control: its
                     control, attributes with their deviation definitions, approach and rates
                     are offered as the answers to confirm; population, selection, results and
                     conclusion are not copied. Last year's sample rates and deficiencies are
                     shown when the expected rate is asked, its follow-up actions at the start;
                     the new file records last year's path and state hash.
  -h, --help         show this help

A folder with an engagement file (tolrate-engagement.json, see \`tolrate status --help\`)
answers the entity and period and offers the team as preparer and reviewer.

The interview saves after every answered step: stop at any question (Ctrl-C) and run
\`tolrate plan FILE\` again to go on. It needs a terminal; \`tolrate demo\` runs a whole test
with scripted answers.

While it runs the workpaper is locked (NAME.tolrate.json.lock beside it): a second session
on the same file is told who has it and may look at it read-only. A save that fails (disk
full, read-only) keeps the answer and asks: try again, save a copy elsewhere, or stop.

Examples:
  tolrate plan supplier-invoices
  tolrate plan supplier-invoices-2026 --from ../2025/supplier-invoices.tolrate.json
`;
}

/** The plan interview with a given answerer (the terminal one, or a script in tests). */
export async function runWith(args: string[], ctx: CommandContext, asker: Asker, o: InterviewOptions = {}): Promise<number> {
  const p = parseFlags('plan', args, SPEC, 1);
  const from = str(p, 'from');
  if (from !== undefined && p.positionals[0] === undefined) throw new UsageError('tolrate plan --from needs the new FILE as well.', ['Example: tolrate plan supplier-invoices-2026 --from supplier-invoices-2025.tolrate.json']);
  return planInterview(ctx, asker, { file: p.positionals[0], policy: str(p, 'policy'), ...(from !== undefined ? { from } : {}), ...o });
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('plan', args, SPEC, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  if (!ctx.isTTY) return needsTerminal(ctx, 'plan');
  return runWith(args, ctx, terminalAsker(ctx));
}
