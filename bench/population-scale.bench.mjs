#!/usr/bin/env node
// Populations at full size: `tolrate select` on CSV extracts of 1,000,000 and 10,000,000 rows,
// a 10,000,000-row CSV with every key on two rows, an XLSX workbook of 1,048,575 rows (the most
// a worksheet holds below its header), and a hostile workbook whose shared strings unpack to
// 1 GiB; each against a yardstick timed in the same run, alternating:
//   CSV:  sha256sum FILE; shuf -n 60 FILE
//   XLSX: unzip -p FILE xl/worksheets/sheet1.xml | wc -c   (only unpacking the sheet's XML)
//
//   npm run build && node bench/population-scale.bench.mjs [--runs 5] [--only csv|dup|xlsx|hostile]
//
// The files are generated into a fresh temporary folder (bench/make-population.mjs,
// bench/make-workbook.mjs; about 1.1 GB in all) and the folder is deleted at the end. Wall time
// is measured around each child process; peak memory is the child's max RSS from
// `/usr/bin/time -f %M`. Medians of --runs runs after one warm-up run of each case (the case
// with every key twice, a memory figure, runs once).
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { makePopulation } from './make-population.mjs';
import { makeHostileWorkbook, makeWorkbook } from './make-workbook.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const cli = join(here, '..', 'dist', 'cli.js');
const argv = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = argv.indexOf(`--${name}`);
  return i >= 0 && argv[i + 1] ? argv[i + 1] : dflt;
};
const runs = Number(opt('runs', '5'));
const only = opt('only', '');
if (!existsSync(cli)) {
  console.error('dist/cli.js is missing: run `npm run build` first.');
  process.exit(2);
}
if (!existsSync('/usr/bin/time')) {
  console.error('This benchmark needs /usr/bin/time (GNU time) for the peak memory.');
  process.exit(2);
}

const dir = mkdtempSync(join(tmpdir(), 'tolrate-scale-'));
const cleanup = () => rmSync(dir, { recursive: true, force: true });
process.on('exit', cleanup);
process.on('SIGINT', () => process.exit(130));

function measure(args, okCodes = [0]) {
  const t0 = process.hrtime.bigint();
  const r = spawnSync('/usr/bin/time', ['-f', '%M', ...args], { encoding: 'utf8', maxBuffer: 64 << 20 });
  const ms = Number(process.hrtime.bigint() - t0) / 1e6;
  if (!okCodes.includes(r.status)) {
    console.error(`${args.join(' ')} failed (${r.status}):\n${r.stderr}`);
    process.exit(1);
  }
  const lines = r.stderr.trim().split('\n');
  return { ms, mib: Number(lines[lines.length - 1]) / 1024, out: r.stdout, err: r.stderr };
}

const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};

/** Run cases alternately; returns [{name, ms (median), mib (max), last}] */
function compare(cases, n = runs, warm = true) {
  if (warm) for (const c of cases) c.last = measure(c.args, c.ok);
  const res = cases.map(() => ({ ms: [], mib: [] }));
  for (let r = 0; r < n; r++) {
    cases.forEach((c, i) => {
      const m = measure(c.args, c.ok);
      res[i].ms.push(m.ms);
      res[i].mib.push(m.mib);
      c.last = m;
    });
  }
  return cases.map((c, i) => ({ name: c.name, ms: median(res[i].ms), mib: Math.max(...res[i].mib), last: c.last }));
}

const SAMPLE = 60;
const select = (file, out, ...more) => [
  process.execPath, cli, 'select', '--population', file, '--size', String(SAMPLE), '--seed', '20240131', '--force', '--out', join(dir, out), ...more,
];
const shell = (file) => ['bash', '-c', `sha256sum "$0" >/dev/null; shuf -n ${SAMPLE} "$0" >/dev/null`, file];

const table = [];
const row = (size, r, base) => table.push([size, r.name, r.ms, base ? r.ms / base : NaN, r.mib]);

console.log(`node ${process.version}, ${runs} runs each after a warm-up, alternating; files in ${dir}`);

