#!/usr/bin/env node
// Times the population scan (pass 1: fingerprint, validation, amount total, dates, rows by month)
// of two builds in one process, alternating, so a shared machine's load falls on both alike:
//   node bench/compare-scan.mjs OLD_DIST NEW_DIST FILE [RUNS] [COLUMNS_JSON]
// OLD_DIST and NEW_DIST are dist/ folders (e.g. a copy of main's build, and this one's); FILE a
// CSV or XLSX population; COLUMNS_JSON the key, amount and date columns (default: those of
// bench/make-population.mjs). Prints the median of RUNS runs (default 9, after a warm-up) of each.
import { performance } from 'node:perf_hooks';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

const [oldDist, newDist, file, runsText, colsText] = process.argv.slice(2);
if (!oldDist || !newDist || !file) {
  console.error('Usage: node bench/compare-scan.mjs OLD_DIST NEW_DIST FILE [RUNS] [COLUMNS_JSON]');
  process.exit(2);
}
const kind = /\.xlsx$/i.test(file) ? 'xlsx' : 'csv';
const cols = colsText ? JSON.parse(colsText) : { keyColumn: 'invoice_no', amountColumn: 'amount', dateColumn: 'date' };
const runs = Number(runsText ?? 9);
const load = (d) => import(pathToFileURL(resolve(d, 'population', 'index.js')).href);
const libs = { old: await load(oldDist), new: await load(newDist) };
const times = { old: [], new: [] };
for (let i = 0; i <= runs; i++) {
  for (const name of i % 2 ? ['old', 'new'] : ['new', 'old']) {
    const t0 = performance.now();
    await libs[name].scanPopulation({ kind, path: resolve(file), ...cols });
    if (i > 0) times[name].push(performance.now() - t0);
  }
}
const median = (a) => [...a].sort((x, y) => x - y)[Math.floor(a.length / 2)];
const m = { old: median(times.old), new: median(times.new) };
console.log(`${file}: ${runs} runs each, alternating; node ${process.version}`);
console.log(`median ms: old ${m.old.toFixed(0)}, new ${m.new.toFixed(0)}, new / old ${(m.new / m.old).toFixed(3)}`);
for (const name of ['old', 'new']) console.log(`  ${name}: ${times[name].map((x) => x.toFixed(0)).join(' ')}`);
