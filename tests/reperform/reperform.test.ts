/**
 * Re-performance: an untouched demo re-performs cleanly; each kind of tampering, made one at a
 * time outside the tool, is caught and named; unusable input exits 2.
 */
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { captureContext, tempDir } from '../fixtures/interview.js';

const WP = 'supplier-invoice-approval.tolrate.json';
const MEMO = 'supplier-invoice-approval.memo.docx';
const POP = 'supplier-invoices-2025.csv';
let demoDir = '';

beforeAll(async () => {
  const cwd = tempDir('tolrate-rp-');
  const ctx = captureContext(cwd, false);
  expect(await runCli(['demo', '--out', 'out'], ctx)).toBe(0);
  demoDir = join(cwd, 'out');
});

/** A fresh copy of the demo output, tampered by `edit` (which gets the parsed workpaper). */
function tampered(edit?: (wp: any, dir: string) => void): string {
  const dir = tempDir('tolrate-rp-case-');
  cpSync(demoDir, dir, { recursive: true });
  if (edit) {
    const file = join(dir, WP);
    const wp = JSON.parse(readFileSync(file, 'utf8'));
    edit(wp, dir);
    writeFileSync(file, JSON.stringify(wp, null, 2));
  }
  return dir;
}

async function reperform(dir: string, extra: string[] = []): Promise<{ code: number; out: string; err: string }> {
  const ctx = captureContext(dir, false);
  const code = await runCli(['reperform', WP, ...extra], ctx);
  // The report wraps long lines; match on the text with its white space folded.
  return { code, out: ctx.text().replace(/\s+/g, ' '), err: ctx.err.join('') };
}

function sampleItemWithDeviation(wp: any): { index: number; attr: string } {
  const index = wp.results.items.findIndex((i: any) => Object.values(i.attributes).some((r: any) => r.result === 'deviation'));
  const attr = Object.entries(wp.results.items[index].attributes).find(([, r]: any) => r.result === 'deviation')![0];
  return { index, attr };
}

