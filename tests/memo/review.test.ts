/**
 * Problems found by reading the rendered memo page by page as a reviewer and an inspector would,
 * each pinned here so that it stays fixed.
 */
import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { loadTemplate, renderMemo } from '../../src/memo/index.js';
import { resultColumnWidth } from '../../src/memo/render.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { findTable, readDocx, rowByFirstCell, tablesOf } from './docx-text.js';
import { buildFixture, type FixtureOptions } from './fixtures.js';

const require = createRequire(import.meta.url);
const betaQuantile = require('@stdlib/stats-base-dists-beta-quantile') as (p: number, a: number, b: number) => number;

async function memoOf(o: FixtureOptions, change?: (wp: Workpaper) => void) {
  const f = buildFixture(o);
  const wp = structuredClone(f.wp);
  change?.(wp);
  return { wp, doc: await readDocx(await renderMemo(wp, { workpaperPath: f.path })) };
}

describe('Appendix A result columns', () => {
  // Advance widths of Helvetica-Bold in 1/1000 em, from the Adobe Core 14 AFM file (from memory);
  // Arial Bold and Liberation Sans Bold are metric-compatible with it.
  // D 722, e 556, v 556, i 278, a 556, t 333, i 278, o 611, n 611 = 4501.
  const deviationBold8pt = (4501 / 1000) * 8 * 20; // twips: 720.16
  const cellMargins = 2 * 90; // left + right cell margins the memo's tables use

  it('leave room for "Deviation" in bold 8 pt on one line (it used to wrap as "Deviatio|n")', async () => {
    expect(resultColumnWidth(['Conforms', 'Deviation', 'Void', '—', 'A1']) - cellMargins).toBeGreaterThan(deviationBold8pt);
    const { doc } = await memoOf({ variant: 'not-supported' });
    const grids = [...doc.xml.matchAll(/<w:tblGrid>([\s\S]*?)<\/w:tblGrid>/g)].map((m) => [...m[1]!.matchAll(/w:w="(\d+)"/g)].map((x) => Number(x[1])));
    const tables = tablesOf(doc.xml);
    const i = tables.findIndex((t) => t[0]?.[0] === 'Seq' && t[0]?.includes('A1'));
    expect(i).toBeGreaterThanOrEqual(0);
    const header = tables[i]![0]!;
    for (const id of ['A1', 'A2']) expect(grids[i]![header.indexOf(id)]! - cellMargins).toBeGreaterThan(deviationBold8pt);
  });

  it('widen for a firm\'s longer result word', () => {
    expect(resultColumnWidth(['Conforms', 'Not conforming'])).toBeGreaterThan(resultColumnWidth(['Conforms', 'Deviation']));
  });
});

describe('population check notes', () => {
  it('are listed under "no problems" when the check passed, not as problems the preparer accepted', async () => {
    const note = 'Note: Delimiter found from the first lines: comma.';
    const { doc } = await memoOf({ variant: 'supported' }, (wp) => {
      wp.population!.validation = { ok: true, messages: [note] };
    });
    const T = (await loadTemplate()).memo.text;
    expect(doc.text).toContain(T.validationOk);
    expect(doc.text).toContain(note);
    expect(doc.text).not.toContain('The preparer went on for this reason');
  });

  it('still show real problems with the preparer\'s reason', async () => {
    const { doc } = await memoOf({ variant: 'supported' }, (wp) => {
      wp.population!.validation = { ok: false, messages: ['2 duplicate keys'], acceptedReason: 'duplicates are reversals, agreed to the ledger' };
    });
    expect(doc.text).toContain('The preparer went on for this reason: duplicates are reversals, agreed to the ledger');
    expect(doc.text).toContain('2 duplicate keys');
  });
});

