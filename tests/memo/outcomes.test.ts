/** The wording per outcome: supported, not supported, non-statistical, haphazard, and drafts. */
import { describe, expect, it } from 'vitest';
import { loadTemplate, renderMemo } from '../../src/memo/index.js';
import { pct, pctUp } from '../../src/util/format.js';
import { findTable, readDocx, rowByFirstCell, tablesOf } from './docx-text.js';
import { buildFixture, type FixtureOptions } from './fixtures.js';

async function memoOf(o: FixtureOptions) {
  const f = buildFixture(o);
  return { f, doc: await readDocx(await renderMemo(f.wp, { workpaperPath: f.path })) };
}

describe('a supported statistical test', () => {
  it('says the results support the planned reliance, with no caveat and no DRAFT', async () => {
    const { f, doc } = await memoOf({ variant: 'supported', reviewerSigned: true });
    expect(f.wp.conclusion!.control.supportsReliance).toBe(true);
    expect(doc.text).toContain('The results support the planned reliance on control AP-03 for the period 2025-01-01 – 2025-12-31.');
    expect(doc.text).toContain('For every attribute the risk of overreliance is at most 5.0%');
    expect(doc.text).not.toMatch(/illustrative|not quantified|haphazard|DRAFT/i);
    // The isolated deviation of A2 (performed late) is listed with its cause.
    expect(doc.text).toContain('Goods received note dated after the invoice was approved');
    expect(doc.text).toContain('Performed late: receiving clerk on leave');
  });

  it('says no severity classification was needed (not that one is missing), and leaves the reviewer line blank', async () => {
    const { doc } = await memoOf({ variant: 'supported' });
    expect(doc.text).toContain((await loadTemplate()).memo.text.severityNotNeeded);
    expect(doc.text).not.toContain('The severity of the deficiency has not been recorded yet.');
    const signoff = findTable(doc.xml, ['Role', 'Name', 'Signature', 'Date']);
    expect(rowByFirstCell(signoff, 'Prepared by').Date).toBe('2026-02-12');
    expect(rowByFirstCell(signoff, 'Reviewed by').Date).toBe('');
    expect(rowByFirstCell(signoff, 'Reviewed by').Signature).toBe('');
  });

  it('shows the reviewer sign-off date once recorded', async () => {
    const { doc } = await memoOf({ variant: 'supported', reviewerSigned: true });
    const signoff = findTable(doc.xml, ['Role', 'Name', 'Signature', 'Date']);
    expect(rowByFirstCell(signoff, 'Reviewed by').Date).toBe('2026-02-20');
    expect(doc.text).toContain('M. Lindqvist\nDate: 2026-02-20');
  });
});

describe('a non-statistical test', () => {
  it('says sampling risk is not quantified and labels every statistical figure illustrative', async () => {
    const { f, doc } = await memoOf({ variant: 'non-statistical' });
    const ns = (await loadTemplate()).outcomes['non-statistical'];
    expect(doc.text).toContain('The test is non-statistical.');
    expect(doc.text).toContain(ns.approachNote);
    expect(doc.text).toContain(ns.resultsNote);
    expect(doc.text).toContain(ns.figuresLabel);
    expect(doc.text).toContain(ns.conclusionNote);
    expect(doc.text).toMatch(/sampling risk is not quantified/i);
    // The limit and risk columns say illustrative; the figures are those recorded.
    const t = findTable(doc.xml, ['Attribute', 'n', 'Deviations', 'Sample rate', 'Upper limit (illustrative)', 'Tolerable rate', 'Risk of overreliance (illustrative)', 'Decision']);
    for (const ev of f.wp.evaluation!.attributes) {
      expect(ev.illustrative).toBe(true);
      const row = rowByFirstCell(t, ev.attributeId);
      expect(row['Upper limit (illustrative)']).toBe(pctUp(ev.upperLimit));
      expect(row['Tolerable rate']).toBe(pct(ev.tolerableRate));
    }
    // The statistical decision rule and "allowed risk" are not presented as the basis.
    expect(doc.text).not.toContain('An attribute supports the planned reliance when its risk of overreliance');
    const approach = tablesOf(doc.xml).find((t) => t[0]?.[0] === 'Approach')!;
    expect(approach.map((r) => r[0])).not.toContain('Allowed risk of overreliance');
    expect(approach.map((r) => r[0])).toContain('Firm policy');
    // The firm policy and its size.
    expect(doc.text).toContain('Firm policy "Firm sampling policy 2025": a many times a day control relied on at the moderate level is tested with 25 items.');
  });
});

describe('a haphazard selection', () => {
  it('says it cannot support a statistical conclusion and cannot be drawn again', async () => {
    const { doc } = await memoOf({ variant: 'haphazard' });
    const h = (await loadTemplate()).outcomes.haphazard;
    expect(doc.text).toContain('The items were chosen haphazardly by R. Okafor: Invoices picked from the monthly binders');
    expect(doc.text).toContain(h.selectionNote);
    expect(doc.text).toMatch(/cannot support a statistical conclusion/);
    expect(doc.text).toContain(h.resultsNote);
    expect(doc.text).toContain(h.conclusionNote);
    expect(doc.text).toContain('The selection was haphazard, so it cannot be drawn again');
    expect(doc.text).toContain('Upper limit (illustrative)');
    // No seed to show.
    expect(doc.text).not.toMatch(/\nSeed\n/);
  });
});

