// Benchmarks of the statistics engine (src/stats), run against the compiled library in dist/.
//   npm run build && node bench/stats.bench.mjs
// Prints the median (and min/max) wall time of each case over repeated runs, after a warm-up.
// Figures and the machine they were taken on are in bench/README.md ("Stats engine").
import { performance } from 'node:perf_hooks';
import {
  expectedDeviations,
  extensionSize,
  overrelianceRisk,
  planningTable,
  sampleSize,
  upperLimit,
} from '../dist/stats/index.js';

function measure(name, fn, { reps = 31, warmup = 5, goalMs } = {}) {
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
  console.log(`${name.padEnd(62)} median ${median.toFixed(3).padStart(8)} ms  (min ${times[0].toFixed(3)}, max ${times[times.length - 1].toFixed(3)}, n=${reps})${goal}`);
  return median;
}

console.log(`node ${process.version}, ${process.platform}/${process.arch}`);
const t95 = measure('planning table 95% (11 x 20, binomial)', () => planningTable({ confidence: 0.95 }), { goalMs: 50 });
const t90 = measure('planning table 90% (11 x 20, binomial)', () => planningTable({ confidence: 0.9 }), { goalMs: 50 });
measure('both planning tables 90% + 95%', () => {
  planningTable({ confidence: 0.9 });
  planningTable({ confidence: 0.95 });
}, { goalMs: 50 });
measure('planning table 95%, hypergeometric N = 5,000', () => planningTable({ confidence: 0.95, populationSize: 5000 }));
measure('size hypergeometric N = 10,000,000 (95% / 5% / 1%)', () =>
  sampleSize({ confidence: 0.95, tolerableRate: 0.05, expectedRate: 0.01, populationSize: 10_000_000 }), { goalMs: 20 });
measure('size hypergeometric N = 10,000,000 (95% / 2% / 1.75% -> 8,684)', () =>
  sampleSize({ confidence: 0.95, tolerableRate: 0.02, expectedRate: 0.0175, populationSize: 10_000_000 }), { reps: 11 });
measure('size binomial 95% / 6% / 1% (-> 78)', () => sampleSize({ confidence: 0.95, tolerableRate: 0.06, expectedRate: 0.01 }));
measure('limit binomial n = 78, k = 2', () => upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95 }));
measure('limit binomial n = 10,000, k = 150', () => upperLimit({ sampleSize: 10_000, deviations: 150, confidence: 0.95 }));
measure('limit Poisson n = 10,000, k = 150', () => upperLimit({ sampleSize: 10_000, deviations: 150, confidence: 0.95, model: 'poisson' }));
measure('limit hypergeometric N = 10,000,000, n = 10,000, k = 150', () =>
  upperLimit({ sampleSize: 10_000, deviations: 150, confidence: 0.95, populationSize: 10_000_000 }));
measure('limit hypergeometric N = 800, n = 78, k = 2', () =>
  upperLimit({ sampleSize: 78, deviations: 2, confidence: 0.95, populationSize: 800 }));
measure('extension binomial n = 78, k = 2, 6% at 95%', () =>
  extensionSize({ sampleSize: 78, deviations: 2, tolerableRate: 0.06, confidence: 0.95 }));
// For the ratio: the same 95% table by the naive search (n = 1, 2, 3, ... up to 10,000, each
// risk evaluated afresh through the public API), which the engine's run-by-run search replaces.
function naiveTable(confidence) {
  const beta = 1 - confidence;
  const cells = [];
  for (const e of [0, 0.0025, 0.005, 0.0075, 0.01, 0.0125, 0.015, 0.0175, 0.02, 0.0225, 0.025, 0.0275, 0.03, 0.0325, 0.035, 0.0375, 0.04, 0.05, 0.06, 0.07]) {
    for (const t of [0.02, 0.03, 0.04, 0.05, 0.06, 0.07, 0.08, 0.09, 0.1, 0.15, 0.2]) {
      let found = null;
      if (e < t) {
        for (let n = 1; n <= 10_000; n++) {
          if (overrelianceRisk({ sampleSize: n, deviations: expectedDeviations(n, e), tolerableRate: t }) <= beta * (1 + 1e-12)) {
            found = n;
            break;
          }
        }
      }
      cells.push(found);
    }
  }
  return cells;
}
const fast = planningTable({ confidence: 0.95 }).rows.flatMap((r) => r.cells.map((c) => c.sampleSize));
const naive = naiveTable(0.95);
console.log(`naive and engine 95% tables agree: ${JSON.stringify(fast) === JSON.stringify(naive)}`);
const tNaive = measure('planning table 95% by naive search (n = 1, 2, 3, ...)', () => naiveTable(0.95), { reps: 3, warmup: 1 });
console.log(`ratio naive / engine (95% table): ${(tNaive / t95).toFixed(0)}x`);
console.log(`ratio 95% table / 90% table: ${(t95 / t90).toFixed(2)}`);
