// Cost of one interview save (validate, replay the change log, diff, hash, atomic write) as the
// log grows, on the demo workpaper: one result changed per save, as when results are typed item
// by item. Usage: npm run build && node bench/workpaper-save.bench.mjs [--saves 300]
import { execFileSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadWorkpaper, saveWorkpaper } from '../dist/workpaper/index.js';

const i = process.argv.indexOf('--saves');
const saves = i > 0 ? Number(process.argv[i + 1]) : 300;
const dir = mkdtempSync(join(tmpdir(), 'tolrate-save-bench-'));
execFileSync(process.execPath, [fileURLToPath(new URL('../dist/cli.js', import.meta.url)), 'demo', '--out', dir], { stdio: 'ignore' });
const file = join(dir, 'supplier-invoice-approval.tolrate.json');
let wp = loadWorkpaper(file);
const times = [];
for (let s = 0; s < saves; s++) {
  const j = s % wp.results.items.length;
  const items = wp.results.items.map((it, k) => (k === j ? { ...it, attributes: { ...it.attributes, A1: { result: 'conforms', note: `save ${s}` } } } : it));
  const t0 = performance.now();
  wp = saveWorkpaper(file, { ...wp, results: { ...wp.results, items } }, { by: 'bench', step: 'record' });
  times.push(performance.now() - t0);
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
for (const [from, to] of [[0, 50], [Math.floor(saves / 2) - 25, Math.floor(saves / 2) + 25], [saves - 50, saves]]) {
  console.log(`saves ${from + 1}-${to} (log ${from + 10}-${to + 10} entries): median ${median(times.slice(from, to)).toFixed(1)} ms`);
}
