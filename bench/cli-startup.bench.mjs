// Start-up time of the CLI: `node dist/cli.js --help` against a bare `node -e 0`, run side by side
// (alternating) so that both see the same machine load. Goal: --help within 3x the bare start.
// Usage: npm run build && node bench/cli-startup.bench.mjs [--runs 31]
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const cli = fileURLToPath(new URL('../dist/cli.js', import.meta.url));
const i = process.argv.indexOf('--runs');
const runs = i > 0 ? Number(process.argv[i + 1]) : 31;

function time(args) {
  const t0 = process.hrtime.bigint();
  const r = spawnSync(process.execPath, args, { stdio: ['ignore', 'ignore', 'inherit'] });
  if (r.status !== 0) throw new Error(`node ${args.join(' ')} exited ${r.status}`);
  return Number(process.hrtime.bigint() - t0) / 1e6;
}
const median = (xs) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

const cases = { bare: ['-e', '0'], help: [cli, '--help'], version: [cli, '--version'], sizeHelp: [cli, 'size', '--help'], memoHelp: [cli, 'memo', '--help'] };
const samples = Object.fromEntries(Object.keys(cases).map((k) => [k, []]));
for (let w = 0; w < 3; w++) for (const a of Object.values(cases)) time(a);
for (let r = 0; r < runs; r++) for (const [k, a] of Object.entries(cases)) samples[k].push(time(a));

const bare = median(samples.bare);
console.log(`runs: ${runs} each, alternating; node ${process.version}`);
for (const [k, xs] of Object.entries(samples)) {
  const m = median(xs);
  console.log(`${k.padEnd(9)} median ${m.toFixed(1).padStart(6)} ms   ratio to bare node ${(m / bare).toFixed(2)}x`);
}
const ratio = median(samples.help) / bare;
console.log(`goal: tolrate --help within 3x a bare node start: ${ratio <= 3 ? 'met' : 'NOT met'} (${ratio.toFixed(2)}x)`);
