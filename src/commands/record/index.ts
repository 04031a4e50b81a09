import { parseFlags, str } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import type { Asker } from '../../interview/asker.js';
import { needsTerminal, terminalAsker, type InterviewOptions } from '../../interview/command.js';
import { recordInterview } from '../../interview/stages.js';

export function help(): string {
  return `tolrate record — record each item's result and the cause of every deviation

Usage: tolrate record FILE [--part interim|roll-forward]

  FILE               the workpaper file, planned and selected with \`tolrate plan\`
  --part PART        a test done at an interim date (see \`tolrate rollforward --help\`):
                     the part to record, interim or roll-forward. Without it, the interim
                     part is recorded until it is complete, then the roll-forward part (once
                     planned); when both are complete you choose which to change.
  -h, --help         show this help

Per item and attribute: conforms, deviation (what was found, the cause, whether it looks
intentional, isolated or systemic) or void (a properly cancelled document, replaced by the
next spare). A document that cannot be found is a deviation, not a void.

The results can be typed item by item (saved after each item; run the command again to go on
at the first unrecorded item) or read from the filled fieldwork sheet written at selection, as
CSV or XLSX (the workbook's "Fieldwork" sheet). Testing split between people: give each
tester's sheet, separated by ";" (a.csv; b.xlsx); they are merged, and an item filled
differently on two sheets is refused with both values and both files named.
Column conventions of the sheet, per attribute (A1, A2, ...):
  A1 result          C = conforms, D = deviation, V = void
  A1 found           what was found (for a D)
  A1 cause           not-performed, performed-late, wrong-performer, evidence-missing,
                     system, other (for a D)
  A1 intent          no, suspected or yes (for a D)
  A1 pattern         isolated, systemic or unclear (for a D)
  Void reason        why the document is void (for a V)
  Tested by          who tested the item        } for every tested item, conforming
  Date tested        YYYY-MM-DD                 } or not (a sheet written before
  Evidence           references, separated by ; } these columns were added has not)
  Note               the tester's note (optional)
A piece of evidence that names a file in the workpaper's folder is fingerprinted (SHA-256)
when it is recorded; \`tolrate reperform\` reads it again.
Typed, each item asks the same: tester (default: the preparer), date tested (default: today),
the evidence inspected and a note.
Every cell that cannot be read is listed (sheet, row, column, value, why); nothing is guessed.

While it runs the workpaper is locked (NAME.tolrate.json.lock beside it): a second session
on the same file is told who has it and may look at it read-only. A save that fails (disk
full, read-only) keeps the answer and asks: try again, save a copy elsewhere, or stop.

Examples:
  tolrate record supplier-invoices.tolrate.json
  tolrate record supplier-invoices.tolrate.json --part roll-forward
`;
}

const SPEC = { part: { type: 'string' as const } };

function partFlag(p: ReturnType<typeof parseFlags>): 'interim' | 'roll-forward' | undefined {
  const v = str(p, 'part');
  if (v === undefined) return undefined;
  const t = v.trim().toLowerCase();
  if (t === 'interim') return 'interim';
  if (t === 'roll-forward' || t === 'rollforward') return 'roll-forward';
  throw new UsageError(`tolrate record --part: "${v}" is not a part; give interim or roll-forward.`, ['Example: tolrate record FILE --part roll-forward']);
}

export async function runWith(args: string[], ctx: CommandContext, asker: Asker, o: InterviewOptions = {}): Promise<number> {
  const p = parseFlags('record', args, SPEC, 1);
  const file = p.positionals[0];
  if (!file) throw new UsageError('tolrate record: name the workpaper file.', ['Usage: tolrate record FILE [--part interim|roll-forward]']);
  const part = partFlag(p);
  return recordInterview(ctx, asker, { file, ...(part ? { part } : {}), ...o });
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('record', args, SPEC, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  if (!p.positionals[0]) throw new UsageError('tolrate record: name the workpaper file.', ['Usage: tolrate record FILE [--part interim|roll-forward]']);
  partFlag(p);
  if (!ctx.isTTY) return needsTerminal(ctx, 'record');
  return runWith(args, ctx, terminalAsker(ctx));
}
