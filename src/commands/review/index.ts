import { parseFlags } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import type { Asker } from '../../interview/asker.js';
import { needsTerminal, terminalAsker, type InterviewOptions } from '../../interview/command.js';
import { reviewInterview } from '../../interview/stages.js';

export function help(): string {
  return `tolrate review — review a test: re-perform it, raise notes, clear answers, sign off

Usage: tolrate review FILE

  FILE               a workpaper file signed off by its preparer
  -h, --help         show this help

Asks who is reviewing (a reviewer who is the preparer is warned, and the warning recorded),
re-performs the test and shows the report, then walks the test section by section (engagement
and control, attributes, population and completeness, approach and size, selection, results,
evaluation, conclusion and follow-ups, severity), showing what was recorded. On each section,
or on one item, the reviewer can raise review notes: the text, and whether it must be cleared
before sign-off. The preparer answers open notes at the start of their next sitting
(tolrate FILE, plan, record or conclude), by an answer or by changing the record; the reviewer
then clears each answered note or re-opens it with a further comment. Every note keeps its
thread (raised, answered, re-opened, cleared: who and when).

The reviewer's sign-off is refused, with the reasons, while the preparer has not signed, a note
that must be cleared is open, or re-performance finds a difference. Its date may not be before
the preparer's sign-off or after today. A change to the record after a sign-off asks why, is
recorded as an amendment (who, role, when, why, every old -> new value) and clears both
sign-offs; answering a note clears neither.

While it runs the workpaper is locked (NAME.tolrate.json.lock beside it): a second session
on the same file is told who has it and may look at it read-only. A save that fails (disk
full, read-only) keeps the answer and asks: try again, save a copy elsewhere, or stop.

Example:
  tolrate review supplier-invoices.tolrate.json

The tool computes; the review, like the conclusion, is the practitioner's judgement under the
applicable standards and the firm's methodology.
`;
}

export async function runWith(args: string[], ctx: CommandContext, asker: Asker, o: InterviewOptions = {}): Promise<number> {
  const p = parseFlags('review', args, {}, 1);
  const file = p.positionals[0];
  if (!file) throw new UsageError('tolrate review: name the workpaper file.', ['Usage: tolrate review FILE']);
  return reviewInterview(ctx, asker, { file, ...o });
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('review', args, {}, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  if (!p.positionals[0]) throw new UsageError('tolrate review: name the workpaper file.', ['Usage: tolrate review FILE']);
  if (!ctx.isTTY) return needsTerminal(ctx, 'review');
  return runWith(args, ctx, terminalAsker(ctx));
}
