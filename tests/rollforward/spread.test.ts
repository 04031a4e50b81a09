/**
 * The memo's spread of the sample over the period for a test done in parts: the whole period,
 * both parts' populations and samples added month by month, each month marked by its part. The
 * test is run through the real interviews (tests/rollforward/fixture.ts); every expected figure
 * is counted in the test itself, straight from the two invented population files and the
 * selected keys (a second reading, by plain string slicing), never taken from the code under
 * test. The memo is read back with readMemoBlocks, the reader re-performance uses.
 */
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { renderMemo } from '../../src/memo/index.js';
import { spreadSvg } from '../../src/memo/chart.js';
import { readMemoBlocks, type MemoBlock } from '../../src/memo/read.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { captureContext } from '../fixtures/interview.js';
import { interimAndRollForward } from './fixture.js';

const HEADERS = ['Month', 'Part', 'Population items', 'Share of population', 'Population amount', 'Sample items', 'Share of sample', 'Sample amount'];

interface Row {
  key: string;
  month: string;
  cents: number;
}

/** The rows of a fixture file (voucher,paid_on,payee,amount; no quoted fields), read by slicing. */
function rowsOf(path: string): Row[] {
  return readFileSync(path, 'utf8')
    .trim()
    .split('\n')
    .slice(1)
    .map((l) => {
      const [key, date, , amount] = l.split(',');
      const [units, dec] = amount!.split('.');
      return { key: key!, month: date!.slice(0, 7), cents: Number(units) * 100 + Number(dec) };
    });
}

const money = (cents: number) => `${Math.floor(cents / 100).toLocaleString('en-US')}.${String(cents % 100).padStart(2, '0')}`;
const int = (n: number) => n.toLocaleString('en-US');
const share = (n: number, of: number) => `${((100 * n) / of).toFixed(1)}%`;
const sum = (rows: Row[]) => rows.reduce((a, r) => a + r.cents, 0);

/** The spread table of a memo: the table whose header row is HEADERS. */
async function spreadTable(buf: Uint8Array): Promise<{ rows: string[][]; text: string }> {
  const blocks = await readMemoBlocks(buf);
  const t = blocks.find((b): b is Extract<MemoBlock, { kind: 'table' }> => b.kind === 'table' && HEADERS.every((h, i) => b.rows[0]?.[i] === h));
  if (!t) throw new Error('no spread table with a Part column');
  const text = blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join('\n');
  return { rows: t.rows, text };
}

/** Both parts of a fixture run, read straight from its files: the population rows and the sample rows. */
function partsOf(dir: string, wp: Workpaper) {
  const interim = rowsOf(join(dir, 'vouchers-q1-q3.csv'));
  const later = rowsOf(join(dir, 'vouchers-q4.csv'));
  const pick = (rows: Row[], sel: NonNullable<Workpaper['selection']> | undefined) => {
    const byKey = new Map(rows.map((r) => [r.key, r]));
    return (sel?.items ?? []).filter((i) => i.role === 'sample').map((i) => byKey.get(i.key)!);
  };
  return { interim, later, interimSample: pick(interim, wp.selection), laterSample: pick(later, wp.rollForward?.selection) };
}

const MONTHS = Array.from({ length: 12 }, (_, i) => `2025-${String(i + 1).padStart(2, '0')}`);

