import { parseFlags } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import type { Asker } from '../../interview/asker.js';
import { needsTerminal, terminalAsker, type InterviewOptions } from '../../interview/command.js';
import { rollForwardInterview } from '../../interview/stages.js';

const SPEC = {};

export function help(): string {
  return `tolrate rollforward — a test done at an interim date, rolled forward to the period end

Usage: tolrate rollforward FILE

  FILE               the workpaper file of the test (NAME.tolrate.json)
  -h, --help         show this help

The test's population, selection and results as planned so far are the interim part: from
the period start to the interim date. This adds the roll-forward part, from the day after the
interim date to the period end, with its own population, sample and results. It asks:

  1. the interim date: the last day of the interim part, inside the period (refused outside
     it, on its last day, or before the last month the interim population holds items in);
     offered: the end of the interim population's periods, else the end of the last month the
     interim population holds items in, else the month before the interim selection, else the
     end of the period's ninth month;
  2. the roll-forward population: the same questions as the plan's (a file, number ranges,
     or, the default for a monthly, quarterly, weekly or daily control, its occurrences in
     the roll-forward dates), with its own fingerprint, tie-out and validation;
  3. the roll-forward sample size, as the test's approach: statistical, the test's
     confidence, tolerable and expected rates and model on the roll-forward population;
     non-statistical, the policy's size for the period as recorded at the approach step,
     pro rata to the months remaining,
     rounded up (for example 40 items a year, 3 of 12 months left: 10). A larger size may
     be used with a reason;
  4. the selection: seeded random, systematic or haphazard, with its own seed and spares,
     and its own fieldwork sheet (NAME.rollforward.fieldwork.csv).

Then record the roll-forward results with \`tolrate record FILE --part roll-forward\` and
conclude with \`tolrate conclude FILE\`: each part is evaluated on its own, and the whole
period with the exact upper deviation limit over both parts (the worst split of the
deviations between them), the conservative bound beside it. The tool computes; whether the
results support reliance for the period is the practitioner's judgement.

Adding a roll-forward to a concluded test clears the conclusion (its answers are offered
when concluding again) and the sign-offs. Run the command again to go on where it stopped or
to change an answer. The interview saves after every step.

Example:
  tolrate rollforward supplier-invoices.tolrate.json
`;
}

export async function runWith(args: string[], ctx: CommandContext, asker: Asker, o: InterviewOptions = {}): Promise<number> {
  const p = parseFlags('rollforward', args, SPEC, 1);
  const file = p.positionals[0];
  if (!file) throw new UsageError('tolrate rollforward: name the workpaper file.', ['Usage: tolrate rollforward FILE']);
  return rollForwardInterview(ctx, asker, { file, ...o });
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('rollforward', args, SPEC, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  if (!p.positionals[0]) throw new UsageError('tolrate rollforward: name the workpaper file.', ['Usage: tolrate rollforward FILE']);
  if (!ctx.isTTY) return needsTerminal(ctx, 'rollforward');
  return runWith(args, ctx, terminalAsker(ctx));
}
