/**
 * `tolrate status` and `tolrate summary` over the engagement demo's folder (a reviewed test, a
 * test prepared but not reviewed, and a carried-forward test still in progress), with an
 * unreadable and a tampered workpaper added. The summary's figures are checked against the
 * workpapers they were written from, read back from the XLSX and the DOCX.
 */
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { beforeAll, describe, expect, it } from 'vitest';
import { runEngagementDemo } from '../../src/interview/demo-engagement.js';
import { run as status } from '../../src/commands/status/index.js';
import { run as summary } from '../../src/commands/summary/index.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { stateHash } from '../../src/workpaper/log.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { readDocx } from '../memo/docx-text.js';
import { captureContext, tempDir } from '../fixtures/interview.js';

let dir: string;
const AS_OF = '2026-02-15';

beforeAll(async () => {
  const base = tempDir();
  await runEngagementDemo(captureContext(base), { out: 'eng' });
  dir = join(base, 'eng');
}, 120_000);

function files(): Record<string, Workpaper> {
  const out: Record<string, Workpaper> = {};
  for (const f of ['supplier-invoice-approval', 'manual-journal-approval', 'manual-journal-support', 'pay-data-changes']) out[f] = loadWorkpaper(join(dir, `${f}.tolrate.json`));
  return out;
}

describe('tolrate status', () => {
  it('lists every workpaper; an unreadable one with its problem and a tampered one marked; exit 1 while any is unfinished', async () => {
    const extra = tempDir();
    for (const f of ['supplier-invoice-approval.tolrate.json', 'supplier-invoices-2025.csv', 'supplier-invoice-approval.filled.csv', 'tolrate-engagement.json']) copyFileSync(join(dir, f), join(extra, f));
    // Only the reviewed test: complete, exit 0.
    const ctx0 = captureContext(extra, false);
    expect(await status([extra, '--as-of', AS_OF], ctx0)).toBe(0);
    expect(ctx0.text()).toContain('1 workpaper(s), 1 complete, 0 unfinished, 0 cannot be read');
    // Add an unreadable file and a tampered copy.
    writeFileSync(join(extra, 'broken.tolrate.json'), '{ "schemaVersion": 1,');
    const wp = JSON.parse(readFileSync(join(extra, 'supplier-invoice-approval.tolrate.json'), 'utf8'));
    wp.control.owner = 'Someone else';
    writeFileSync(join(extra, 'tampered.tolrate.json'), JSON.stringify(wp, null, 2));
    const ctx = captureContext(extra, false);
    expect(await status([extra, '--as-of', AS_OF, '--json'], ctx)).toBe(1);
    const got = JSON.parse(ctx.text());
    expect(got.counts).toEqual({ workpapers: 3, complete: 1, unfinished: 1, unreadable: 1 });
    const broken = got.workpapers.find((w: { file: string }) => w.file === 'broken.tolrate.json');
    expect(broken.readable).toBe(false);
    expect(broken.problem).toMatch(/is not valid JSON/);
    const tampered = got.workpapers.find((w: { file: string }) => w.file === 'tampered.tolrate.json');
    expect(tampered.tampered).toBeGreaterThan(0);
    expect(tampered.complete).toBe(false);
    expect(tampered.notFinal.join(' ')).toMatch(/changed outside tolrate/);
    const text = captureContext(extra, false);
    await status([extra, '--as-of', AS_OF], text);
    expect(text.text()).toMatch(/broken\.tolrate\.json\n {2}CANNOT BE READ: /);
    expect(text.text()).toContain('CHANGED OUTSIDE TOLRATE');
  });

  it('with --reperform, re-performs every test: exit 0 when all agree, 1 naming the test whose population differs', async () => {
    const extra = tempDir();
    for (const f of ['supplier-invoice-approval.tolrate.json', 'supplier-invoices-2025.csv', 'supplier-invoice-approval.filled.csv', 'evidence-authority-matrix-2025.txt']) copyFileSync(join(dir, f), join(extra, f));
    const ok = captureContext(extra, false);
    expect(await status([extra, '--as-of', AS_OF, '--reperform'], ok)).toBe(0);
    expect(ok.text()).toContain('re-performance agrees');
    // One amount of the population changed after the test: its fingerprint no longer matches.
    const csv = join(extra, 'supplier-invoices-2025.csv');
    const lines = readFileSync(csv, 'utf8').split('\n');
    lines[5] = lines[5]!.replace(/(\d)(\.\d\d)/, (_m, d: string, c: string) => `${(Number(d) + 1) % 10}${c}`);
    writeFileSync(csv, lines.join('\n'));
    const bad = captureContext(extra, false);
    expect(await status([extra, '--as-of', AS_OF, '--reperform', '--json'], bad)).toBe(1);
    const got = JSON.parse(bad.text());
    expect(got.counts.reperformDiffers).toBe(1);
    expect(got.workpapers[0].reperform.join(' ')).toMatch(/^population: /);
  });

  it('shows figures, decisions, step, review, notes and follow-ups due against the as-of date, as the workpapers record them', async () => {
    const ctx = captureContext(dir, false);
    expect(await status([dir, '--as-of', AS_OF, '--json'], ctx)).toBe(1);
    const got = JSON.parse(ctx.text());
    const w = files();
    const by = (f: string) => got.workpapers.find((x: { file: string }) => x.file === `${f}.tolrate.json`);
    const main = by('supplier-invoice-approval');
    expect(main.review.stage).toBe('reviewed');
    expect(main.complete).toBe(true);
    expect(main.stepReached).toBe('complete');
    expect(main.stateHash).toBe(stateHash(w['supplier-invoice-approval']!));
    for (const a of w['supplier-invoice-approval']!.evaluation!.attributes) {
      const s = main.attributes.find((x: { id: string }) => x.id === a.attributeId);
      expect(s).toMatchObject({ sampleSize: a.sampleSize, deviations: a.deviations, upperLimit: a.upperLimit, tolerableRate: a.tolerableRate });
      const c = w['supplier-invoice-approval']!.conclusion!.attributes.find((x) => x.attributeId === a.attributeId)!;
      expect(s.decision).toBe(c.supportsReliance ? 'supports reliance' : 'does not support reliance');
    }
    // Follow-ups against the as-of date: due before it = overdue, within 30 days = due.
    for (const f of main.followUps) {
      const days = (Date.parse(f.due) - Date.parse(AS_OF)) / 86_400_000;
      expect(f.timing).toBe(days < 0 ? 'overdue' : days <= 30 ? 'due' : 'later');
    }
    expect(by('manual-journal-approval').review.stage).toBe('prepared');
    const cf = by('manual-journal-support');
    expect(cf.stepReached).toBe('Results');
    expect(cf.concluded).toBe(false);
    expect(cf.attributes[0].decision).toBe('not concluded');
  });
});