describe('the memo of a test in parts: spread of the sample over the whole period', () => {
  it('adds both parts month by month, marks each month by its part, and names the months with no item selected over both', async () => {
    const r = await interimAndRollForward();
    const wp = loadWorkpaper(r.file);
    const m = captureContext(r.dir, false);
    expect(await runCli(['memo', 't1.tolrate.json', '--out', 'memo.docx'], m)).toBe(0);
    const { rows, text } = await spreadTable(readFileSync(join(r.dir, 'memo.docx')));
    const p = partsOf(r.dir, wp);
    const pop = [...p.interim, ...p.later];
    const smp = [...p.interimSample, ...p.laterSample];
    // Both samples are in: the sample items of both selections (spares not included).
    expect(p.interimSample.length).toBe(wp.selection!.sampleSize);
    expect(p.laterSample.length).toBe(wp.rollForward!.selection!.sampleSize);
    const expected: string[][] = [];
    const unselected: string[] = [];
    for (const month of MONTHS) {
      const pm = pop.filter((x) => x.month === month);
      const sm = smp.filter((x) => x.month === month);
      if (pm.length > 0 && sm.length === 0) unselected.push(month);
      // The interim file holds January to September, the roll-forward file October to December.
      const part = Number(month.slice(5)) <= 9 ? 'Interim' : 'Roll-forward';
      expected.push([month, part, String(pm.length), share(pm.length, pop.length), pm.length ? money(sum(pm)) : '0', String(sm.length), share(sm.length, smp.length), sm.length ? money(sum(sm)) : '']);
    }
    expected.push(['Total', '', int(pop.length), '100.0%', money(sum(pop)), String(smp.length), '100.0%', money(sum(smp))]);
    expect(rows.slice(1)).toEqual(expected);
    // Each roll-forward month holds roll-forward items only, so the roll-forward rows are the roll-forward file's.
    expect(rows.slice(10, 13).reduce((a, x) => a + Number(x[2]), 0)).toBe(p.later.length);
    expect(text).toContain('The test was done in parts, so the table covers the whole period: each month\'s population is the interim and the roll-forward populations added');
    expect(text).toContain('the interim part runs from 2025-01-01 to 2025-09-30, the roll-forward part from 2025-10-01 to 2025-12-31');
    expect(text).toContain(unselected.length
      ? `No item was selected from these months, in which the population holds items: ${unselected.join(', ')}.`
      : 'Every month of the period in which the population holds items has at least one item selected.');
    expect(text).not.toContain('not selected yet');
    expect(text).toContain('The months run over the whole period, both parts together; the interim part ends on 2025-09-30.');
    // The picture covers the whole period, each month with its part in the text alternative.
    const xml = (await import('jszip')).default;
    const docXml = await (await xml.loadAsync(readFileSync(join(r.dir, 'memo.docx')))).file('word/document.xml')!.async('string');
    expect(docXml).toMatch(/descr="2025-01 \(Interim\): Population items \d+, Sample items \d+;[^"]*2025-12 \(Roll-forward\): Population items \d+, Sample items \d+"/);
    // The picture marks where the interim part ends: a dashed line after September, labelled.
    const bars = MONTHS.map((month) => ({ month, populationShare: 1 / 12, sampleShare: 1 / 12 }));
    const marked = spreadSvg(bars, { population: 'p', sample: 's' }, 620, { at: 9, label: 'Interim date 2025-09-30' });
    const line = /<line x1="([\d.]+)"[^>]*stroke-dasharray/.exec(marked.svg);
    expect(line).not.toBeNull();
    const sepX = Number(line![1]);
    // Between September's bars and October's: September's sample bar ends left of it, October's population bar starts right of it.
    const rects = [...marked.svg.matchAll(/<rect x="([\d.]+)" y="[\d.]+" width="([\d.]+)" height="[\d.]+" fill="#/g)].slice(3).map((m) => ({ x: Number(m[1]), w: Number(m[2]) }));
    expect(rects[17]!.x + rects[17]!.w).toBeLessThan(sepX);
    expect(rects[18]!.x).toBeGreaterThan(sepX);
    expect(marked.svg).toContain('>Interim date 2025-09-30</text>');
    expect(spreadSvg(bars, { population: 'p', sample: 's' }, 620).svg).not.toContain('stroke-dasharray');
    // Re-performance renders the same memo afresh and finds it equal.
    const clean = captureContext(r.dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json', '--memo', 'memo.docx'], clean)).toBe(0);

    // The interim date inside a month: that month belongs to both parts, and the memo says so.
    // (Only the dates are moved, in memory: the interview would refuse this interim date, as the
    // interim file holds September items after it; the marking of the months is what is checked.)
    const split: Workpaper = { ...wp, rollForward: { ...wp.rollForward!, interimDate: '2025-09-15', periodStart: '2025-09-16' } };
    const s = await spreadTable(await renderMemo(split));
    expect(s.rows.find((x) => x[0] === '2025-09')!.slice(0, 3)).toEqual(['2025-09', 'Both (interim date inside)', String(pop.filter((x) => x.month === '2025-09').length)]);
    expect(s.rows.find((x) => x[0] === '2025-08')![1]).toBe('Interim');
    expect(s.rows.find((x) => x[0] === '2025-10')![1]).toBe('Roll-forward');
    expect(s.text).toContain('The interim date 2025-09-15 falls inside 2025-09, so that month belongs to both parts');
  }, 180_000);

  it('the roll-forward not selected yet: its months show the population only; a part read before the tally was recorded is named', async () => {
    const r = await interimAndRollForward({ conclude: false });
    const wp = loadWorkpaper(r.file);
    const p = partsOf(r.dir, wp);
    const pop = [...p.interim, ...p.later];
    // The workpaper as it stood before the roll-forward selection: its population recorded, no selection or results.
    const { selection: _s, results: _r, ...rf } = wp.rollForward!;
    const { evaluation: _e, ...rest } = wp;
    const pending = { ...rest, rollForward: rf } as Workpaper;
    const { rows, text } = await spreadTable(await renderMemo(pending));
    const unselected: string[] = [];
    for (const [i, month] of MONTHS.entries()) {
      const row = rows[i + 1]!;
      const pm = pop.filter((x) => x.month === month);
      const sm = p.interimSample.filter((x) => x.month === month);
      expect(row.slice(0, 4)).toEqual([month, i < 9 ? 'Interim' : 'Roll-forward', String(pm.length), share(pm.length, pop.length)]);
      if (i < 9) {
        expect(row[5]).toBe(String(sm.length));
        if (pm.length > 0 && sm.length === 0) unselected.push(month);
      } else expect(row.slice(5)).toEqual(['–', '–', '–']);
    }
    expect(rows[13]!.slice(0, 6)).toEqual(['Total', '', int(pop.length), '100.0%', money(sum(pop)), String(p.interimSample.length)]);
    expect(text).toContain('The roll-forward sample is not selected yet: the roll-forward months show the population only');
    // No roll-forward month is named as one with no item selected while its sample is not drawn.
    expect(text).not.toMatch(/No item was selected from these months[^.]*2025-1[0-2]/);
    if (unselected.length) expect(text).toContain(`No item was selected from these months, in which the population holds items: ${unselected.join(', ')}.`);
    else expect(text).toContain('Every month of the parts selected so far in which the population holds items has at least one item selected.');
    expect(text).not.toContain('Every month of the period in which the population holds items has at least one item selected.');

    // An older roll-forward population with no rows by month: named, its months show the sample only.
    const { monthTally: _t, ...fp } = wp.rollForward!.population!.fingerprint;
    const older = { ...wp, rollForward: { ...wp.rollForward!, population: { ...wp.rollForward!.population!, fingerprint: fp } } } as Workpaper;
    const o = await spreadTable(await renderMemo(older));
    for (const month of ['2025-10', '2025-11', '2025-12']) {
      const row = o.rows.find((x) => x[0] === month)!;
      expect(row.slice(2, 5)).toEqual(['–', '–', '–']);
      expect(row[5]).toBe(String(p.laterSample.filter((x) => x.month === month).length));
    }
    expect(o.rows.find((x) => x[0] === '2025-01')![2]).toBe(String(p.interim.filter((x) => x.month === '2025-01').length));
    expect(o.rows.at(-1)!.slice(0, 3)).toEqual(['Total', '', String(p.interim.length)]);
    expect(o.text).toContain("The roll-forward population's rows by month were not recorded");
    expect(o.text).toContain("the population figures are the interim part's alone");
    expect(o.text).not.toMatch(/The population holds no item in these months of the period: [^.]*2025-1[0-2]/);
  }, 180_000);

  it('re-performance counts the roll-forward population by month again and names the part of a tampered month', async () => {
    const r = await interimAndRollForward({ conclude: false });
    const raw = JSON.parse(readFileSync(r.file, 'utf8'));
    const months = raw.rollForward.population.fingerprint.monthTally.months as Array<{ month: string; count: number }>;
    const nov = months.find((x) => x.month === '2025-11')!;
    // Counted straight from the file: the roll-forward file's November vouchers.
    const real = rowsOf(join(r.dir, 'vouchers-q4.csv')).filter((x) => x.month === '2025-11').length;
    expect(nov.count).toBe(real);
    nov.count += 1;
    writeFileSync(r.file, JSON.stringify(raw, null, 2));
    const bad = captureContext(r.dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json'], bad)).toBe(1);
    // The report wraps its lines; read it with the wrapping undone.
    const out = bad.text().replace(/\s+/g, ' ');
    expect(out).toContain(`roll-forward part: vouchers-q4.csv: 1 difference(s) - roll-forward population: month 2025-11: recorded ${real + 1} rows, the population has ${real}`);
    expect(out).toContain('rollForward.population.fingerprint.monthTally.months[1].count: was changed outside tolrate');
    // Every difference naming that month names the roll-forward part; the interim population is as recorded.
    const named = out.split(' - ').filter((d) => d.includes('month 2025-11'));
    expect(named.length).toBe(1);
    for (const d of named) expect(d).toMatch(/^roll-forward population: /);
    expect(out).toMatch(/vouchers-q1-q3\.csv: SHA-256 [0-9a-f]{16}…, 600 rows, [^|]*?9 months by paid_on — as recorded/);
  }, 180_000);
});