describe('sections of a test with no deviations', () => {
  it('do not speak of reviewing causes that do not exist, nor of a missing severity', async () => {
    const { doc } = await memoOf({ variant: 'supported', deviations: [], voidAt: null });
    const T = (await loadTemplate()).memo.text;
    expect(doc.text).not.toContain(T.qualitative);
    expect(doc.text).toContain(T.severityNotNeeded);
    expect(doc.text).not.toContain(T.severityMissing);
  });

  it('a draft still says the severity is not recorded yet', async () => {
    const { doc } = await memoOf({ variant: 'supported', stage: 'evaluated' });
    const T = (await loadTemplate()).memo.text;
    expect(doc.text).toContain(T.severityMissing);
    expect(doc.text).not.toContain(T.severityNotNeeded);
  });
});

describe('a conclusion of reliance against the evaluation', () => {
  const override = (wp: Workpaper) => {
    const c = wp.conclusion!;
    c.attributes = c.attributes.map((a) => ({ ...a, supportsReliance: true, reasoning: `${a.reasoning} The practitioner concluded otherwise: the approver was on leave.` }));
    c.control = { supportsReliance: true, text: 'The results support the planned reliance on AP-03, as concluded by the practitioner.' };
    delete c.severity;
  };

  it('is flagged in the results and the conclusion, never summarised as every attribute passing', async () => {
    // 2 deviations in 78 at 95%: BetaInv(0.95; 3, 76) from @stdlib/stats-base-dists-beta-quantile
    // is about 7.85%, above the 6% tolerable rate, so the rates do not support reliance for A1.
    expect(betaQuantile(0.95, 3, 76)).toBeGreaterThan(0.06);
    const { doc } = await memoOf({ variant: 'not-supported' }, override);
    const t = await loadTemplate();
    const results = findTable(doc.xml, ['Attribute', 'n', 'Deviations', 'Sample rate', 'Upper limit', 'Decision']);
    expect(rowByFirstCell(results, 'A1').Decision).toBe(t.memo.labels.decisionAgainstEvidence);
    expect(rowByFirstCell(results, 'A2').Decision).toBe(t.memo.labels.decisionSupported);
    expect(doc.text).not.toContain('For every attribute the risk of overreliance is at most');
    const warning = doc.paragraphs.filter((p) => p.startsWith('Concluded against the evaluation: for A1 '));
    expect(warning).toHaveLength(2); // results section and conclusion
    expect(doc.text).not.toContain(t.memo.text.severityNotNeeded);
  });

  it('is not raised when the practitioner agrees with the evaluation', async () => {
    const { doc } = await memoOf({ variant: 'supported' });
    expect(doc.text).not.toContain('Concluded against the evaluation');
  });
});

describe('illustrative evaluations', () => {
  it('label the model of a non-statistical test as that of the illustrative figures only', async () => {
    const { doc } = await memoOf({ variant: 'non-statistical' });
    const row = tablesOf(doc.xml).flat().find((r) => r[0] === 'Model');
    expect(row?.[1]).toBe('binomial (illustrative)');
  });

  it('give a haphazard statistical test reasoning about the haphazard selection, not a firm policy it does not use', async () => {
    const { wp, doc } = await memoOf({ variant: 'haphazard' });
    expect(wp.approach!.kind).toBe('statistical');
    const t = findTable(doc.xml, ['Attribute', 'Decision', 'Reasoning']);
    const reasoning = rowByFirstCell(t, 'A1').Reasoning;
    expect(reasoning).toMatch(/haphazard/);
    expect(reasoning).toMatch(/cannot support a statistical conclusion/);
    expect(reasoning).not.toMatch(/firm policy/);
  });

  it('keep the firm-policy reasoning for a non-statistical test', async () => {
    const { doc } = await memoOf({ variant: 'non-statistical' });
    const t = findTable(doc.xml, ['Attribute', 'Decision', 'Reasoning']);
    expect(rowByFirstCell(t, 'A1').Reasoning).toContain("the firm policy's size assumes no deviations");
  });
});

describe('document properties', () => {
  it('name tolrate as the last modifier (not the library default "Un-named")', async () => {
    const { doc } = await memoOf({ variant: 'supported' });
    const core = await doc.zip.file('docProps/core.xml')!.async('string');
    expect(core).toContain('<cp:lastModifiedBy>tolrate</cp:lastModifiedBy>');
  });
});
