/**
 * The engagement demo: one folder of an invented engagement with its folder file, the two demo
 * scenarios planned in it (their engagement step answered from the folder file), and a third
 * test carried forward from an invented prior year's workpaper (planned, not yet tested, so the
 * status and the summary show a test in progress), and a fourth test done in two parts: changes
 * to employees' pay data planned, selected and tested at an interim date (to 30 September), then
 * rolled forward to the period end with its own population, sample and results, concluded over
 * the whole period. Everything in it is invented.
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
import { firstOpen, PLAN_STEPS, runOpenSteps, runStep } from './flow.js';
import { ROLL_FORWARD_PLAN_STEPS } from '../control-test/index.js';
import { writeFileSafely } from '../io/write.js';
import { readRegularFile, readRegularText } from '../io/read.js';
import { parse as parseCsv } from 'csv-parse/sync';
import { acquireLock } from '../io/lock.js';
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

/**
 * The test done in two parts (invented): PR-06, changes to employees' standing pay data approved
 * by the payroll manager before the pay run that first uses them. The interim part (January to
 * September) is planned, selected and tested in October 2025, with one deviation; the roll-forward
 * part (October to December) in January 2026, with none. Populations: samples/engagement/, written
 * by samples/make-demo-data.mjs.
 */
export const PAY_CHANGES = {
  workpaper: 'pay-data-changes.tolrate.json',
  interimFile: 'pay-changes-2025-jan-sep.csv',
  rollForwardFile: 'pay-changes-2025-oct-dec.csv',
  /** The interim item (by draw order) whose approval was missing. */
  interimDeviationSeq: 23,
  interimFilled: 'pay-data-changes.filled.csv',
  rollForwardFilled: 'pay-data-changes.rollforward.filled.csv',
} as const;

const PAY_PLAN: ScriptAnswers = {
  'plan.engagement.reference': 'H-2.2',
  'plan.engagement.preparer': 'N. Oduya',
  'plan.engagement.reviewer': 'C. Lindqvist',
  'plan.control.id': 'PR-06',
  'plan.control.description': 'Every change to an employee\'s standing pay data (pay rate, grade, hours, allowance, bank account) is approved in the payroll system by the payroll manager before the pay run that first uses it.',
  'plan.control.objective': 'Employees are paid only at authorised rates, into authorised accounts.',
  'plan.control.owner': 'Payroll manager',
  'plan.control.frequency': 'many-times-daily',
  'plan.control.nature': 'manual',
  'plan.control.key': true,
  'plan.attributes.A1.description': 'Approved by the payroll manager before the pay run that first used the change',
  'plan.attributes.A1.deviation': 'no approval, approval after that pay run, or approval by someone else',
  'plan.attributes.A1.tolerableRate': '',
  'plan.attributes.more.A1': false,
  'plan.population.kind': 'file',
  'plan.population.file': PAY_CHANGES.interimFile,
  'plan.population.keyColumn': 'change_id',
  'plan.population.amountColumn': 'monthly_pay_after',
  'plan.population.dateColumn': 'changed_on',
  'plan.population.samplingUnit': 'one change to an employee\'s standing pay data',
  'plan.population.description': 'Changes to standing pay data made January to September 2025, from the payroll system\'s change log',
  'plan.population.ledgerCount': '1164',
  'plan.population.ledgerTotal': '4272625.91',
  'plan.population.ledgerSource': 'Payroll system change log report, 2025-01-01 to 2025-09-30, run 2025-10-03',
  'plan.approach.kind': 'statistical',
  'plan.approach.confidence': '95',
  'plan.approach.tolerableRate': '6',
  'plan.approach.expectedRate': '1',
  'plan.approach.model': 'hypergeometric',
  'plan.approach.plan': 'single',
  'plan.approach.size.accept': 'accept',
  'plan.selection.method': 'random',
  'plan.selection.spares': '3',
  'plan.selection.seed': '30925',
  'plan.selection.sheet': '',
};

/** What the (invented) tester wrote on the sheet: every sample item conforms except those given. */
interface SheetFill {
  testedBy: string;
  testedOn: string;
  deviations?: Record<number, { found: string; cause: string; intent: string; pattern: string }>;
}

const PAY_EVIDENCE = 'payroll change log entry with its approval trail; pay run register of the first pay run using the change';

