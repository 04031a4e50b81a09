import { parseFlags, str } from '../args.js';
import { UsageError } from '../../errors.js';
import type { CommandContext } from '../types.js';
import { pctLimit, pctPlain } from '../../util/format.js';
import type { FolderEntry, TestEntry } from '../../engagement/status.js';

const SPEC = { json: { type: 'boolean' as const }, reperform: { type: 'boolean' as const }, 'as-of': { type: 'string' as const } };

export function help(): string {
  return `tolrate status — where every test of an engagement folder stands

Usage: tolrate status [DIR] [--as-of YYYY-MM-DD] [--reperform] [--json]

Lists every workpaper (*.tolrate.json) of DIR (default: this folder): its reference, control,
attributes, approach and sample size, deviations and the decision by attribute, the step
reached, prepared / in review / reviewed, open review notes, and the follow-up actions overdue
or due within 30 days. A file that cannot be read is listed with its problem; the others are
still shown. A file changed outside tolrate is marked as such.

  DIR              the engagement folder (default: the current folder)
  --as-of DATE     the date follow-up actions are due against (default: today)
  --reperform      also re-perform every readable test (population, selection, figures)
  --json           print the same as JSON
  -h, --help       show this help

The engagement folder file (tolrate-engagement.json, written by the start screen) holds what
every test of the folder shares: entity, period, engagement reference, the team and the firm's
defaults (confidence, sampling policy file, memo template folder, control library).

Exit codes: 0 every test is complete (its memo can be final); 1 a test is unfinished, a file
cannot be read or (with --reperform) a re-performance differs; 2 bad input.

Example:
  tolrate status engagement-2025 --as-of 2026-02-15
`;
}

function today(): string {
  return new Date().toISOString().slice(0, 10);
}

function testLines(e: TestEntry): string[] {
  const L: string[] = [];
  L.push(`${e.reference ?? '(no reference)'}  ${e.control ?? '(no control yet)'}  ${e.file}`);
  const rf = e.rollForward;
  const ap = e.approach
    ? `${e.approach}, ${e.sampleSize} items${rf ? ` to the interim date ${rf.interimDate} + ${rf.sampleSize !== undefined ? `${rf.sampleSize} roll-forward items` : 'roll-forward not sized yet'}` : ''}`
    : 'approach not planned';
  L.push(`  ${ap}; step reached: ${e.stepReached}; ${e.review.label}`);
  for (const a of e.attributes) {
    const fig = a.upperLimit !== undefined && a.tolerableRate !== undefined ? `, upper limit ${pctLimit(a.upperLimit, a.tolerableRate)} against ${pctPlain(a.tolerableRate)} tolerable` : '';
    L.push(`  ${a.id}  ${a.deviations} deviation(s) in ${a.sampleSize} tested${fig}; ${a.decision}`);
  }
  if (e.openNotes > 0) L.push(`  open review notes: ${e.openNotes}`);
  for (const f of e.followUps.filter((x) => x.timing === 'overdue' || x.timing === 'due')) {
    L.push(`  follow-up ${f.timing.toUpperCase()} ${f.due}: ${f.description}${f.owner ? ` (owner: ${f.owner})` : ''}`);
  }
  if (e.tampered > 0) L.push(`  CHANGED OUTSIDE TOLRATE: ${e.tampered} difference(s) from its change log (tolrate reperform ${e.file} names them)`);
  if (e.reperform && e.reperform.length > 0) L.push(`  RE-PERFORMANCE DIFFERS: ${e.reperform.slice(0, 3).join('; ')}${e.reperform.length > 3 ? ` (and ${e.reperform.length - 3} more)` : ''}`);
  else if (e.reperform) L.push('  re-performance agrees');
  if (!e.complete) L.push(`  not complete: ${e.notFinal.slice(0, 3).join('; ')}${e.notFinal.length > 3 ? '; ...' : ''}`);
  return L;
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('status', args, SPEC, 1);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const { resolve } = await import('node:path');
  const { existsSync, statSync } = await import('node:fs');
  const dir = resolve(ctx.cwd, p.positionals[0] ?? '.');
  if (!existsSync(dir) || !statSync(dir).isDirectory()) throw new UsageError(`tolrate status: ${dir} is not a folder.`, ['See: tolrate status --help']);
  const asOf = str(p, 'as-of') ?? today();
  if (!/^\d{4}-\d{2}-\d{2}$/.test(asOf) || Number.isNaN(Date.parse(`${asOf}T00:00:00Z`))) throw new UsageError(`tolrate status: --as-of must be a date written YYYY-MM-DD, not "${asOf}".`);
  const { folderStatus } = await import('../../engagement/status.js');
  const { loadFolder, FOLDER_FILE } = await import('../../engagement/folder.js');
  const folder = loadFolder(dir);
  const entries: FolderEntry[] = folderStatus(dir, asOf);
  if (p.values.reperform) {
    const { reperform } = await import('../../reperform/index.js');
    for (const e of entries) {
      if (!e.readable) continue;
      try {
        const r = await reperform({ workpaper: e.workpaper, workpaperPath: e.path });
        e.reperform = r.checks.flatMap((c) => c.differences.map((d) => `${c.area}: ${d}`));
      } catch (err) {
        e.reperform = [`cannot be re-performed: ${(err as Error).message}`];
      }
    }
  }
  const tests = entries.filter((e): e is TestEntry => e.readable);
  const unreadable = entries.filter((e) => !e.readable);
  const complete = tests.filter((e) => e.complete).length;
  const differs = tests.filter((e) => e.reperform && e.reperform.length > 0).length;
  const ok = unreadable.length === 0 && complete === tests.length && differs === 0;
  if (p.values.json) {
    const out = {
      folder: dir,
      asOf,
      ...(folder ? { engagement: folder } : {}),
      counts: { workpapers: entries.length, complete, unfinished: tests.length - complete, unreadable: unreadable.length, ...(p.values.reperform ? { reperformDiffers: differs } : {}) },
      workpapers: entries.map((e) => (e.readable ? (({ workpaper: _w, ...rest }) => rest)(e) : e)),
    };
    ctx.stdout.write(`${JSON.stringify(out, null, 2)}\n`);
    return ok ? 0 : 1;
  }
  const L: string[] = [];
  if (folder) L.push(`${folder.entity}, period ${folder.periodStart} to ${folder.periodEnd}, engagement ${folder.reference}`);
  else L.push(`${dir} (no ${FOLDER_FILE} here)`);
  L.push(`As of ${asOf}: ${entries.length} workpaper(s), ${complete} complete, ${tests.length - complete} unfinished, ${unreadable.length} cannot be read${p.values.reperform ? `, ${differs} differ on re-performance` : ''}.`, '');
  for (const e of entries) {
    if (e.readable) L.push(...testLines(e), '');
    else L.push(`${e.file}`, `  CANNOT BE READ: ${e.problem}`, '');
  }
  if (entries.length === 0) L.push('No workpaper files (*.tolrate.json) in this folder.');
  ctx.stdout.write(`${L.join('\n')}\n`);
  return ok ? 0 : 1;
}