describe('a test in progress', () => {
  it('planned only: DRAFT in the header and the banner, later sections not yet evaluated', async () => {
    const { doc } = await memoOf({ variant: 'supported', stage: 'planned' });
    expect(doc.headerFooter).toContain('DRAFT');
    expect(doc.text).toContain('DRAFT — this memo is not final');
    // The open steps are named under the banner.
    expect(doc.text).toContain('Not final because:');
    expect(doc.text).toMatch(/steps still open: Selection, Results, Evaluation and conclusion, Sign-off/);
    expect(doc.text).toContain('The sample has not been selected yet.');
    expect(doc.text).toContain('The results have not been recorded yet: this section is not yet evaluated.');
    expect(doc.text).toContain('The test has not been concluded yet: not yet evaluated.');
    expect(doc.text).toContain('No items have been selected yet.');
    expect(doc.text).toContain('Draft — test in progress');
    // The planning figures are there already.
    expect(doc.text).toContain('Sample size adopted: 78 items');
  });

  it('recorded, not evaluated: counts shown, limits and risks not yet evaluated', async () => {
    const { f, doc } = await memoOf({ variant: 'supported', stage: 'recorded' });
    expect(f.wp.evaluation).toBeUndefined();
    const t = findTable(doc.xml, ['Attribute', 'n', 'Deviations', 'Sample rate', 'Upper limit', 'Decision']);
    const a2 = rowByFirstCell(t, 'A2');
    expect(a2.n).toBe('78');
    expect(a2.Deviations).toBe('1');
    expect(a2['Sample rate']).toBe(pct(1 / 78));
    expect(a2['Upper limit']).toBe('not yet evaluated');
    expect(a2.Decision).toBe('not yet evaluated');
    expect(doc.text).toContain('Results are recorded for 78 tested items but have not been evaluated yet');
    expect(doc.headerFooter).toContain('DRAFT');
    // No chart without an evaluation.
    expect(doc.files.some((x) => x.startsWith('word/media/'))).toBe(false);
  });

  it('a bare workpaper (header only) still renders, every section marked', async () => {
    const { newWorkpaper } = await import('../../src/workpaper/index.js');
    const doc = await readDocx(await renderMemo(newWorkpaper('0.1.0-test', new Date('2026-01-01T00:00:00Z'))));
    expect(doc.text).toContain('DRAFT');
    expect(doc.text).toContain('The attributes to be tested have not been recorded yet.');
    expect(doc.text).toContain('The population has not been defined yet.');
    expect(doc.text).toContain('The approach and the sample size have not been planned yet.');
    expect(doc.text).toContain('tolrate reperform FILE');
  });
});

describe('other records', () => {
  it('evaluated but not concluded: DRAFT, decisions by the rates, the chart drawn', async () => {
    const { doc } = await memoOf({ variant: 'not-supported', stage: 'evaluated' });
    expect(doc.headerFooter).toContain('DRAFT');
    const t = findTable(doc.xml, ['Attribute', 'n', 'Deviations', 'Sample rate', 'Upper limit', 'Decision']);
    expect(rowByFirstCell(t, 'A1').Decision).toBe('Does not support reliance');
    expect(rowByFirstCell(t, 'A2').Decision).toBe('Supports reliance');
    expect(doc.text).toContain('No conclusion has been reached yet.');
    expect(doc.files.some((x) => x.startsWith('word/media/'))).toBe(true);
  });

  it('a systematic selection names its interval, algorithm and seed', async () => {
    const { buildFixture: build } = await import('./fixtures.js');
    const f = build({ variant: 'supported' });
    const wp = { ...f.wp, selection: { ...f.wp.selection!, method: 'systematic' as const, interval: 14.9397, starts: [7.25] } };
    const doc = await readDocx(await renderMemo(wp, { workpaperPath: f.path }));
    expect(doc.text).toContain('The items were selected systematically, every 14.9397 items from each random start, with random-v1 and the seed 20260120-C310');
    expect(doc.text).toContain('systematic (random start)');
    expect(doc.text).toContain('7.25');
  });

  it('a Poisson evaluation names the factor method in the results and the formulas', async () => {
    const { evaluate } = await import('../../src/control-test/index.js');
    const f = buildFixture({ variant: 'supported', stage: 'recorded' });
    const wp = { ...f.wp, approach: { ...f.wp.approach!, model: 'poisson' as const } };
    wp.evaluation = evaluate(wp);
    const doc = await readDocx(await renderMemo(wp, { workpaperPath: f.path }));
    expect(doc.text).toContain('Sample size rule (Poisson model)');
    expect(doc.text).toContain('The upper deviation limit is the Poisson factor for k deviations at 95% confidence divided by n.');
    expect(doc.text).toContain('Upper deviation limit = GammaInv(confidence; k + 1) / n.');
    // k = 0 for A1 in 78 items: the factor −ln(0.05) = 2.9957, the "3.00/n for k = 0 at 95%" of common
    // practice, no single source; 2.9957 / 78 = 3.841%, rounded up to 3.9%.
    const a1 = wp.evaluation.attributes.find((x) => x.attributeId === 'A1')!;
    expect(a1.deviations).toBe(0);
    expect(a1.upperLimit * 78).toBeCloseTo(2.9957, 3);
    const t = findTable(doc.xml, ['Attribute', 'n', 'Deviations', 'Sample rate', 'Upper limit', 'Decision']);
    expect(rowByFirstCell(t, 'A1')['Upper limit']).toBe('3.9%');
  });
});
