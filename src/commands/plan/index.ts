import { parseFlags, str } from '../args.js';
import type { CommandContext } from '../types.js';
import type { Asker } from '../../interview/asker.js';
import { needsTerminal, terminalAsker, type InterviewOptions } from '../../interview/command.js';
import { planInterview } from '../../interview/stages.js';

export function help(): string {
  return `tolrate plan — plan a test of a control: engagement, control, attributes, population,
approach and sample size, selection of the items and the fieldwork sheet

Usage: tolrate plan [FILE] [--policy POLICY.json]

  FILE               the workpaper file (NAME.tolrate.json; ".tolrate.json" is added to a
                     bare name). A new file is started; an existing one is continued at the
                     first unanswered step, or you may change an answered step.
  --policy FILE      the firm's non-statistical sampling policy (a copy of
                     templates/sampling-policy.json); default: the one shipped with tolrate
  -h, --help         show this help

The interview saves after every answered step: stop at any question (Ctrl-C) and run
\`tolrate plan FILE\` again to go on. It needs a terminal; \`tolrate demo\` runs a whole test
with scripted answers.

While it runs the workpaper is locked (NAME.tolrate.json.lock beside it): a second session
on the same file is told who has it and may look at it read-only. A save that fails (disk
full, read-only) keeps the answer and asks: try again, save a copy elsewhere, or stop.

Example:
  tolrate plan supplier-invoices
`;
}

/** The plan interview with a given answerer (the terminal one, or a script in tests). */
export async function runWith(args: string[], ctx: CommandContext, asker: Asker, o: InterviewOptions = {}): Promise<number> {
  const p = parseFlags('plan', args, { policy: { type: 'string' } }, 1);
  return planInterview(ctx, asker, { file: p.positionals[0], policy: str(p, 'policy'), ...o });
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('plan', args, { policy: { type: 'string' } }, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  if (!ctx.isTTY) return needsTerminal(ctx, 'plan');
  return runWith(args, ctx, terminalAsker(ctx));
}