describe('tolrate reperform', () => {
  it('an untouched demo agrees everywhere, memo included (exit 0)', async () => {
    const r = await reperform(tampered(), ['--memo', MEMO]);
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/Everything re-derived agrees/);
    for (const area of ['integrity', 'population', 'sample size', 'selection', 'evaluation', 'conclusion', 'memo']) {
      expect(r.out).toMatch(new RegExp(`${area}\\s+agrees`));
    }
  });

  it('the workpaper folder can be moved whole: the population is found relative to the workpaper', async () => {
    const dir = tampered();
    const moved = tempDir('tolrate-rp-moved-');
    cpSync(dir, join(moved, 'archive', '2025'), { recursive: true });
    const ctx = captureContext(moved, false);
    expect(await runCli(['reperform', join('archive', '2025', WP)], ctx)).toBe(0);
  });

  it('a changed seed is caught: the log names it and the re-drawn items differ', async () => {
    const r = await reperform(tampered((wp) => { wp.selection.seed = '20260113'; }));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/selection\.seed: was changed outside tolrate: the log says "20260112", the file has "20260113"/);
    expect(r.out).toMatch(/selection\s+DIFFERS/);
    expect(r.out).toMatch(/item 1 \(sample\): recorded position \d+ \(key PI-\d+\), re-drawn position \d+/);
  });

  it('a swapped item is caught', async () => {
    const r = await reperform(tampered((wp) => { wp.selection.items[3].key = 'PI-250001'; }));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/selection\.items\[3\]\.key \(item 4, PI-250001\): was changed outside tolrate/);
    expect(r.out).toMatch(/item 4 \(sample\): recorded key PI-250001, the population has PI-\d+ at that position/);
  });

  it('a result turned from deviation to conforms is caught, and the recorded figures no longer follow', async () => {
    const r = await reperform(tampered((wp) => {
      const { index, attr } = sampleItemWithDeviation(wp);
      wp.results.items[index].attributes[attr] = { result: 'conforms' };
    }));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/results\.items\[\d+\]\.attributes\.A\d\.(result|found|cause) \(item \d+, PI-\d+\): was changed outside tolrate/);
    expect(r.out).toMatch(/evaluation\s+DIFFERS/);
    expect(r.out).toMatch(/A\d: recorded \d deviation\(s\), the results give \d/);
  });

  it("a deviation's cause edited outside the tool is named", async () => {
    let where = '';
    const r = await reperform(tampered((wp) => {
      const { index, attr } = sampleItemWithDeviation(wp);
      wp.results.items[index].attributes[attr].cause = 'other';
      where = `results.items[${index}].attributes.${attr}.cause`;
    }));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(new RegExp(`${where.replace(/[[\].]/g, '\\$&')} \\(item \\d+, PI-\\d+\\): was changed outside tolrate`));
    expect(r.out).toMatch(/the file has "other"/);
  });

  it('a computed figure edited to look better is caught by recomputation', async () => {
    const r = await reperform(tampered((wp) => {
      wp.evaluation.attributes[0].upperLimit = 0.055;
      wp.evaluation.attributes[0].supportedByRates = true;
    }));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/A1: recorded upper deviation limit 5\.5000%, recomputed 7\.\d{4}%/);
    expect(r.out).toMatch(/A1: recorded that the rates support reliance; recomputed: they do not/);
  });

  it('an edited log entry breaks the chain', async () => {
    const r = await reperform(tampered((wp) => { wp.log[2].by = 'someone else'; }));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/log entry 3: was edited after it was written/);
  });

  it('a removed log entry breaks the chain', async () => {
    const r = await reperform(tampered((wp) => { wp.log.splice(4, 1); }));
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/log entry \d+: (is numbered|does not follow on)/);
  });

  it('a changed population file is caught by its fingerprint', async () => {
    const dir = tampered();
    const p = join(dir, POP);
    const text = readFileSync(p, 'utf8');
    const lines = text.split(/\r?\n/);
    lines[10] = lines[10]!.replace(/\d(?=[^\d]*$)/, (d) => String((Number(d) + 1) % 10));
    writeFileSync(p, lines.join('\n'));
    const r = await reperform(dir);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/population SHA-256 differs: recorded [0-9a-f]{64}, file has [0-9a-f]{64}/);
  });

  it('a memo that does not carry the figures is caught', async () => {
    const dir = tampered();
    // A memo of another test: the small scenario's.
    const other = tempDir('tolrate-rp-other-');
    expect(await runCli(['demo', '--scenario', 'small', '--out', 'o'], captureContext(other, false))).toBe(0);
    const { readdirSync } = await import('node:fs');
    const otherMemo = readdirSync(join(other, 'o')).find((f) => f.endsWith('.memo.docx'))!;
    cpSync(join(other, 'o', otherMemo), join(dir, MEMO));
    const r = await reperform(dir, ['--memo', MEMO]);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/memo\s+DIFFERS/);
    expect(r.out).toMatch(/is not a memo tolrate recorded writing from this workpaper/);
    // Compared in place: a section's paragraph or cell, with both texts.
    expect(r.out).toMatch(/the memo has "[^"]*", the workpaper gives "/);
  });

  it('unusable input exits 2 with a message, never a stack trace', async () => {
    const dir = tampered();
    const missing = await reperform(dir, ['--population', 'nowhere.csv']);
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/Cannot read the population file/);
    const ctx = captureContext(dir, false);
    expect(await runCli(['reperform'], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(/name the workpaper file/);
    writeFileSync(join(dir, 'broken.tolrate.json'), '{"schemaVersion": 1');
    const ctx2 = captureContext(dir, false);
    expect(await runCli(['reperform', 'broken.tolrate.json'], ctx2)).toBe(2);
    expect(ctx2.err.join('')).toMatch(/not valid JSON/);
    expect(ctx2.err.join('')).not.toMatch(/\s+at \S+ \(/);
  });
});
