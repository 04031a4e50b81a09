/**
 * `tolrate demo`: the whole interview on the invented scenarios, scripted, no terminal. The
 * figures it reports are checked against outside references noted beside each check.
 */
import stdBinomialCdf from '@stdlib/stats-base-dists-binomial-cdf';
import stdHyperCdf from '@stdlib/stats-base-dists-hypergeometric-cdf';
import { describe, expect, it } from 'vitest';
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { captureContext, tempDir } from '../fixtures/interview.js';

const BETA = 0.05;

/** Smallest n with CDF(ceil(n·edr); n) ≤ β (README, "How the figures are computed": k_e = ⌈n·EDR⌉). */
function smallest(cdf: (k: number, n: number) => number, edr: number, max: number): number {
  for (let n = 1; n <= max; n++) if (cdf(Math.ceil(n * edr - 1e-9), n) <= BETA) return n;
  return -1;
}

describe('tolrate demo', () => {
  it('main scenario: runs end to end without a terminal and reports figures that match the references', async () => {
    const cwd = tempDir();
    const ctx = captureContext(cwd, false);
    expect(await runCli(['demo', '--out', 'out'], ctx)).toBe(0);
    expect(ctx.err.join('')).toBe('');
    const out = ctx.text();
    const dir = join(cwd, 'out');
    const file = join(dir, 'supplier-invoice-approval.tolrate.json');
    const wp = loadWorkpaper(file);
    expect(verifyLog(wp)).toEqual([]);
    for (const f of ['supplier-invoice-approval.fieldwork.csv', 'supplier-invoice-approval.memo.docx', 'supplier-invoices-2025.csv']) {
      expect(existsSync(join(dir, f)), f).toBe(true);
    }
    // The memo is a DOCX (a zip file: PK header).
    expect(readFileSync(join(dir, 'supplier-invoice-approval.memo.docx')).subarray(0, 2).toString()).toBe('PK');

    // Every tested item has who tested it, when, and the evidence inspected; the memo shows them.
    const tested = wp.results!.items.filter((r) => !r.void && Object.keys(r.attributes).length > 0);
    expect(tested.every((r) => r.testedBy && r.testedOn && r.evidence!.length > 0)).toBe(true);
    const matrix = tested.flatMap((r) => r.evidence!).find((e) => e.ref === 'evidence-authority-matrix-2025.txt');
    expect(matrix?.sha256).toMatch(/^[0-9a-f]{64}$/);
    const { readDocx, findTable } = await import('../memo/docx-text.js');
    const doc = await readDocx(readFileSync(join(dir, 'supplier-invoice-approval.memo.docx')));
    const evidence = findTable(doc.xml, ['Seq', 'Item', 'Tested by', 'Date tested', 'Evidence inspected', 'Note']);
    expect(evidence.slice(1).map((r) => r[1])).toEqual([...tested].sort((x, y) => x.seq - y.seq).map((r) => r.key));
    expect(evidence.slice(1).every((r) => r[2] !== '' && /^2026-01-\d\d$/.test(r[3]!) && r[4] !== '')).toBe(true);
    const devTable = findTable(doc.xml, ['Item', 'Date', 'Amount', 'What was found']);
    expect(devTable.slice(1).every((r) => /^2025-\d\d-\d\d$/.test(r[1]!) && /^\d{1,3}(,\d{3})*\.\d\d$/.test(r[2]!))).toBe(true);

    const N = wp.population!.fingerprint.rowCount;
    expect(N).toBe(3412);
    const a = wp.approach!;
    // Hypergeometric size at 95% / 6% / 1%, M_t = ⌈0.06 × 3412⌉ = 205: reference @stdlib's hypergeometric CDF.
    const hyper = smallest((k, n) => stdHyperCdf(k, N, 205, n), 0.01, N);
    expect(a.sampleSize).toBe(hyper);
    // The binomial size beside it: 78 (AICPA Audit Sampling guide's attribute tables, 95%, 6%, 1%; from memory),
    // also the smallest n with @stdlib's BinomCDF(⌈n/100⌉; n, 0.06) ≤ 5%.
    expect(a.finitePopulationCorrection!.binomialSampleSize).toBe(78);
    expect(smallest((k, n) => stdBinomialCdf(k, n, 0.06), 0.01, 1000)).toBe(78);
    // A2 has its own tolerable rate (8%): its size is smaller and the larger one is used.
    const a2 = a.sizes.find((x) => x.attributeId === 'A2')!;
    expect(a2.sampleSize).toBe(smallest((k, n) => stdHyperCdf(k, N, Math.ceil(0.08 * N), n), 0.01, N));
    expect(a2.sampleSize).toBeLessThan(a.sampleSize);

    // Results from the filled sheet: one void replaced by a spare; A1 two deviations, A2 one.
    const res = wp.results!;
    expect(res.source).toBe('sheet');
    const voids = res.items.filter((r) => r.void);
    expect(voids).toHaveLength(1);
    expect(res.items.find((r) => r.key === voids[0]!.void!.replacedBy)!.replaces).toBe(voids[0]!.key);
    const ev = (id: string) => wp.evaluation!.attributes.find((x) => x.attributeId === id)!;
    expect([ev('A1').sampleSize, ev('A1').deviations, ev('A2').deviations]).toEqual([a.sampleSize, 2, 1]);
    // Sample deviation rate 2 / 77 = 2.6% (arithmetic).
    expect(out).toMatch(/A1\s+77\s+2\s+2\.6%/);
    // Upper limit: M* = the largest M with HyperCDF(2; 3412, M, 77) > 5% (@stdlib); M*/N above 6%.
    let m = 2;
    while (stdHyperCdf(2, N, m + 1, 77) > BETA) m++;
    expect(ev('A1').deviationsInPopulation).toBe(m);
    expect(ev('A1').upperLimit).toBeCloseTo(m / N, 12);
    expect(ev('A1').upperLimit).toBeGreaterThan(0.06);
    expect(ev('A1').supportedByRates).toBe(false);
    // A2 at its 8%: HyperCDF(1; 3412, 273, 77) ≤ 5% (@stdlib), so the rates support it.
    expect(stdHyperCdf(1, N, Math.ceil(0.08 * N), 77)).toBeLessThanOrEqual(BETA);
    expect(ev('A2').supportedByRates).toBe(true);
    // Extension: the fewest m with HyperCDF(2; 3412, 205, 77 + m) ≤ 5% (@stdlib), if none of them deviates.
    let ext = 0;
    while (stdHyperCdf(2, N, 205, 77 + ext) > BETA) ext++;
    expect(ev('A1').extension).toBe(ext);
    expect(wp.conclusion!.followUps[0]).toMatchObject({ kind: 'extend-sample', items: ext });

    expect(wp.conclusion!.control.supportsReliance).toBe(false);
    expect(wp.conclusion!.severity!.classification).toBe('deficiency');
    expect(wp.signoffs!.preparer).toEqual({ name: 'N. Oduya', date: '2026-01-30' });

    // The narrative: size and why, the items, the deviations, the table, the conclusion, the files.
    expect(out.replace(/\s+/g, ' ')).toContain(`Sample size ${a.sampleSize}: 95% confidence, tolerable rate 6% (A1), expected rate 1%, hypergeometric model with N = 3,412.`);
    expect(out.replace(/\s+/g, ' ')).toContain('The binomial model would need 78 (1 more than the exact size for this population)');
    expect(out).toMatch(/Selection: random, seed 20260112; 77 items and 5 spares\. First items: PI-\d+/);
    expect(out).toMatch(/A1 PI-\d+: Approved in the system on/);
    // The cause as changed in the scripted review (note N2): the approval limit was not enforced.
    expect(out).toMatch(/\(system or configuration; intentional: no; unclear\)/);
    expect(out).toMatch(/N2 \(results, PI-253141\), raised by C\. Lindqvist/);
    expect(out).toMatch(/Answered by N\. Oduya, with a change to the record/);
    expect(out).toMatch(/Reviewed and signed off by C\. Lindqvist on 2026-01-30\./);
    expect(out.replace(/\s+/g, ' ')).toContain('The results do not support the planned reliance on P2P-07 (A1).');
    expect(out).toMatch(/memo\s+out\/supplier-invoice-approval\.memo\.docx/);
    expect(out).toContain('The tool computes.');

    // Run again into the same folder: the earlier files are replaced, not continued.
    const again = captureContext(cwd, false);
    expect(await runCli(['demo', '--out', 'out'], again)).toBe(0);
    expect(loadWorkpaper(file).log.map((e) => e.step)[0]).toBe('plan.engagement');
  });

  it('small scenario: the exact hypergeometric size is visibly smaller than the binomial one', async () => {
    const cwd = tempDir();
    const ctx = captureContext(cwd, false);
    expect(await runCli(['demo', '--scenario', 'small', '--out', 'small'], ctx)).toBe(0);
    const wp = loadWorkpaper(join(cwd, 'small', 'manual-journal-approval.tolrate.json'));
    const N = wp.population!.fingerprint.rowCount;
    expect(N).toBe(318);
    const a = wp.approach!;
    // 95% / 6% / 1% with N = 318, M_t = ⌈0.06 × 318⌉ = 20: reference @stdlib's hypergeometric CDF.
    expect(a.sampleSize).toBe(smallest((k, n) => stdHyperCdf(k, N, 20, n), 0.01, N));
    // Binomial 78 (AICPA tables, from memory); textbook correction 78 / (1 + 78/318) rounded up = 63 (arithmetic).
    expect(a.finitePopulationCorrection).toEqual({ binomialSampleSize: 78, correctedSampleSize: 63 });
    expect(a.sampleSize).toBeLessThan(78 - 5);
    expect(wp.population!.tieOut).toMatchObject({ ledgerCount: 319, countDifference: -1, totalDifference: '-41250.00' });
    expect(wp.selection!.method).toBe('systematic');
    expect(wp.results!.source).toBe('interview');
    expect(wp.evaluation!.attributes[0]!.deviations).toBe(0);
    expect(wp.conclusion!.control.supportsReliance).toBe(true);
    expect(wp.conclusion!.severity).toBeUndefined();
    expect(ctx.text()).toContain(`Sample size ${a.sampleSize}: 95% confidence`);
    expect(ctx.text().replace(/\s+/g, ' ')).toContain(
      `The binomial model would need 78 (${78 - a.sampleSize} more than the exact size for this population); the textbook finite population correction of it gives 63`,
    );
  });

  it('--verbose shows the interview; a wrong scenario is a usage error', async () => {
    const cwd = tempDir();
    const ctx = captureContext(cwd, false);
    expect(await runCli(['demo', '--scenario', 'small', '--out', 'v', '--verbose'], ctx)).toBe(0);
    expect(ctx.text()).toContain('? Entity Tillwater Glazes Ltd');
    expect(ctx.text()).toContain('Sizes at neighbouring rates');
    const bad = captureContext(cwd, false);
    expect(await runCli(['demo', '--scenario', 'smal'], bad)).toBe(2);
    expect(bad.err.join('')).toContain('there is no scenario "smal". Did you mean "small"?');
  });
});

