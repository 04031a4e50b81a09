// Benchmark of the DOCX memo (src/memo), run against the compiled library in dist/.
//   npm run build && node bench/memo.bench.mjs
// Goal: a memo with a 500-item appendix in under 1 s. Prints medians (and min/max) of
//  - renderMemo in this process (warm: modules, template and fonts already loaded),
//  - the first renderMemo of a fresh process (cold: imports docx and resvg, reads the template),
//  - `node dist/cli.js memo FILE` end to end in a child process (what a user waits for),
// for a 500-item and a 78-item workpaper, with and without the chart.
// Figures and the machine they were taken on are in bench/README.md ("Memo").
import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { performance } from 'node:perf_hooks';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const dist = (p) => join(root, 'dist', p);

/** A concluded workpaper with `n` sample items and 10 spares, saved in a temp folder. */
async function makeWorkpaper(n) {
  const { newWorkpaper, parseWorkpaper, saveWorkpaper } = await import(dist('workpaper/index.js'));
  const { evaluate, proposeConclusion } = await import(dist('evaluation/index.js'));
  const N = 20_000;
  const wp = newWorkpaper('bench', new Date('2026-01-20T09:00:00Z'));
  wp.engagement = { entity: 'Invented Bench Co', periodStart: '2025-01-01', periodEnd: '2025-12-31', reference: 'B-500', preparer: 'Bench Preparer', reviewer: 'Bench Reviewer' };
  wp.control = { id: 'BX-1', description: 'Invoices are approved before payment.', objective: 'Only approved invoices are paid.', owner: 'AP lead', frequency: 'many-times-daily', nature: 'manual', key: true };
  wp.attributes = [
    { id: 'A1', description: 'Approved before payment', deviationDefinition: 'No approval or approval after payment.' },
    { id: 'A2', description: 'Matched to a receipt', deviationDefinition: 'No receipt.' },
  ];
  wp.population = {
    description: 'invoices of 2025', samplingUnit: 'one invoice',
    source: { kind: 'csv', path: 'invoices.csv', keyColumn: 'InvoiceNo' },
    fingerprint: { sha256: 'a'.repeat(64), rowCount: N, firstKey: 'INV-1', lastKey: `INV-${N}`, columns: ['InvoiceNo'], format: 'csv' },
    validation: { ok: true, messages: [] }, tieOut: { ledgerCount: N, countDifference: 0 }, scannedAt: '2026-01-20T09:05:00.000Z',
  };
  wp.approach = { kind: 'statistical', confidence: 0.95, tolerableRate: 0.02, expectedRate: 0.005, model: 'binomial', sizes: [], sampleSize: n, rationale: 'Bench size.' };
  const spares = 10;
  const items = [];
  for (let i = 0; i < n + spares; i++) {
    const pos = Math.floor(((i + 0.5) * N) / (n + spares));
    items.push({ seq: i + 1, role: i < n ? 'sample' : 'spare', position: pos, row: pos + 2, key: `INV-${pos + 1}`, values: {} });
  }
  wp.selection = { method: 'random', algorithm: 'bench', seed: '1', sampleSize: n, spares, items, selectedAt: '2026-01-20T09:10:00.000Z' };
  const results = items.slice(0, n).map((it, i) => ({
    key: it.key,
    seq: it.seq,
    attributes: {
      A1: i % 97 === 3 ? { result: 'deviation', found: 'No approval', cause: 'not-performed', intentional: 'no', pattern: 'isolated' } : { result: 'conforms' },
      A2: { result: 'conforms' },
    },
  }));
  wp.results = { source: 'interview', items: results, recordedAt: '2026-02-10T15:00:00.000Z' };
  wp.evaluation = evaluate(wp, new Date('2026-02-11T10:00:00Z'));
  const { findings: _f, ...conclusion } = proposeConclusion(wp, wp.evaluation, new Date('2026-02-11T10:30:00Z'));
  wp.conclusion = conclusion;
  const dir = mkdtempSync(join(tmpdir(), 'tolrate-memo-bench-'));
  const path = join(dir, `bench-${n}.tolrate.json`);
  const saved = saveWorkpaper(path, parseWorkpaper(JSON.parse(JSON.stringify(wp))), { by: 'bench', step: 'bench' });
  return { wp: saved, path };
}

