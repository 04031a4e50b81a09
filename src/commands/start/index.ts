import { readdirSync } from 'node:fs';
import { join } from 'node:path';
import { firstOpen, reviewStatus, STEP_LABELS } from '../../control-test/index.js';
import { loadWorkpaper } from '../../workpaper/file.js';
import { parseFlags, str } from '../args.js';
import type { CommandContext, CommandRun } from '../types.js';
import type { Asker } from '../../interview/asker.js';
import { needsTerminal, terminalAsker, workpaperPath } from '../../interview/command.js';
import { wholeInterview, type StageOptions } from '../../interview/stages.js';
import { count, existingFile, optionalCount, optionalRate, rate } from '../../interview/parse.js';
import { WORKPAPER_SUFFIX } from '../../workpaper/file.js';
import { pctPlain } from '../../util/format.js';
import { FOLDER_FILE, loadFolder, saveFolder, type EngagementFolder } from '../../engagement/folder.js';
import { shippedLibraryDir } from '../../engagement/library.js';
import { askFolder } from '../../interview/folder-defaults.js';

export function help(): string {
  return `tolrate — on a terminal, with no command: start a new test, continue a workpaper file in
this folder, or use a calculator. Each stage also runs on its own:
  tolrate plan [FILE]    tolrate record FILE    tolrate conclude FILE

Usage: tolrate [FILE.tolrate.json] [--policy POLICY.json]

With no FILE it shows the folder's engagement (tolrate-engagement.json) and every workpaper
here with where it stands, and offers: start a new test, start this year's test from last
year's workpaper, continue a workpaper, set up (or change) the folder's engagement file, or a
calculator.

  FILE             continue this workpaper at its first unanswered step (plan, record or
                   conclude, whichever is next)
  --policy FILE    the firm's non-statistical sampling policy for a new test

Example:
  tolrate supplier-invoice-approval.tolrate.json

See: tolrate --help
`;
}

/** Loaded only when chosen, like every command. */
const CALCULATORS: Record<'size' | 'limit' | 'table', () => Promise<{ run: CommandRun }>> = {
  size: () => import('../size/index.js'),
  limit: () => import('../limit/index.js'),
  table: () => import('../table/index.js'),
};

/** Flags for a calculator, asked one by one (same checks as the calculator's own flags). */
async function calculator(ctx: CommandContext, a: Asker): Promise<number> {
  const which = await a.select({
    id: 'start.calculator',
    message: 'Which calculator?',
    choices: [
      { value: 'size', name: 'Sample size (confidence, tolerable and expected rates)' },
      { value: 'limit', name: 'Evaluate a sample (upper deviation limit, risk of overreliance)' },
      { value: 'table', name: 'Planning table of sample sizes' },
    ],
  });
  const args: string[] = [];
  const pct = (v: number) => pctPlain(v).replace('%', '');
  const confidence = await a.text({ id: `start.${which}.confidence`, message: 'Confidence (%)', default: '95', parse: rate('Confidence') });
  args.push('--confidence', pct(confidence));
  if (which === 'size') {
    const t = await a.text({ id: 'start.size.tolerable', message: 'Tolerable deviation rate (%)', parse: rate('Tolerable rate') });
    const e = await a.text({ id: 'start.size.expected', message: 'Expected deviation rate (%)', default: '0', parse: rate('Expected rate', { allowZero: true, below: t, belowWhat: 'the tolerable rate' }) });
    args.push('--tolerable', pct(t), '--expected', pct(e));
  }
  if (which === 'limit') {
    const n = await a.text({ id: 'start.limit.sample', message: 'Items tested', parse: count('Items tested', { min: 1 }) });
    const k = await a.text({ id: 'start.limit.deviations', message: 'Deviations found', parse: count('Deviations', { max: n, maxWhat: 'the items tested' }) });
    const t = await a.text({ id: 'start.limit.tolerable', message: 'Tolerable deviation rate (%), blank = none', default: '', parse: optionalRate('Tolerable rate') });
    args.push('--sample', String(n), '--deviations', String(k));
    if (t !== undefined) args.push('--tolerable', pct(t));
  }
  const N = await a.text({ id: `start.${which}.population`, message: 'Population size (blank = large or unknown)', default: '', parse: optionalCount('Population size', { min: 1 }) });
  if (N !== undefined) args.push('--population', String(N));
  const mod: { run: CommandRun } = await CALCULATORS[which]();
  ctx.stdout.write(`\n$ tolrate ${which} ${args.join(' ')}\n`);
  return mod.run(args, ctx);
}

/** "C-310.tolrate.json — AP-03, next: Results" or "... reviewed by ..."; a file that cannot be read says why. */
function describeFile(path: string, name: string): string {
  try {
    const wp = loadWorkpaper(path);
    const open = firstOpen(wp);
    const where = open ? `next: ${STEP_LABELS[open]}` : reviewStatus(wp).label;
    return `${name} — ${wp.control?.id ?? 'no control yet'}, ${where}`;
  } catch (e) {
    return `${name} — cannot be read: ${e instanceof Error ? e.message.split('\n')[0]!.slice(0, 80) : String(e)}`;
  }
}