describe('the demo memo after the scripted review', () => {
  it('shows the reviewer in the sign-off table, the changed cause as an amendment, and both notes with their threads', async () => {
    const cwd = tempDir();
    expect(await runCli(['demo', '--out', 'out'], captureContext(cwd, false))).toBe(0);
    const { readMemoBlocks } = await import('../../src/memo/read.js');
    const { readFileSync } = await import('node:fs');
    const blocks = await readMemoBlocks(readFileSync(join(cwd, 'out', 'supplier-invoice-approval.memo.docx')));
    const tables = blocks.filter((b): b is Extract<typeof b, { kind: 'table' }> => b.kind === 'table');
    const signoff = tables.find((t) => t.rows[0]?.join('|') === 'Role|Name|Signature|Date')!;
    expect(signoff.rows.find((r) => r[0] === 'Reviewed by')).toEqual(['Reviewed by', 'C. Lindqvist', '', '2026-01-30']);
    const amend = tables.find((t) => t.rows[0]?.join('|') === 'Field|Before|After')!;
    expect(amend.rows).toContainEqual(['results.items[64] (PI-253141).attributes.A1.cause', 'wrong-performer', 'system']);
    const notes = tables.find((t) => t.rows[0]?.join('|') === 'Note|On|Thread')!;
    expect(notes.rows.map((r) => r[0])).toEqual(['Note', 'N1', 'N2']);
    expect(notes.rows[1]![1]).toMatch(/^Population and completeness/);
    expect(notes.rows[2]![1]).toMatch(/^Results\nPI-253141/);
    expect(notes.rows[2]![2]).toMatch(/answered, with a change to the record — N\. Oduya \(preparer\)/);
    expect(notes.rows[2]![2]).toMatch(/cleared — C\. Lindqvist \(reviewer\)/);
    const text = blocks.filter((b) => b.kind === 'paragraph').map((b) => (b as { text: string }).text).join('\n');
    expect(text).not.toMatch(/DRAFT/);
    // The content hash printed beside the last log hash.
    const { loadWorkpaper: load } = await import('../../src/workpaper/file.js');
    const { stateHash } = await import('../../src/workpaper/log.js');
    const wp = load(join(cwd, 'out', 'supplier-invoice-approval.tolrate.json'));
    const rec = wp.memos!.at(-1)!;
    expect(text).toContain(`hash of the file's content: ${rec.stateHash}`);
    expect(rec.stateHash).not.toBe(stateHash(wp)); // the memo record itself came after
  });
});
