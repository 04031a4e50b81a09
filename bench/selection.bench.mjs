#!/usr/bin/env node
// Population and selection benchmark: `tolrate select` on a 1,000,000-row CSV (about 47 MiB)
// against the shell baseline `sha256sum FILE; shuf -n 60 FILE`, in one run, alternating.
//
//   npm run build && node bench/selection.bench.mjs [--runs 7] [--rows 1000000] [--file PATH]
//
// The population is generated (once) in $TMPDIR/tolrate-bench by bench/make-population.mjs and is
// never committed. Wall time is measured around each child process (medians of --runs runs, after
// one warm-up run of each case). Peak memory (max RSS) comes from `/usr/bin/time -f %M` when it
// exists; otherwise tolrate is started through a small wrapper that prints
// process.resourceUsage().maxRSS at exit, and the shell baseline shows n/a.
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, rmSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { defaultPath, makePopulation } from './make-population.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..');
const cli = join(root, 'dist', 'cli.js');

const argv = process.argv.slice(2);
const opt = (name, dflt) => {
  const i = argv.indexOf(`--${name}`);
  return i >= 0 && argv[i + 1] ? argv[i + 1] : dflt;
};
const runs = Number(opt('runs', '7'));
const rows = Number(opt('rows', '1000000'));
const file = opt('file', defaultPath(rows));
const SAMPLE = 60;

if (!existsSync(cli)) {
  console.error('dist/cli.js is missing: run `npm run build` first.');
  process.exit(2);
}
if (!existsSync(file)) {
  console.error(`Generating ${rows.toLocaleString('en-US')} rows in ${file} ...`);
  await makePopulation(rows, file);
}
const outDir = join(tmpdir(), 'tolrate-bench', 'out');
mkdirSync(outDir, { recursive: true });
const hasTime = existsSync('/usr/bin/time');

// Without /usr/bin/time: run the CLI inside a wrapper that reports its own peak memory (KiB).
const WRAP = `process.on('exit', () => process.stderr.write('\\n' + process.resourceUsage().maxRSS + '\\n')); await import(${JSON.stringify(new URL('../dist/cli.js', import.meta.url).href)});`;

function measure(cmd, args) {
  let full;
  if (hasTime) full = ['/usr/bin/time', ['-f', '%M', cmd, ...args]];
  else if (cmd === process.execPath) full = [cmd, ['--input-type=module', '-e', WRAP, 'tolrate', ...args.slice(1)]];
  else full = [cmd, args];
  const t0 = process.hrtime.bigint();
  const r = spawnSync(full[0], full[1], { encoding: 'utf8', maxBuffer: 64 << 20 });
  const ms = Number(process.hrtime.bigint() - t0) / 1e6;
  if (r.status !== 0) {
    console.error(`${cmd} ${args.join(' ')} failed (${r.status}):\n${r.stderr}`);
    process.exit(1);
  }
  let kb;
  if (hasTime || cmd === process.execPath) {
    const lines = r.stderr.trim().split('\n');
    kb = Number(lines[lines.length - 1]);
    if (!Number.isFinite(kb)) kb = undefined;
  }
  return { ms, mib: kb !== undefined ? kb / 1024 : undefined };
}

const cases = [
  { name: 'shell baseline: sha256sum FILE; shuf -n 60 FILE', cmd: 'bash', args: ['-c', `sha256sum "$0" >/dev/null; shuf -n ${SAMPLE} "$0" >/dev/null`, file] },
  {
    name: 'tolrate select, key only',
    cmd: process.execPath,
    args: [cli, 'select', '--population', file, '--key', 'invoice_no', '--size', String(SAMPLE), '--seed', '20240131', '--force', '--out', join(outDir, 'key-only.csv')],
  },
  {
    name: 'tolrate select, key + amount total + dates',
    cmd: process.execPath,
    args: [cli, 'select', '--population', file, '--key', 'invoice_no', '--amount', 'amount', '--date', 'date', '--size', String(SAMPLE), '--seed', '20240131', '--force', '--out', join(outDir, 'full.csv')],
  },
];

// Warm the page cache and the compiled code paths once.
for (const c of cases) measure(c.cmd, c.args);
const results = cases.map(() => ({ ms: [], mib: [] }));
for (let r = 0; r < runs; r++) {
  cases.forEach((c, i) => {
    const m = measure(c.cmd, c.args);
    results[i].ms.push(m.ms);
    if (m.mib !== undefined) results[i].mib.push(m.mib);
  });
}
const median = (xs) => {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
};
const base = median(results[0].ms);
const size = statSync(file).size;
console.log(`Population: ${file} (${rows.toLocaleString('en-US')} rows, ${(size / 1048576).toFixed(1)} MiB); ${runs} runs each, alternating; node ${process.version}`);
console.log('');
console.log(`${'case'.padEnd(48)} ${'median ms'.padStart(10)} ${'ratio'.padStart(6)} ${'peak MiB'.padStart(9)}`);
cases.forEach((c, i) => {
  const med = median(results[i].ms);
  const peak = results[i].mib.length ? Math.max(...results[i].mib).toFixed(0) : 'n/a';
  console.log(`${c.name.padEnd(48)} ${med.toFixed(0).padStart(10)} ${(med / base).toFixed(2).padStart(6)} ${String(peak).padStart(9)}`);
});
console.log('');
console.log('Goal: tolrate at most 2.5x the shell baseline, peak memory below 200 MiB.');
if (argv.includes('--clean')) rmSync(join(tmpdir(), 'tolrate-bench'), { recursive: true, force: true });