describe('tolrate summary', () => {
  it('writes a DOCX and an XLSX whose figures are the workpapers\', naming the files and state hashes; the test in progress is not counted as concluded', async () => {
    const ctx = captureContext(dir, false);
    expect(await summary([dir, '--as-of', AS_OF, '--out', join(dir, 'sum')], ctx)).toBe(0);
    expect(ctx.text()).toContain('Summary of 4 workpaper(s): 3 concluded, 1 in progress');
    const w = files();
    const wb = new ExcelJS.Workbook();
    await wb.xlsx.readFile(join(dir, 'sum.xlsx'));
    expect(wb.worksheets.map((s) => s.name)).toEqual(['Workpapers', 'Controls', 'Results', 'Deviations', 'Deficiencies', 'Follow-ups']);
    for (const s of wb.worksheets) expect(s.views[0]).toMatchObject({ state: 'frozen', ySplit: 1 });
    // Workpapers: file names and state hashes.
    const wps = wb.getWorksheet('Workpapers')!;
    const hashes = new Map<string, string>();
    wps.eachRow((r, i) => i > 1 && hashes.set(String(r.getCell(1).value), String(r.getCell(7).value)));
    for (const [f, wp] of Object.entries(w)) expect(hashes.get(`${f}.tolrate.json`)).toBe(stateHash(wp));
    // Results: typed cells equal to the recorded evaluation.
    const res = wb.getWorksheet('Results')!;
    const rows: Array<Record<string, unknown>> = [];
    res.eachRow((r, i) => i > 1 && rows.push({ ref: r.getCell(1).value, attr: r.getCell(3).value, n: r.getCell(5).value, k: r.getCell(6).value, rate: r.getCell(7).value, limit: r.getCell(8).value, tol: r.getCell(9).value, decision: r.getCell(10).value }));
    for (const wp of Object.values(w)) {
      for (const a of wp.evaluation?.attributes ?? []) {
        const row = rows.find((x) => x.ref === wp.engagement!.reference && x.attr === a.attributeId)!;
        expect(row).toMatchObject({ n: a.sampleSize, k: a.deviations, rate: a.sampleRate, limit: a.upperLimit, tol: a.tolerableRate });
      }
    }
    const inProgress = rows.find((x) => x.ref === w['manual-journal-support']!.engagement!.reference)!;
    expect(inProgress.decision).toBe('in progress: not concluded');
    expect(res.getCell('H2').numFmt).toBe('0.00%');
    // Deviations: every deviation recorded in the workpapers, with its cause.
    // (both parts of the test done in two parts)
    const recorded = Object.values(w).flatMap((wp) => [...(wp.results?.items ?? []), ...(wp.rollForward?.results?.items ?? [])].filter((it) => !it.void).flatMap((it) => Object.entries(it.attributes).filter(([, r]) => r.result === 'deviation').map(([id]) => `${it.key}/${id}`)));
    const devs: string[] = [];
    wb.getWorksheet('Deviations')!.eachRow((r, i) => i > 1 && devs.push(`${r.getCell(3).value}/${r.getCell(4).value}`));
    expect(devs.sort()).toEqual(recorded.sort());
    // Deficiencies: the practitioner's classification and reasons.
    const main = w['supplier-invoice-approval']!;
    const def = wb.getWorksheet('Deficiencies')!.getRow(2);
    expect(def.getCell(4).value).toBe(main.conclusion!.severity!.rationale);
    // Follow-ups: every one of the concluded tests, with a date cell for the due date.
    const fu = wb.getWorksheet('Follow-ups')!;
    expect(fu.rowCount - 1).toBe(Object.values(w).reduce((s, wp) => s + (wp.conclusion?.followUps.length ?? 0), 0));
    expect(fu.getCell('F2').value).toBeInstanceOf(Date);
    // The DOCX names the workpapers and their state hashes, and lists the test in progress as such.
    const docx = await readDocx(readFileSync(join(dir, 'sum.docx')));
    for (const [f, wp] of Object.entries(w)) {
      expect(docx.text).toContain(`${f}.tolrate.json`);
      expect(docx.text).toContain(stateHash(wp));
    }
    expect(docx.text).toContain('in progress (step reached: Results)');
    expect(docx.text).toContain('3 concluded, 1 in progress');
    expect(docx.files.some((f) => f.startsWith('word/media/'))).toBe(true);
  });
});

describe('the summary chart', () => {
  it('draws every row on one axis in parts that fit a page; a limit above the tolerable rate is marked', async () => {
    const { limitChartParts } = await import('../../src/engagement/chart.js');
    // Limits and rates of an invented list of 60 rows (geometry only).
    const rows = Array.from({ length: 60 }, (_, i) => ({ label: `T-${i} A1`, upperLimit: 0.005 + (i % 10) / 100, tolerableRate: 0.06, upperLimitText: '' }));
    const parts = limitChartParts(rows, { limit: 'l', exceeds: 'e', tolerable: 't' });
    expect(parts.map((p) => p.geometry.length)).toEqual([28, 28, 4]);
    // One axis: the same tolerable rate is at the same x in every part.
    const xs = new Set(parts.flatMap((p) => p.geometry.map((g) => g.tolerableX.toFixed(3))));
    expect(xs.size).toBe(1);
    const all = parts.flatMap((p) => p.geometry);
    all.forEach((g, i) => expect(g.exceeds).toBe(rows[i]!.upperLimit > 0.06));
    // 96 px to the inch: a part with its legend and axis fits the 6.7 in of a landscape A4 page.
    for (const p of parts) expect(p.height / 96).toBeLessThan(6.7);
  });
});
