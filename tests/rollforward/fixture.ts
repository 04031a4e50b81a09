/**
 * A test done at an interim date and rolled forward, run through the real interviews: an
 * invented list of payment vouchers for January to September (the interim part) and another for
 * October to December (the roll-forward part), a statistical test planned, recorded, rolled
 * forward, recorded again and concluded.
 */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { captureContext, concludeAnswers, FIELDWORK_ANSWERS, fixedClock, planAnswers, tempDir } from '../fixtures/interview.js';

/** Invented vouchers, `rows` of them, dated across the months given (deterministic). */
export function writeVouchers(dir: string, name: string, rows: number, months: number[], first: number): { total: string } {
  let x = 777 + first;
  const next = () => (x = (x * 1103515245 + 12345) % 2147483648);
  const lines = ['voucher,paid_on,payee,amount'];
  let cents = 0;
  for (let i = 0; i < rows; i++) {
    const c = 10_000 + (next() % 400_000);
    cents += c;
    const month = months[Math.floor((i / rows) * months.length)]!;
    lines.push(`PV-${first + i},2025-${String(month).padStart(2, '0')}-${String(1 + (i % 28)).padStart(2, '0')},Payee ${1 + (next() % 11)},${Math.floor(c / 100)}.${String(c % 100).padStart(2, '0')}`);
  }
  writeFileSync(join(dir, name), `${lines.join('\n')}\n`);
  return { total: `${Math.floor(cents / 100)}.${String(cents % 100).padStart(2, '0')}` };
}

export const INTERIM_ROWS = 600;
export const ROLL_FORWARD_ROWS = 400;

export function rollForwardAnswers(total: string, rows = ROLL_FORWARD_ROWS): ScriptAnswers {
  return {
    'rollforward.interimDate': '2025-09-30',
    'rollforward.plan.population.kind': 'file',
    'rollforward.plan.population.file': 'vouchers-q4.csv',
    'rollforward.plan.population.keyColumn': 'voucher',
    'rollforward.plan.population.amountColumn': 'amount',
    'rollforward.plan.population.dateColumn': 'paid_on',
    'rollforward.plan.population.samplingUnit': 'One payment voucher',
    'rollforward.plan.population.description': 'Payment vouchers released October to December 2025, from the payments register',
    'rollforward.plan.population.ledgerCount': String(rows),
    'rollforward.plan.population.ledgerTotal': total,
    'rollforward.plan.population.ledgerSource': 'Payments register report run 2026-01-12',
    'rollforward.plan.approach.size.accept': 'accept',
    'rollforward.plan.selection.method': 'random',
    'rollforward.plan.selection.spares': '3',
    'rollforward.plan.selection.seed': '90817',
    'rollforward.plan.selection.sheet': '',
  };
}

/** Typed results of every item: all conform, except the given deviations (seq → attribute). */
export function typedResults(prefix: string, deviations: Record<number, string> = {}): ScriptAnswers {
  const out: ScriptAnswers = {
    [`${prefix}record.source`]: 'type',
    ...Object.fromEntries(Object.entries(FIELDWORK_ANSWERS).map(([k, v]) => [`${prefix}${k}`, v])),
    [`${prefix}record.item.*.A1.result`]: 'conforms',
    [`${prefix}record.item.*.A2.result`]: 'conforms',
  };
  for (const [seq, attr] of Object.entries(deviations)) {
    out[`${prefix}record.item.${seq}.${attr}.result`] = 'deviation';
    out[`${prefix}record.item.${seq}.${attr}.found`] = 'Released with one signature only.';
    out[`${prefix}record.item.${seq}.${attr}.cause`] = 'not-performed';
    out[`${prefix}record.item.${seq}.${attr}.intent`] = 'no';
    out[`${prefix}record.item.${seq}.${attr}.pattern`] = 'isolated';
  }
  return out;
}

/** Plan, record the interim part, roll forward, record the roll-forward part; conclude when asked. */
export async function interimAndRollForward(o: { interimDeviations?: Record<number, string>; rollForwardDeviations?: Record<number, string>; conclude?: boolean; extra?: { plan?: ScriptAnswers; rollforward?: ScriptAnswers } } = {}) {
  const plan = (await import('../../src/commands/plan/index.js')).runWith;
  const record = (await import('../../src/commands/record/index.js')).runWith;
  const rollforward = (await import('../../src/commands/rollforward/index.js')).runWith;
  const conclude = (await import('../../src/commands/conclude/index.js')).runWith;
  const dir = tempDir('tolrate-rf-');
  const clock = fixedClock('2025-10-14T09:00:00.000Z');
  const interim = writeVouchers(dir, 'vouchers-q1-q3.csv', INTERIM_ROWS, [1, 2, 3, 4, 5, 6, 7, 8, 9], 10001);
  const later = writeVouchers(dir, 'vouchers-q4.csv', ROLL_FORWARD_ROWS, [10, 11, 12], 20001);
  const ctx = () => captureContext(dir);
  const planned = {
    ...planAnswers(interim.total, INTERIM_ROWS),
    'plan.population.file': 'vouchers-q1-q3.csv',
    'plan.population.description': 'Payment vouchers released January to September 2025, from the payments register',
    ...(o.extra?.plan ?? {}),
  };
  const runs: Array<{ what: string; code: number; out: string }> = [];
  const run = async (what: string, f: typeof plan, args: string[], answers: ScriptAnswers) => {
    const c = ctx();
    const code = await f(args, c, new ScriptedAsker(answers), { now: clock });
    runs.push({ what, code, out: c.text() });
    if (code !== 0) throw new Error(`${what} ended with ${code}:\n${c.text()}`);
  };
  await run('plan', plan, ['t1'], planned);
  await run('record interim', record, ['t1'], typedResults('', o.interimDeviations));
  await run('rollforward', rollforward, ['t1'], { ...rollForwardAnswers(later.total), ...(o.extra?.rollforward ?? {}) });
  await run('record roll-forward', record, ['t1', '--part', 'roll-forward'], typedResults('rollforward.', o.rollForwardDeviations));
  if (o.conclude !== false) await run('conclude', conclude, ['t1'], concludeAnswers());
  return { dir, file: join(dir, 't1.tolrate.json'), runs, clock, totals: { interim: interim.total, later: later.total } };
}