const csvTimes = {};
if (!only || only === 'csv') {
  for (const rows of [1_000_000, 10_000_000]) {
    const file = join(dir, `invoices-${rows}.csv`);
    await makePopulation(rows, file);
    const mb = (statSync(file).size / 1e6).toFixed(0);
    const [b, k, f] = compare([
      { name: 'sha256sum FILE; shuf -n 60 FILE', args: shell(file) },
      { name: 'tolrate select, key only', args: select(file, 'k.csv', '--key', 'invoice_no') },
      { name: 'tolrate select, key + amount total + dates', args: select(file, 'f.csv', '--key', 'invoice_no', '--amount', 'amount', '--date', 'date') },
    ]);
    const size = `CSV ${rows.toLocaleString('en-US')} rows (${mb} MB)`;
    row(size, b, b.ms);
    row(size, k, b.ms);
    row(size, f, b.ms);
    csvTimes[rows] = { key: k.ms, full: f.ms };
    rmSync(file);
  }
}

if (!only || only === 'dup') {
  const rows = 10_000_000;
  const file = join(dir, 'twice.csv');
  await makePopulation(rows, file, { twice: true });
  const [b, d] = compare([
    { name: 'sha256sum FILE; shuf -n 60 FILE', args: shell(file) },
    // Exit code 2: the validation lists the duplicates and stops the selection.
    { name: 'tolrate select, every key on two rows (refused, duplicates listed)', args: select(file, 'd.csv', '--key', 'invoice_no'), ok: [2] },
  ], 1, false); // a memory figure; one run (it reads the file once for each part of the confirming pass)
  const size = `CSV ${rows.toLocaleString('en-US')} rows, every key twice`;
  row(size, b, b.ms);
  row(size, d, b.ms);
  const m = /([\d,]+) keys appear on more than one row \(([\d,]+) rows in all\)/.exec(d.last.out);
  console.log(`duplicate report: ${m ? `${m[1]} keys, ${m[2]} rows` : 'not found in the output'}`);
  rmSync(file);
}

if (!only || only === 'xlsx') {
  const rows = 1_048_575;
  const file = join(dir, 'invoices.xlsx');
  await makeWorkbook(rows, file);
  const [u, x] = compare([
    { name: 'unzip -p FILE xl/worksheets/sheet1.xml \\| wc -c', args: ['bash', '-c', 'unzip -p "$0" xl/worksheets/sheet1.xml | wc -c >/dev/null', file] },
    { name: 'tolrate select, key + amount total + dates', args: select(file, 'x.csv', '--key', 'Invoice no', '--amount', 'Amount', '--date', 'Date') },
  ]);
  const xml = Number(spawnSync('bash', ['-c', 'unzip -p "$0" xl/worksheets/sheet1.xml | wc -c', file], { encoding: 'utf8' }).stdout.trim());
  const size = `XLSX ${rows.toLocaleString('en-US')} rows (${(statSync(file).size / 1e6).toFixed(0)} MB, sheet XML ${(xml / 1e6).toFixed(0)} MB)`;
  row(size, u, u.ms);
  row(size, x, u.ms);
  rmSync(file);
}

if (!only || only === 'hostile') {
  // Shared strings that unpack to 1 GiB from a few MB: refused at the 64 MiB cap.
  const file = join(dir, 'bomb.xlsx');
  await makeHostileWorkbook(file, 1 << 30);
  const [h] = compare([{ name: 'tolrate select, shared strings of 1 GiB (refused at the cap)', args: select(file, 'h.csv', '--key', 'Invoice no'), ok: [2] }], Math.min(runs, 3));
  const size = `XLSX bomb (${(statSync(file).size / 1e6).toFixed(1)} MB, shared strings 1,074 MB)`;
  row(size, h, 0);
  console.log(`bomb message: ${(h.last.err.split('\n')[0] ?? '').slice(0, 160)}`);
  rmSync(file);
}

console.log('');
console.log(`| population | case | median ms | ratio to yardstick | peak MiB |`);
console.log(`| --- | --- | ---: | ---: | ---: |`);
for (const [size, name, ms, ratio, mib] of table) console.log(`| ${size} | ${name} | ${ms.toFixed(0)} | ${Number.isNaN(ratio) ? '' : ratio.toFixed(2)} | ${mib.toFixed(0)} |`);
if (csvTimes[1_000_000] && csvTimes[10_000_000]) {
  console.log('');
  console.log(`10M / 1M time: key only ${(csvTimes[10_000_000].key / csvTimes[1_000_000].key).toFixed(1)}x, key + amount + dates ${(csvTimes[10_000_000].full / csvTimes[1_000_000].full).toFixed(1)}x (goal: at most 11x)`);
}
console.log('Goals: CSV select within 1.5x its yardstick at both sizes and under 200 MiB; XLSX select at most 5 s and 200 MiB.');