/** The engagement of this folder and where every workpaper stands, shown above the menu. */
function engagementLines(ctx: CommandContext, files: readonly string[]): { file: EngagementFolder | undefined } {
  let file: EngagementFolder | undefined;
  try {
    file = loadFolder(ctx.cwd);
    ctx.stdout.write(file ? `Engagement ${file.reference}: ${file.entity}, ${file.periodStart} to ${file.periodEnd} (${FOLDER_FILE})\n` : `This folder has no engagement file (${FOLDER_FILE}) yet: choose "Set up this folder" to create it.\n`);
  } catch (e) {
    ctx.stdout.write(`${FOLDER_FILE} cannot be used: ${(e as Error).message}${(e as { details?: string[] }).details?.length ? `\n  ${(e as { details: string[] }).details.join('\n  ')}` : ''}\n`);
  }
  if (files.length > 0) {
    ctx.stdout.write('Workpapers here:\n');
    for (const f of files) ctx.stdout.write(`  ${describeFile(join(ctx.cwd, f), f)}\n`);
  }
  ctx.stdout.write('\n');
  return { file };
}

export async function runWith(args: string[], ctx: CommandContext, a: Asker, o: StageOptions = {}): Promise<number> {
  const p = parseFlags('', args, { policy: { type: 'string' } }, 1);
  const policy = str(p, 'policy');
  if (policy) o = { ...o, policy };
  const given = p.positionals[0];
  if (given) return wholeInterview(ctx, a, { ...o, file: given });
  ctx.stdout.write('tolrate — tests of controls by attribute sampling\n\n');
  let files: string[] = [];
  try {
    files = readdirSync(ctx.cwd).filter((f) => f.endsWith(WORKPAPER_SUFFIX)).sort();
  } catch {
    files = [];
  }
  const folder = engagementLines(ctx, files);
  const action = await a.select({
    id: 'start.action',
    message: 'What do you want to do?',
    choices: [
      { value: 'new', name: 'Start a new test' },
      { value: 'carry', name: 'Start this year\'s test from last year\'s workpaper of the same control' },
      { value: 'continue', name: `Continue a workpaper file${files.length ? ` (${files.length} in this folder)` : ''}` },
      { value: 'folder', name: folder.file ? 'Change this folder\'s engagement file (entity, period, team, firm defaults)' : 'Set up this folder as an engagement (entity, period, team, firm defaults)' },
      { value: 'calculator', name: 'Use a calculator (sample size, evaluation, planning table)' },
      { value: 'quit', name: 'Quit' },
    ],
    default: files.length > 0 ? 'continue' : 'new',
  });
  if (action === 'quit') return 0;
  if (action === 'calculator') return calculator(ctx, a);
  if (action === 'new') return wholeInterview(ctx, a, { ...o });
  if (action === 'folder') {
    const saved = saveFolder(ctx.cwd, await askFolder(a, folder.file, shippedLibraryDir()));
    ctx.stdout.write(`\nSaved ${FOLDER_FILE}: ${saved.entity}, ${saved.periodStart} to ${saved.periodEnd}, ${saved.team.length} team member(s). Every new test planned here takes these answers.\n`);
    return 0;
  }
  if (action === 'carry') {
    const from = await a.text({
      id: 'start.carry.from',
      message: 'Last year\'s workpaper file',
      help: 'Its control, attributes and approach are offered as the answers; population, selection, results and conclusion are not copied.',
      parse: (t) => {
        existingFile('Last year\'s workpaper', ctx.cwd)(workpaperPath(ctx.cwd, t));
        return workpaperPath(ctx.cwd, t);
      },
    });
    return wholeInterview(ctx, a, { ...o, from });
  }
  let file: string;
  const OTHER = '\u0000other';
  const pick = files.length
    ? await a.select({
        id: 'start.continue.file',
        message: 'Which workpaper?',
        choices: [...files.map((f) => ({ value: f, name: describeFile(join(ctx.cwd, f), f) })), { value: OTHER, name: 'Another file (type its path)' }],
      })
    : OTHER;
  if (pick === OTHER) {
    file = await a.text({
      id: 'start.continue.path',
      message: 'Workpaper file',
      parse: (t) => existingFile('The workpaper file', ctx.cwd)(workpaperPath(ctx.cwd, t)),
    });
  } else file = pick;
  return wholeInterview(ctx, a, { ...o, file });
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  if (args.includes('--help') || args.includes('-h')) {
    ctx.stdout.write(help());
    return 0;
  }
  if (!ctx.isTTY) return needsTerminal(ctx, 'start');
  return runWith(args, ctx, terminalAsker(ctx));
}