const PAY_INTERIM_SHEET: SheetFill = {
  testedBy: 'N. Oduya',
  testedOn: '2025-10-16',
  deviations: {
    [PAY_CHANGES.interimDeviationSeq]: {
      found: 'Pay rate change entered by a payroll clerk and used in the next pay run; approved by the payroll manager nine days after that pay run, while she was on leave',
      cause: 'performed-late',
      intent: 'no',
      pattern: 'isolated',
    },
  },
};

const PAY_ROLL_FORWARD_SHEET: SheetFill = { testedBy: 'E. Marchetti', testedOn: '2026-01-19' };

/**
 * The filled sheet of a part, made from the fieldwork sheet the selection wrote (so its keys are
 * always the items selected): every sample row gets its result, tester, date and evidence.
 */
function fillSheet(dir: string, from: string, to: string, fill: SheetFill): void {
  const rows = parseCsv(readRegularText(join(dir, from), 'The demo\'s fieldwork sheet').replace(/^\uFEFF/, ''), { relax_column_count: true }) as string[][];
  const header = rows[0]!;
  const col = (name: string): number => {
    const i = header.findIndex((h) => h === name || h.startsWith(`${name} [`));
    if (i < 0) throw new ScriptError(`The demo's fieldwork sheet ${from} has no column "${name}".`);
    return i;
  };
  for (const r of rows.slice(1)) {
    if (r[1] !== 'sample') continue;
    const d = fill.deviations?.[Number(r[0])];
    r[col('A1 result')] = d ? 'D' : 'C';
    if (d) {
      r[col('A1 found')] = d.found;
      r[col('A1 cause')] = d.cause;
      r[col('A1 intent')] = d.intent;
      r[col('A1 pattern')] = d.pattern;
    }
    r[col('Tested by')] = fill.testedBy;
    r[col('Date tested')] = fill.testedOn;
    r[col('Evidence')] = PAY_EVIDENCE;
  }
  const field = (t: string) => (/[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t);
  writeFileSafely(join(dir, to), `\uFEFF${rows.map((r) => r.map(field).join(',')).join('\r\n')}\r\n`, { what: 'the demo\'s filled sheet' });
}

const PAY_ROLL_FORWARD: ScriptAnswers = {
  'rollforward.interimDate': '2025-09-30',
  'rollforward.plan.population.kind': 'file',
  'rollforward.plan.population.file': PAY_CHANGES.rollForwardFile,
  'rollforward.plan.population.keyColumn': 'change_id',
  'rollforward.plan.population.amountColumn': 'monthly_pay_after',
  'rollforward.plan.population.dateColumn': 'changed_on',
  'rollforward.plan.population.samplingUnit': 'one change to an employee\'s standing pay data',
  'rollforward.plan.population.description': 'Changes to standing pay data made October to December 2025, from the payroll system\'s change log',
  'rollforward.plan.population.ledgerCount': '412',
  'rollforward.plan.population.ledgerTotal': '1532154.44',
  'rollforward.plan.population.ledgerSource': 'Payroll system change log report, 2025-10-01 to 2025-12-31, run 2026-01-09',
  'rollforward.plan.approach.size.accept': 'accept',
  'rollforward.plan.selection.method': 'random',
  'rollforward.plan.selection.spares': '3',
  'rollforward.plan.selection.seed': '51231',
  'rollforward.plan.selection.sheet': '',
  'rollforward.record.source': 'sheet',
  'rollforward.record.sheet.path': PAY_CHANGES.rollForwardFilled,
};

const PAY_CONCLUDE: ScriptAnswers = {
  'conclude.compensatingControls': '',
  'conclude.notes': 'The one deviation (interim part) was a late approval while the payroll manager was on leave; the change itself was in order. No deviation in October to December.',
  'conclude.attribute.A1.agree': true,
  'conclude.control.text': '',
  'conclude.followUps.*.action': 'keep',
  'conclude.followUps.*.owner': 'N. Oduya',
  'conclude.followUps.*.due': '2026-02-27',
  'conclude.followUps.add.1': false,
  'signoff.name': '',
  'signoff.date': '2026-01-23',
};

/** Plan, select and test the interim part; roll it forward, test that part; conclude and sign off. */
async function payChangesTest(dir: string, samples: string, folder: EngagementFolder): Promise<{ workpaper: Workpaper; workpaperPath: string; files: DemoResult['files'] }> {
  const files: DemoResult['files'] = [];
  for (const f of [PAY_CHANGES.interimFile, PAY_CHANGES.rollForwardFile]) {
    writeFileSafely(join(dir, f), readRegularFile(join(samples, 'engagement', f), 'The demo file'), { what: 'the demo copy' });
  }
  const path = join(dir, PAY_CHANGES.workpaper);
  rmSync(path, { force: true });
  for (const f of ['pay-data-changes.fieldwork.csv', 'pay-data-changes.rollforward.fieldwork.csv', PAY_CHANGES.interimFilled, PAY_CHANGES.rollForwardFilled]) rmSync(join(dir, f), { force: true });
  const sink: Output = { write: () => true };
  const base = { out: sink, path, cwd: dir, toolVersion: packageVersion(), folder, onSaveFailure: 'throw' as const };
  const lock = acquireLock(path);
  try {
    // October 2025: the interim part planned, selected and tested.
    const s0 = newSession({ ...base, asker: new ScriptedAsker(PAY_PLAN), now: scenarioClock('2025-10-06T09:00:00.000Z') });
    if ((await runOpenSteps(s0, PLAN_STEPS)) !== 'done' || firstOpen(s0.wp, PLAN_STEPS)) throw new ScriptError('The interim part\'s plan stopped before the end.');
    fillSheet(dir, s0.wp.selection!.fieldworkSheet!, PAY_CHANGES.interimFilled, PAY_INTERIM_SHEET);
    const s1 = await openSession({ ...base, asker: new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': PAY_CHANGES.interimFilled }), now: scenarioClock('2025-10-17T14:00:00.000Z') });
    if (!s1 || (await runOpenSteps(s1, ['record'])) !== 'done' || firstOpen(s1.wp, ['record'])) throw new ScriptError('The interim part\'s results stopped before the end.');
    // January 2026: the roll-forward part planned, selected and tested; the test concluded over the whole period.
    const s2a = await openSession({ ...base, asker: new ScriptedAsker(PAY_ROLL_FORWARD), now: scenarioClock('2026-01-12T09:00:00.000Z') });
    if (!s2a) throw new ScriptError('The demo could not open its roll-forward workpaper.');
    if ((await runStep(s2a, 'rollforward.period')) !== 'done') throw new ScriptError('The roll-forward script stopped at the interim date.');
    if ((await runOpenSteps(s2a, ROLL_FORWARD_PLAN_STEPS)) !== 'done') throw new ScriptError('The roll-forward plan stopped before the end.');
    fillSheet(dir, s2a.wp.rollForward!.selection!.fieldworkSheet!, PAY_CHANGES.rollForwardFilled, PAY_ROLL_FORWARD_SHEET);
    const s2 = await openSession({ ...base, asker: new ScriptedAsker({ ...PAY_ROLL_FORWARD, ...PAY_CONCLUDE }), now: scenarioClock('2026-01-23T10:00:00.000Z') });
    if (!s2) throw new ScriptError('The demo could not open its roll-forward workpaper.');
    if ((await runOpenSteps(s2, ['rollforward.record', 'conclude', 'signoff'])) !== 'done' || firstOpen(s2.wp)) {
      throw new ScriptError(`The roll-forward script stopped before the end (at ${firstOpen(s2.wp) ?? 'an unknown step'}).`);
    }
    files.push({ what: 'test in two parts: workpaper', path });
    files.push({ what: 'its interim population (Jan to Sep)', path: join(dir, PAY_CHANGES.interimFile) });
    files.push({ what: 'its roll-forward population (Oct to Dec)', path: join(dir, PAY_CHANGES.rollForwardFile) });
    if (s2.wp.selection?.fieldworkSheet) files.push({ what: 'its interim fieldwork sheet', path: join(dir, s2.wp.selection.fieldworkSheet) });
    if (s2.wp.rollForward?.selection?.fieldworkSheet) files.push({ what: 'its roll-forward fieldwork sheet', path: join(dir, s2.wp.rollForward.selection.fieldworkSheet) });
    files.push({ what: 'its filled sheet, interim', path: join(dir, PAY_CHANGES.interimFilled) });
    files.push({ what: 'its filled sheet, roll-forward', path: join(dir, PAY_CHANGES.rollForwardFilled) });
    return { workpaper: s2.wp, workpaperPath: path, files };
  } finally {
    lock.release();
  }
}

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
    'plan.approach.plan': 'two-stage',
    'plan.approach.plan.accept': 'accept',
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
  const pay = await payChangesTest(dir, samples, folder);
  tests.push({ workpaper: pay.workpaper, workpaperPath: pay.workpaperPath });
  files.push(...pay.files);
  return { dir, folder, tests, priorPath, files, now };
}