function stats(times) {
  const s = [...times].sort((a, b) => a - b);
  return { median: s[Math.floor(s.length / 2)], min: s[0], max: s[s.length - 1], n: s.length };
}

function line(name, t, goalMs) {
  const goal = goalMs === undefined ? '' : `  goal < ${goalMs} ms: ${t.median < goalMs ? 'met' : 'NOT met'}`;
  console.log(`${name.padEnd(58)} median ${t.median.toFixed(1).padStart(7)} ms  (min ${t.min.toFixed(1)}, max ${t.max.toFixed(1)}, n=${t.n})${goal}`);
  return t.median;
}

async function warm(name, fn, { reps = 15, warmup = 3, goalMs } = {}) {
  for (let i = 0; i < warmup; i++) await fn();
  const times = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    await fn();
    times.push(performance.now() - t0);
  }
  return line(name, stats(times), goalMs);
}

// A child process that imports the library and renders once: the cold first memo.
function coldScript(path) {
  return `
    import { performance } from 'node:perf_hooks';
    const t0 = performance.now();
    const { loadWorkpaper } = await import(${JSON.stringify(dist('workpaper/index.js'))});
    const { renderMemo } = await import(${JSON.stringify(dist('memo/index.js'))});
    const buf = await renderMemo(loadWorkpaper(${JSON.stringify(path)}), { workpaperPath: ${JSON.stringify(path)} });
    process.stdout.write(String(performance.now() - t0) + ' ' + buf.length);
  `;
}

function timesOf(reps, fn) {
  const out = [];
  for (let i = 0; i < reps; i++) out.push(fn());
  return out;
}

console.log(`node ${process.version}, ${process.platform}/${process.arch}`);
const { renderMemo } = await import(dist('memo/index.js'));
const big = await makeWorkpaper(500);
const small = await makeWorkpaper(78);

const bytes = (await renderMemo(big.wp, { workpaperPath: big.path })).length;
console.log(`500-item memo: ${Math.round(bytes / 1024)} KB`);
const w500 = await warm('renderMemo, 500 items + 10 spares (warm)', () => renderMemo(big.wp, { workpaperPath: big.path }), { goalMs: 1000 });
const w500nc = await warm('renderMemo, 500 items, no chart (warm)', () => renderMemo(big.wp, { workpaperPath: big.path, chart: false }));
const w78 = await warm('renderMemo, 78 items (warm)', () => renderMemo(small.wp, { workpaperPath: small.path }));

const script = join(mkdtempSync(join(tmpdir(), 'tolrate-memo-bench-')), 'cold.mjs');
writeFileSync(script, coldScript(big.path));
const coldTimes = timesOf(7, () => Number(execFileSync(process.execPath, [script], { encoding: 'utf8' }).split(' ')[0]));
const cold = line('first renderMemo in a fresh process, 500 items (cold)', stats(coldTimes), 1000);

const cli = line(
  'node dist/cli.js memo FILE, 500 items (whole process)',
  stats(
    timesOf(7, () => {
      const t0 = performance.now();
      execFileSync(process.execPath, [dist('cli.js'), 'memo', big.path], { stdio: 'pipe' });
      return performance.now() - t0;
    }),
  ),
  1000,
);

console.log('');
console.log(`ratios: 500 / 78 items (warm) = ${(w500 / w78).toFixed(2)}; chart share of the 500-item memo = ${(((w500 - w500nc) / w500) * 100).toFixed(0)}%; cold / warm = ${(cold / w500).toFixed(1)}; CLI / warm = ${(cli / w500).toFixed(1)}`);
