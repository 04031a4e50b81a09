// Benchmarks of the plan functions of the statistics engine (two-stage plans, extensions with the
// risk of the procedure followed, planning for both risks, the combined limit over parts) and of
// the size search at very large populations, run against the compiled library in dist/.
//   npm run build && node bench/plans.bench.mjs
// Prints the median (and min/max) wall time of each case over repeated runs, after a warm-up.
// Figures and the machine they were taken on are in bench/README.md ("Plans").
import { performance } from 'node:perf_hooks';
import {
  combinedUpperLimit,
  extensionRisk,
  operatingCharacteristic,
  planForBothRisks,
  sampleSize,
  twoStagePlan,
} from '../dist/stats/index.js';
import { smallestSampleSize } from '../dist/stats/smallest-sample-size.js';
import { riskFunction } from '../dist/stats/risk-function.js';
import { tolerableDeviations } from '../dist/stats/index.js';

function measure(name, fn, { reps = 15, warmup = 3, goalMs } = {}) {
  for (let i = 0; i < warmup; i++) fn();
  const times = [];
  for (let i = 0; i < reps; i++) {
    const t0 = performance.now();
    fn();
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  const median = times[Math.floor(times.length / 2)];
  const goal = goalMs === undefined ? '' : `  goal < ${goalMs} ms: ${median < goalMs ? 'met' : 'NOT met'}`;
  console.log(`${name.padEnd(66)} median ${median.toFixed(3).padStart(9)} ms  (min ${times[0].toFixed(3)}, max ${times[times.length - 1].toFixed(3)}, n=${reps})${goal}`);
  return median;
}

console.log(`node ${process.version}, ${process.platform}/${process.arch}`);

// The size search at very large populations: the hardest cells (expected rate close to the tolerable rate).
const hard = [];
for (const N of [1e6, 1e7, 1e8, 1e9]) {
  for (const [c, t, e] of [[0.95, 0.1, 0.0999], [0.95, 0.05, 0.0499], [0.9, 0.02, 0.0199], [0.95, 0.5, 0.499], [0.95, 0.1, 0.099]]) hard.push([N, c, t, e]);
}
let worst = 0;
let worstCase = '';
for (const [N, c, t, e] of hard) {
  const m = measure(`size hypergeometric N = ${N.toExponential(0)}, ${+(c * 100).toPrecision(6)}% / ${+(t * 100).toPrecision(6)}% / ${+(e * 100).toPrecision(6)}%`, () =>
    sampleSize({ confidence: c, tolerableRate: t, expectedRate: e, populationSize: N }), { reps: 7, warmup: 1, goalMs: 50 });
  if (m > worst) {
    worst = m;
    worstCase = `N = ${N}, ${c} / ${t} / ${e}`;
  }
}
console.log(`slowest size search of the ${hard.length} hard cells: ${worst.toFixed(2)} ms (${worstCase}); goal < 50 ms: ${worst < 50 ? 'met' : 'NOT met'}`);
// For the ratio: the same hard cell by the plain run-by-run scan (what the search did before).
{
  const N = 1e8, T = 0.1, E = 0.099;
  const M = tolerableDeviations(N, T);
  const risk = riskFunction('hypergeometric', T, N);
  const fast = measure('fast path, N = 1e8, 95% / 10% / 9.9%', () => smallestSampleSize(risk, E, 0.05, N, M, { kind: 'hypergeometric', N, M }), { reps: 7, warmup: 1 });
  const plain = measure('plain run scan, same cell (reference for the ratio)', () => smallestSampleSize(risk, E, 0.05, N, M), { reps: 3, warmup: 1 });
  console.log(`ratio plain / fast: ${(plain / fast).toFixed(0)}x`);
}

measure('two-stage plan, binomial 95% / 6% / 1%', () => twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 }));
measure('two-stage plan, hypergeometric N = 1,500, 95% / 6% / 1%', () => twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, populationSize: 1500 }));
measure('two-stage plan, binomial 90% / 5% / 1%', () => twoStagePlan({ confidence: 0.9, tolerableRate: 0.05, expectedRate: 0.01 }));
measure('two-stage plan, binomial 95% / 4% / 2% (single stage 294)', () => twoStagePlan({ confidence: 0.95, tolerableRate: 0.04, expectedRate: 0.02 }), { reps: 7, warmup: 1 });
measure('two-stage plan, binomial 95% / 3% / 2% (single stage 846, c = 18)', () => twoStagePlan({ confidence: 0.95, tolerableRate: 0.03, expectedRate: 0.02 }), { reps: 3, warmup: 1 });
measure('two-stage plan, hypergeometric N = 5,000, 95% / 3% / 2% (single stage 746)', () => twoStagePlan({ confidence: 0.95, tolerableRate: 0.03, expectedRate: 0.02, populationSize: 5000 }), { reps: 3, warmup: 1 });
const plan = twoStagePlan({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 }).plan;
measure('operating characteristic of that plan, 41 rates', () => operatingCharacteristic({ plan }));
measure('extension risk, binomial 78 / 2 at 6%, 95% (once and repeated)', () => extensionRisk({ sampleSize: 78, deviations: 2, tolerableRate: 0.06, confidence: 0.95 }));
measure('extension risk, hypergeometric N = 3,412, 77 / 2 at 6%, 95%', () => extensionRisk({ sampleSize: 77, deviations: 2, tolerableRate: 0.06, confidence: 0.95, populationSize: 3412 }));
measure('plan for both risks, 95% / 6% / 1%, underreliance 10%', () => planForBothRisks({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01, underrelianceRisk: 0.1 }));
measure('plan for both risks, 95% / 3% / 1%, underreliance 5%', () => planForBothRisks({ confidence: 0.95, tolerableRate: 0.03, expectedRate: 0.01, underrelianceRisk: 0.05 }));
measure('combined limit, 2 parts (2,400 / 50 / 1 and 1,000 / 25 / 0)', () =>
  combinedUpperLimit({ parts: [{ populationSize: 2400, sampleSize: 50, deviations: 1 }, { populationSize: 1000, sampleSize: 25, deviations: 0 }], confidence: 0.95 }), { reps: 7, warmup: 1 });
measure('combined limit, 3 parts (800/40/1, 600/30/0, 500/25/1)', () =>
  combinedUpperLimit({ parts: [{ populationSize: 800, sampleSize: 40, deviations: 1 }, { populationSize: 600, sampleSize: 30, deviations: 0 }, { populationSize: 500, sampleSize: 25, deviations: 1 }], confidence: 0.95 }), { reps: 7, warmup: 1 });
