/**
 * The engagement demo: one folder of an invented engagement with its folder file, the two demo
 * scenarios planned in it (their engagement step answered from the folder file), and a third
 * test carried forward from an invented prior year's workpaper (planned, not yet tested, so the
 * status and the summary show a test in progress). Everything in it is invented.
 */
import { existsSync, mkdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { CommandContext, Output } from '../commands/types.js';
import { TolrateInputError } from '../errors.js';
import { saveFolder, type EngagementFolder, type EngagementFolderInput } from '../engagement/folder.js';
import { packageVersion } from '../util/version.js';
import type { Workpaper } from '../workpaper/schema.js';
import { loadScenario, runDemoInterview, samplesDir, scenarioClock, scenarioDir, type DemoResult } from './demo.js';
import { ScriptedAsker, ScriptError, type ScriptAnswers } from './scripted.js';
import { newSession, openSession } from './session.js';
import { firstOpen, PLAN_STEPS, runOpenSteps } from './flow.js';
import { startCarriedForward } from './carry-forward.js';

/** The invented engagement. */
export const DEMO_FOLDER: EngagementFolderInput = {
  schemaVersion: 1,
  entity: 'Brackenmoor Kilnworks Ltd',
  periodStart: '2025-01-01',
  periodEnd: '2025-12-31',
  reference: 'BK-2025',
  team: [
    { name: 'R. Halvorsen', role: 'partner' },
    { name: 'C. Lindqvist', role: 'manager' },
    { name: 'N. Oduya', role: 'preparer' },
    { name: 'E. Marchetti', role: 'preparer' },
  ],
  defaults: { confidence: 0.95 },
};

/** The prior year's test (invented): supporting documents of large manual journals, 2024. */
const PRIOR_CONTROL: ScriptAnswers = {
  'plan.engagement.entity': 'Brackenmoor Kilnworks Ltd',
  'plan.engagement.periodStart': '2024-01-01',
  'plan.engagement.periodEnd': '2024-12-31',
  'plan.engagement.reference': 'J-1.5',
  'plan.control.id': 'GL-04',
  'plan.control.description': 'Every manual journal of 25,000 or more has its supporting documents attached in the ledger before it is approved.',
  'plan.control.objective': 'Manual journals are supported by evidence of the transaction or estimate they record.',
  'plan.attributes.A1.description': 'Supporting documents attached in the ledger before approval',
  'plan.attributes.A1.deviation': 'no attachment, or an attachment that does not support the amount or account',
  'plan.population.file': 'manual-journals-2024.csv',
  'plan.population.description': 'Manual journals of 25,000 or more posted in 2024, from the general ledger\'s journal listing',
  'plan.population.ledgerSource': 'General ledger journal report, manual source, 2024, run 2025-01-09',
  'plan.selection.seed': '4471',
  'record.item.*.testedOn': '2025-01-24',
  'record.item.*.evidence': 'journal voucher with its supporting documents attached in the ledger',
  'signoff.date': '2025-01-27',
};

export interface EngagementDemoResult {
  dir: string;
  folder: EngagementFolder;
  tests: Array<{ workpaper: Workpaper; workpaperPath: string }>;
  priorPath: string;
  files: DemoResult['files'];
  now: () => Date;
}

export async function runEngagementDemo(ctx: CommandContext, o: { out: string; samples?: string }): Promise<EngagementDemoResult> {
  const samples = o.samples ?? samplesDir();
  const dir = resolve(ctx.cwd, o.out);
  if (existsSync(dir) && !statSync(dir).isDirectory()) throw new TolrateInputError(`--out ${dir} is a file, not a folder.`, 'USAGE');
  mkdirSync(dir, { recursive: true });
  const folder = saveFolder(dir, DEMO_FOLDER);
  const files: DemoResult['files'] = [{ what: 'engagement folder file', path: join(dir, 'tolrate-engagement.json') }];
  const tests: EngagementDemoResult['tests'] = [];
  for (const scenario of ['main', 'small'] as const) {
    const got = await runDemoInterview(ctx, { out: dir, scenario, samples, folder });
    tests.push({ workpaper: got.workpaper, workpaperPath: got.workpaperPath });
    files.push(...got.files);
  }
  // The prior year (invented): the small scenario's interview on the same journals a year earlier.
  const priorDir = join(dir, 'prior-year-2024');
  mkdirSync(priorDir, { recursive: true });
  const small = loadScenario('small', samples);
  const csv = readFileSync(join(scenarioDir('small', samples), 'manual-journals-2025.csv'), 'utf8').replace(/,2025-/g, ',2024-');
  writeFileSync(join(priorDir, 'manual-journals-2024.csv'), csv);
  const priorPath = join(priorDir, 'manual-journal-support-2024.tolrate.json');
  rmSync(priorPath, { force: true });
  const sink: Output = { write: () => true };
  const priorClock = scenarioClock('2025-01-27T09:00:00.000Z');
  const prior = newSession({ asker: new ScriptedAsker({ ...(small.answers as ScriptAnswers), ...PRIOR_CONTROL }), out: sink, path: priorPath, cwd: priorDir, toolVersion: packageVersion(), now: priorClock });
  if ((await runOpenSteps(prior, ['plan.engagement', 'plan.control', 'plan.attributes', 'plan.population', 'plan.approach', 'plan.selection', 'record', 'conclude', 'signoff'])) !== 'done') {
    throw new ScriptError('The prior-year script stopped before the end.');
  }
  files.push({ what: 'prior year\'s workpaper (invented)', path: priorPath });
  // This year's test of the same control, carried forward: planned, not yet tested.
  const now = scenarioClock(small.clock ?? '2026-01-28T09:00:00.000Z');
  const path = join(dir, 'manual-journal-support.tolrate.json');
  rmSync(path, { force: true });
  startCarriedForward(path, priorPath, 'prior-year-2024/manual-journal-support-2024.tolrate.json', packageVersion(), now());
  const answers: ScriptAnswers = {
    'plan.engagement.reference': 'J-1.5',
    'plan.engagement.preparer': 'E. Marchetti',
    'plan.engagement.reviewer': 'C. Lindqvist',
    'plan.population.kind': 'file',
    'plan.population.file': 'manual-journals-2025.csv',
    'plan.population.keyColumn': 'journal_id',
    'plan.population.amountColumn': 'amount',
    'plan.population.dateColumn': 'posted_on',
    'plan.population.samplingUnit': 'one manual journal of 25,000 or more',
    'plan.population.description': 'Manual journals of 25,000 or more posted in 2025, from the general ledger\'s journal listing',
    'plan.population.ledgerCount': (small.answers['plan.population.ledgerCount'] as string) ?? '',
    'plan.population.ledgerTotal': (small.answers['plan.population.ledgerTotal'] as string) ?? '',
    'plan.population.tieOutExplanation': (small.answers['plan.population.tieOutExplanation'] as string) ?? '',
    'plan.population.ledgerSource': (small.answers['plan.population.ledgerSource'] as string) ?? '',
    'plan.approach.plan': 'single',
    'plan.approach.size.accept': 'accept',
    'plan.selection.method': 'random',
    'plan.selection.spares': '3',
    'plan.selection.seed': '6203',
    'plan.selection.sheet': '',
  };
  const s = await openSession({ asker: new ScriptedAsker(answers, { defaults: true }), out: sink, path, cwd: dir, toolVersion: packageVersion(), now, folder });
  if (!s) throw new ScriptError('The demo could not open its carried-forward workpaper.');
  await runOpenSteps(s, PLAN_STEPS);
  if (firstOpen(s.wp, PLAN_STEPS)) throw new ScriptError(`The carried-forward script stopped before the end of planning (at ${firstOpen(s.wp, PLAN_STEPS)}).`);
  tests.push({ workpaper: s.wp, workpaperPath: path });
  files.push({ what: 'carried-forward test (planned, not yet tested)', path });
  if (s.wp.selection?.fieldworkSheet) files.push({ what: 'its fieldwork sheet', path: join(dir, s.wp.selection.fieldworkSheet) });
  return { dir, folder, tests, priorPath, files, now };
}
