import { parseFlags, required, type FlagSpec } from '../args.js';
import { UsageError } from '../../errors.js';
import {
  expectedDeviations,
  overrelianceRisk,
  planForBothRisks,
  sampleSize,
  twoStagePlan,
  type BothRisksPlanResult,
  type SampleSizeResult,
  type TwoStagePlanResult,
} from '../../stats/index.js';
import { int, pctExact, pctPlain, pctUp } from '../../util/format.js';
import { parsePercent } from '../../util/percent.js';
import type { CommandContext } from '../types.js';
import { block, CAUTION, modelFlag, modelNote, populationFlag, wrap } from './common.js';
import { printResult } from '../output.js';

const SPEC: FlagSpec = {
  confidence: { type: 'string' },
  tolerable: { type: 'string' },
  expected: { type: 'string' },
  population: { type: 'string' },
  model: { type: 'string' },
  underreliance: { type: 'string' },
  'two-stage': { type: 'boolean' },
  json: { type: 'boolean' },
};

export function help(): string {
  return `tolrate size — statistical sample size for an attribute (test of controls)

Usage: tolrate size --confidence PCT --tolerable PCT --expected PCT [--population N]
                    [--model binomial|hypergeometric|poisson] [--underreliance PCT | --two-stage]
                    [--json]

Options:
  --confidence PCT   confidence level, e.g. 95 (the risk of overreliance is 100 - PCT)
  --tolerable PCT    tolerable deviation rate, e.g. 6
  --expected PCT     expected deviation rate, e.g. 1 (0 allowed; must be below --tolerable)
  --population N     number of sampling units in the population; switches the default model
                     to hypergeometric (exact for a known population) and also shows the
                     textbook finite population correction for comparison
  --model NAME       binomial (default without --population), hypergeometric (default with it),
                     or poisson (the factor approximation)
  --underreliance PCT  plan for both risks: the smallest sample, with the most deviations it
                     may show, whose risk of underreliance (a control working at the expected
                     rate failing the test) is at most PCT, e.g. 10
  --two-stage        plan a two-stage test: the plan with the fewest items on average at the
                     expected rate whose risk of overreliance over both stages is within
                     100% - confidence, and no worse risk of underreliance than one stage
  --json             print the result object instead of the text
  -h, --help         show this help

PCT is a percentage: 6, 6% and 6,5 (decimal comma) mean 6%, 6% and 6.5%. A number between 0 and
1 needs its % sign (0.5%): typed bare, 0.05 is refused, since it may have meant 5%.

The size is the smallest n whose risk of overreliance at k_e = ceil(n x expected rate)
deviations does not exceed 100% - confidence. Binomial and Poisson sizes are searched up to
10,000 items; hypergeometric sizes up to the population. The risk of underreliance is the
chance that a control working at the expected rate shows more deviations than the sample
allows, so that the results would not support reliance. Sizes above 200 get a remark: tests
of controls rarely use more (common practice).

Example:
  tolrate size --confidence 95 --tolerable 6 --expected 1
  tolrate size --confidence 95 --tolerable 6 --expected 1 --population 800
  tolrate size --confidence 95 --tolerable 6 --expected 1 --underreliance 10
  tolrate size --confidence 95 --tolerable 6 --expected 1 --two-stage

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
  const under = typeof p.values.underreliance === 'string' ? parsePercent(p.values.underreliance, '--underreliance') : undefined;
  const common = {
    confidence,
    tolerableRate,
    expectedRate,
    ...(populationSize !== undefined ? { populationSize } : {}),
    ...(model !== undefined ? { model } : {}),
  };
  if (p.values['two-stage'] === true) {
    const plan = twoStagePlan({ ...common, ...(under !== undefined ? { underrelianceRisk: under } : {}) });
    printResult(ctx, p.values.json === true, plan, renderTwoStage);
    return 0;
  }
  if (under !== undefined) {
    printResult(ctx, p.values.json === true, planForBothRisks({ ...common, underrelianceRisk: under }), renderBoth);
    return 0;
  }
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
  rows.push(['Acceptance number', `${r.acceptanceNumber}: the results support reliance with at most ${r.acceptanceNumber} deviation${r.acceptanceNumber === 1 ? '' : 's'} in ${int(n)}`]);
  rows.push(['Risk of underreliance', underWords(r.underrelianceRisk, n, r.acceptanceNumber, r.expectedRate)]);
  lines.push(...block(rows, '  ', 110));
  if (r.sizeRemark) {
    lines.push('');
    lines.push(...wrap(`Remark: ${r.sizeRemark}`));
  }
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

/** The risk of underreliance in plain words. */
function underWords(risk: number, n: number, c: number, expectedRate: number): string {
  return (
    `${pctUp(risk)} (exact ${pctExact(risk)}): the chance that a control working at the expected rate ${pctPlain(expectedRate)} ` +
    `shows more than ${c} deviation${c === 1 ? '' : 's'} in ${int(n)}, so that the results would not support reliance`
  );
}

function renderBoth(r: BothRisksPlanResult): string {
  const beta = 1 - r.confidence;
  const lines: string[] = [];
  lines.push(`Sample size: ${int(r.sampleSize)} (planned for both risks)`);
  lines.push('');
  const rows: Array<[string, string]> = [
    ['Model', modelNote(r.model, r.populationSize)],
    ['Confidence', `${pctPlain(r.confidence)} (allowable risk of overreliance ${pctPlain(beta)})`],
    ['Tolerable deviation rate', pctPlain(r.tolerableRate)],
    ['Expected deviation rate', pctPlain(r.expectedRate)],
    ['Allowed underreliance', `${pctPlain(r.allowedUnderrelianceRisk)} at the expected rate`],
  ];
  if (r.populationSize !== undefined) rows.push(['Population', `${int(r.populationSize)} units`]);
  rows.push(['Acceptance number', `${r.acceptanceNumber}: the results support reliance with at most ${r.acceptanceNumber} deviation${r.acceptanceNumber === 1 ? '' : 's'} in ${int(r.sampleSize)}`]);
  rows.push(['Risk of overreliance', `${pctUp(r.overrelianceRisk)} (exact ${pctExact(r.overrelianceRisk)}) at the tolerable rate; not above ${pctPlain(beta)}`]);
  rows.push(['Risk of underreliance', underWords(r.underrelianceRisk, r.sampleSize, r.acceptanceNumber, r.expectedRate)]);
  lines.push(...block(rows, '  ', 110));
  lines.push('');
  lines.push(...wrap(`It is the smallest sample that keeps both risks within their limits: fewer items would either raise the risk of overreliance above ${pctPlain(beta)} or the risk of underreliance above ${pctPlain(r.allowedUnderrelianceRisk)}.`));
  if (r.sizeRemark) {
    lines.push('');
    lines.push(...wrap(`Remark: ${r.sizeRemark}`));
  }
  lines.push('');
  lines.push(CAUTION);
  return lines.join('\n') + '\n';
}

function renderTwoStage(r: TwoStagePlanResult): string {
  const beta = 1 - r.confidence;
  const p = r.plan;
  const s = (k: number): string => (k === 0 ? 'no deviation' : `${k} deviation${k === 1 ? '' : 's'}`);
  const lines: string[] = [];
  lines.push(`Two-stage plan: ${int(p.firstSampleSize)} items, then ${int(p.secondSampleSize)} more if needed`);
  lines.push('');
  const rows: Array<[string, string]> = [
    ['Model', modelNote(r.model, r.populationSize)],
    ['Confidence', `${pctPlain(r.confidence)} (allowable risk of overreliance ${pctPlain(beta)})`],
    ['Tolerable deviation rate', pctPlain(r.tolerableRate)],
    ['Expected deviation rate', pctPlain(r.expectedRate)],
  ];
  if (r.populationSize !== undefined) rows.push(['Population', `${int(r.populationSize)} units`]);
  rows.push(['First stage', `test ${int(p.firstSampleSize)}: with ${p.firstAcceptanceNumber === 0 ? '' : 'at most '}${s(p.firstAcceptanceNumber)} the results support reliance; with ${p.firstRejectionNumber} or more they do not`]);
  rows.push(['Second stage', `otherwise test ${int(p.secondSampleSize)} more (drawn with the first, tested only when needed): the results support reliance with at most ${s(p.secondAcceptanceNumber)} in all ${int(p.firstSampleSize + p.secondSampleSize)}`]);
  rows.push(['Risk of overreliance', `${pctUp(r.overrelianceRisk)} (exact ${pctExact(r.overrelianceRisk)}) over both stages at the tolerable rate; not above ${pctPlain(beta)}`]);
  rows.push(['Risk of underreliance', `${pctUp(r.underrelianceRisk)} (exact ${pctExact(r.underrelianceRisk)}): the chance that a control working at the expected rate ${pctPlain(r.expectedRate)} fails the test`]);
  rows.push(['Items on average', `${r.averageSampleNumber.toFixed(1)} at the expected rate (second stage needed ${pctUp(r.secondStageProbability)} of the time); at most ${int(r.maximumSampleSize)}`]);
  rows.push(['One stage instead', `${int(r.singleStage.sampleSize)} items, at most ${s(r.singleStage.acceptanceNumber)}; risk of underreliance ${pctUp(r.singleStage.underrelianceRisk)}`]);
  lines.push(...block(rows, '  ', 110));
  lines.push('');
  lines.push(...wrap('Decide before testing that the test has two stages, and follow the plan: a second stage added after the first results are seen is an extension, whose risk is higher (tolrate limit shows it).'));
  if (r.sizeRemark) {
    lines.push('');
    lines.push(...wrap(`Remark: ${r.sizeRemark}`));
  }
  lines.push('');
  lines.push(CAUTION);
  return lines.join('\n') + '\n';
}
