// Runs every benchmark in bench/ one after the other (the figures are in bench/README.md).
// Usage: npm run bench            (builds first)
//        node bench/run.mjs stats (only the benchmarks whose file name contains "stats")
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const dir = fileURLToPath(new URL('.', import.meta.url));
const only = process.argv[2];
const files = readdirSync(dir).filter((f) => f.endsWith('.bench.mjs') && (!only || f.includes(only))).sort();
let failed = 0;
for (const f of files) {
  process.stdout.write(`\n=== ${f}\n`);
  const r = spawnSync(process.execPath, [`${dir}${f}`], { stdio: 'inherit' });
  if (r.status !== 0) failed++;
}
process.exitCode = failed ? 1 : 0;
