/**
 * Re-performance over every selection method (random, systematic, haphazard), every kind of
 * population (CSV, XLSX, number ranges), a non-statistical test and the Poisson model: each test is
 * planned, recorded and concluded through the real interview, re-performs clean, and then names a
 * result changed by hand.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { captureContext, concludeAnswers, fixedClock, planAnswers, tempDir, writePopulation, FIELDWORK_ANSWERS } from '../fixtures/interview.js';

async function xlsxPopulation(dir: string): Promise<string> {
  const ExcelJS = (await import('exceljs')).default;
  const wb = new ExcelJS.Workbook();
  const ws = wb.addWorksheet('Register');
  ws.addRow(['Voucher No', 'Paid', 'Amount']);
  for (let i = 0; i < 150; i++) ws.addRow([`PV-${2001 + i}`, new Date(Date.UTC(2025, i % 12, 1 + (i % 27))), 100 + i]);
  await wb.xlsx.writeFile(join(dir, 'register.xlsx'));
  return String(Array.from({ length: 150 }, (_, i) => 100 + i).reduce((a, b) => a + b, 0));
}

interface Case {
  name: string;
  answers: (dir: string) => Promise<ScriptAnswers>;
  /** What the planned test must be (so each case tests what it names). */
  is: { kind: string; method: string; source: string; model?: string };
}

const CASES: Case[] = [
  { name: 'CSV, random, hypergeometric', answers: async (dir) => planAnswers(writePopulation(dir).total), is: { kind: 'statistical', method: 'random', source: 'csv', model: 'hypergeometric' } },
  { name: 'CSV, systematic with two starts', answers: async (dir) => ({ ...planAnswers(writePopulation(dir).total), 'plan.selection.method': 'systematic', 'plan.selection.starts': '2' }), is: { kind: 'statistical', method: 'systematic', source: 'csv' } },
  { name: 'CSV, random, Poisson model', answers: async (dir) => ({ ...planAnswers(writePopulation(dir).total), 'plan.approach.model': 'poisson' }), is: { kind: 'statistical', method: 'random', source: 'csv', model: 'poisson' } },
  {
    name: 'XLSX, random',
    answers: async (dir) => ({
      ...planAnswers(await xlsxPopulation(dir)),
      'plan.population.file': 'register.xlsx',
      'plan.population.sheet': 'Register',
      'plan.population.keyColumn': 'Voucher No',
      'plan.population.amountColumn': 'Amount',
      'plan.population.dateColumn': 'Paid',
      'plan.population.ledgerCount': '150',
      'plan.population.ledgerTotal': await xlsxPopulation(dir),
    }),
    is: { kind: 'statistical', method: 'random', source: 'xlsx' },
  },
  {
    name: 'number ranges, haphazard, non-statistical',
    answers: async () => ({
      ...planAnswers('0'),
      'plan.population.kind': 'ranges',
      'plan.population.ranges': '40001-41200',
      'plan.population.exclusions': '40017, 40233',
      'plan.population.ledgerCount': '1198',
      'plan.approach.kind': 'non-statistical',
      'plan.approach.reliance': 'moderate',
      'plan.approach.tolerableRate': '',
      'plan.selection.method': 'haphazard',
      'plan.selection.haphazard.by': 'T. Preparer',
      'plan.selection.haphazard.how': 'Picked from the binders, two or three a month.',
      'plan.selection.haphazard.keys': Array.from({ length: 30 }, (_, i) => String(40001 + i * 37)).join(' '),
    }),
    is: { kind: 'non-statistical', method: 'haphazard', source: 'ranges' },
  },
];

describe.each(CASES)('re-performance: $name', ({ answers, is }) => {
  it('agrees when untouched, and names a result changed by hand', async () => {
    const dir = tempDir('tolrate-variant-');
    const now = fixedClock();
    expect(await plan(['t1'], captureContext(dir), new ScriptedAsker(await answers(dir), { defaults: true }), { now })).toBe(0);
    const planned = JSON.parse(readFileSync(join(dir, 't1.tolrate.json'), 'utf8'));
    expect({ kind: planned.approach.kind, method: planned.selection.method, source: planned.population.source.kind, ...(is.model ? { model: planned.approach.model } : {}) }).toEqual(is);
    const rec: ScriptAnswers = { 'record.source': 'type', ...FIELDWORK_ANSWERS, 'record.item.*.A1.result': 'conforms', 'record.item.*.A2.result': 'conforms' };
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(rec), { now })).toBe(0);
    expect(await conclude(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(concludeAnswers(), { defaults: true }), { now })).toBe(0);
    const clean = captureContext(dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json'], clean)).toBe(0);
    const out = clean.text().replace(/\s+/g, ' ');
    for (const area of ['integrity', 'population', 'sample size', 'selection', 'results', 'evaluation', 'conclusion']) expect(out).toMatch(new RegExp(`${area} agrees`));
    // A conforming result changed to a deviation by hand.
    const file = join(dir, 't1.tolrate.json');
    const wp = JSON.parse(readFileSync(file, 'utf8'));
    wp.results.items[0].attributes.A1 = { result: 'deviation', found: 'No second signature', cause: 'not-performed', intentional: 'no', pattern: 'isolated' };
    writeFileSync(file, JSON.stringify(wp, null, 2));
    const bad = captureContext(dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json'], bad)).toBe(1);
    const said = bad.text().replace(/\s+/g, ' ');
    expect(said).toMatch(/integrity DIFFERS .*results\.items\[0\]\.attributes\.A1/);
    expect(said).toMatch(/evaluation DIFFERS .*A1: recorded 0 deviation\(s\), the results give 1/);
  });
});
