import { parseFlags } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import type { Asker } from '../../interview/asker.js';
import { needsTerminal, terminalAsker, type InterviewOptions } from '../../interview/command.js';
import { concludeInterview } from '../../interview/stages.js';

export function help(): string {
  return `tolrate conclude — evaluate the results, review the causes, conclude, list the follow-up
actions and sign off

Usage: tolrate conclude FILE

  FILE               the workpaper file, with every item's result recorded
  -h, --help         show this help

Shows per attribute the items tested, the deviations, the sample deviation rate, the upper
deviation limit (rounded up), the tolerable rate and the risk of overreliance, then the
qualitative review (an intentional deviation escalates whatever the rates say). You confirm
the conclusion, keep, edit or remove the proposed follow-up actions (with owners and due
dates), answer the severity questions and choose the classification when reliance is not
supported, and sign off.

The tool computes; the conclusion and the severity of a deficiency are the practitioner's
judgement under the applicable standards (e.g. AU-C 530, ISA 530, AS 2315) and the firm's
methodology.

While it runs the workpaper is locked (NAME.tolrate.json.lock beside it): a second session
on the same file is told who has it and may look at it read-only. A save that fails (disk
full, read-only) keeps the answer and asks: try again, save a copy elsewhere, or stop.

Example:
  tolrate conclude supplier-invoices.tolrate.json
`;
}

export async function runWith(args: string[], ctx: CommandContext, asker: Asker, o: InterviewOptions = {}): Promise<number> {
  const p = parseFlags('conclude', args, {}, 1);
  const file = p.positionals[0];
  if (!file) throw new UsageError('tolrate conclude: name the workpaper file.', ['Usage: tolrate conclude FILE']);
  return concludeInterview(ctx, asker, { file, ...o });
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('conclude', args, {}, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  if (!p.positionals[0]) throw new UsageError('tolrate conclude: name the workpaper file.', ['Usage: tolrate conclude FILE']);
  if (!ctx.isTTY) return needsTerminal(ctx, 'conclude');
  return runWith(args, ctx, terminalAsker(ctx));
}
