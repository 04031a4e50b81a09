import { parseFlags, required, type FlagSpec } from '../../cli/args.js';
import { UsageError } from '../../errors.js';
import { expectedDeviations, overrelianceRisk, sampleSize, type SampleSizeResult } from '../../stats/index.js';
import { int, pctExact, pctPlain, pctUp } from '../../util/format.js';
import { parsePercent } from '../../util/percent.js';
import type { CommandContext } from '../types.js';
import { block, CAUTION, modelFlag, modelNote, populationFlag } from './common.js';
import { printResult } from '../output.js';

const SPEC: FlagSpec = {
  confidence: { type: 'string' },
  tolerable: { type: 'string' },
  expected: { type: 'string' },
  population: { type: 'string' },
  model: { type: 'string' },
  json: { type: 'boolean' },
};

export function help(): string {
  return `tolrate size — statistical sample size for an attribute (test of controls)

Usage: tolrate size --confidence PCT --tolerable PCT --expected PCT [--population N]
                    [--model binomial|hypergeometric|poisson] [--json]

Options:
  --confidence PCT   confidence level, e.g. 95 (the risk of overreliance is 100 - PCT)
  --tolerable PCT    tolerable deviation rate, e.g. 6
  --expected PCT     expected deviation rate, e.g. 1 (0 allowed; must be below --tolerable)
  --population N     number of sampling units in the population; switches the default model
                     to hypergeometric (exact for a known population) and also shows the
                     textbook finite population correction for comparison
  --model NAME       binomial (default without --population), hypergeometric (default with it),
                     or poisson (the factor approximation)
  --json             print the result object instead of the text
  -h, --help         show this help

PCT is a percentage: 6, 6% and 6,5 (decimal comma) mean 6%, 6% and 6.5%. A number between 0 and
1 needs its % sign (0.5%): typed bare, 0.05 is refused, since it may have meant 5%.

The size is the smallest n whose risk of overreliance at k_e = ceil(n x expected rate)
deviations does not exceed 100% - confidence. Binomial and Poisson sizes are searched up to
10,000 items; hypergeometric sizes up to the population.

Example:
  tolrate size --confidence 95 --tolerable 6 --expected 1
  tolrate size --confidence 95 --tolerable 6 --expected 1 --population 800

${CAUTION}
`;
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('size', args, SPEC);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const confidence = parsePercent(required('size', p, 'confidence'), '--confidence', { refuseBareFraction: true });
  const tolerableRate = parsePercent(required('size', p, 'tolerable'), '--tolerable', { refuseBareFraction: true });
  const expectedRate = parsePercent(required('size', p, 'expected'), '--expected', { allowZero: true, refuseBareFraction: true });
  if (expectedRate >= tolerableRate) {
    throw new UsageError(
      `tolrate size: --expected (${pctPlain(expectedRate)}) must be below --tolerable (${pctPlain(tolerableRate)}); ` +
        'a sample cannot support reliance when at least the tolerable rate of deviations is expected.',
      ['See: tolrate size --help'],
    );
  }
  const populationSize = populationFlag(p);
  const model = modelFlag('size', p, populationSize);
  const result = sampleSize({
    confidence,
    tolerableRate,
    expectedRate,
    ...(populationSize !== undefined ? { populationSize } : {}),
    ...(model !== undefined ? { model } : {}),
  });
  printResult(ctx, p.values.json === true, result, render);
  return 0;
}

function render(r: SampleSizeResult): string {
  const beta = 1 - r.confidence;
  const n = r.sampleSize;
  const lines: string[] = [];
  lines.push(`Sample size: ${int(n)}`);
  lines.push('');
  const rows: Array<[string, string]> = [
    ['Model', modelNote(r.model, r.populationSize)],
    ['Confidence', `${pctPlain(r.confidence)} (allowable risk of overreliance ${pctPlain(beta)})`],
    ['Tolerable deviation rate', pctPlain(r.tolerableRate)],
    ['Expected deviation rate', pctPlain(r.expectedRate)],
  ];
  if (r.populationSize !== undefined) rows.push(['Population', `${int(r.populationSize)} units`]);
  rows.push([
    'Expected deviations (k_e)',
    `${r.expectedDeviations} = ceil(${int(n)} x ${pctPlain(r.expectedRate)})`,
  ]);
  rows.push([
    'Achieved risk',
    `${pctUp(r.achievedRisk)} (exact ${pctExact(r.achievedRisk)}) with ${r.expectedDeviations} deviation${r.expectedDeviations === 1 ? '' : 's'} in ${int(n)}; ` +
      `not above the allowable ${pctPlain(beta)}`,
  ]);
  if (n > 1) {
    const k1 = expectedDeviations(n - 1, r.expectedRate);
    const prev = overrelianceRisk({
      sampleSize: n - 1,
      deviations: k1,
      tolerableRate: r.tolerableRate,
      model: r.model,
      ...(r.populationSize !== undefined ? { populationSize: r.populationSize } : {}),
    });
    rows.push([`Why not ${int(n - 1)}`, `the risk with ${k1} deviation${k1 === 1 ? '' : 's'} in ${int(n - 1)} would be ${pctUp(prev)} (exact ${pctExact(prev)}), above ${pctPlain(beta)}`]);
  }
  lines.push(...block(rows));
  const fpc = r.finitePopulationCorrection;
  if (fpc && r.populationSize !== undefined) {
    lines.push('');
    lines.push('Textbook approximation, for comparison only (finite population correction of the binomial size):');
    lines.push(
      `  n' = ceil(${int(fpc.binomialSampleSize)} / (1 + ${int(fpc.binomialSampleSize)}/${int(r.populationSize)})) = ${int(fpc.correctedSampleSize)}`,
    );
    if (r.model === 'hypergeometric') {
      lines.push(`The exact hypergeometric size above (${int(n)}) is the one that achieves the planned risk.`);
    }
  }
  lines.push('');
  lines.push(CAUTION);
  return lines.join('\n') + '\n';
}
