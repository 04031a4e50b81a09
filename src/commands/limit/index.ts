import { parseFlags, required, type FlagSpec } from '../../cli/args.js';
import { NoPracticalSizeError, UsageError } from '../../errors.js';
import {
  decision,
  extensionSize,
  overrelianceRisk,
  tolerableDeviations,
  upperLimit,
  type DecisionResult,
  type UpperLimitResult,
} from '../../stats/index.js';
import { int, pct, pctExact, pctLimit, pctPlain, pctUp } from '../../util/format.js';
import { parseCount, parsePercent } from '../../util/percent.js';
import type { CommandContext } from '../types.js';
import { block, CAUTION, modelFlag, modelNote, populationFlag, wrap } from '../size/common.js';

const SPEC: FlagSpec = {
  sample: { type: 'string' },
  deviations: { type: 'string' },
  confidence: { type: 'string' },
  tolerable: { type: 'string' },
  population: { type: 'string' },
  model: { type: 'string' },
  json: { type: 'boolean' },
};

export function help(): string {
  return `tolrate limit — evaluate an attribute: upper deviation limit, risk of overreliance, decision

Usage: tolrate limit --sample N --deviations K --confidence PCT [--tolerable PCT]
                     [--population N] [--model binomial|hypergeometric|poisson] [--json]

Options:
  --sample N         items tested (the sample size)
  --deviations K     deviations found in them
  --confidence PCT   confidence level, e.g. 95
  --tolerable PCT    tolerable deviation rate, e.g. 6; adds the risk of overreliance at that
                     rate, the decision and the extension the sample would need
  --population N     number of units in the population (default model becomes hypergeometric)
  --model NAME       binomial (default without --population), hypergeometric, or poisson
  --json             print the result object instead of the text
  -h, --help         show this help

PCT is a percentage: 6, 6% and 6,5 (decimal comma) mean 6%, 6% and 6.5%. A number between 0 and
1 needs its % sign (0.5%): typed bare, 0.05 is refused, since it may have meant 5%.

The upper deviation limit is one-sided: binomial Clopper-Pearson, the hypergeometric count
limit M*/N for a known population, or the Poisson factor; it is shown rounded UP to 0.1%.
The results support the planned reliance when the risk of overreliance at the tolerable rate
does not exceed 100% - confidence (the same as the limit not exceeding the tolerable rate).

Example:
  tolrate limit --sample 78 --deviations 2 --confidence 95 --tolerable 6

${CAUTION}
`;
}

/** The --json object when --tolerable is given: the limit result plus the evaluation. */
export interface LimitEvaluation extends UpperLimitResult {
  tolerableRate: number;
  overrelianceRisk: number;
  decision: DecisionResult;
  /** Additional items needed with no further deviations; null when not practical. */
  extensionSize: number | null;
  extensionNote?: string;
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('limit', args, SPEC);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const sampleSize = parseCount(required('limit', p, 'sample'), '--sample', { min: 1 });
  const deviations = parseCount(required('limit', p, 'deviations'), '--deviations');
  const confidence = parsePercent(required('limit', p, 'confidence'), '--confidence', { refuseBareFraction: true });
  const tol = p.values.tolerable;
  const tolerableRate = typeof tol === 'string' ? parsePercent(tol, '--tolerable', { refuseBareFraction: true }) : undefined;
  const populationSize = populationFlag(p);
  const model = modelFlag('limit', p, populationSize);
  if (deviations > sampleSize) {
    throw new UsageError(`tolrate limit: --deviations (${deviations}) cannot exceed --sample (${sampleSize}).`, [
      'See: tolrate limit --help',
    ]);
  }
  if (populationSize !== undefined && sampleSize > populationSize) {
    throw new UsageError(`tolrate limit: --sample (${sampleSize}) cannot exceed --population (${populationSize}).`, [
      'See: tolrate limit --help',
    ]);
  }
  const common = {
    sampleSize,
    deviations,
    ...(populationSize !== undefined ? { populationSize } : {}),
    ...(model !== undefined ? { model } : {}),
  };
  const limit = upperLimit({ ...common, confidence });
  if (tolerableRate === undefined) {
    if (p.values.json) ctx.stdout.write(`${JSON.stringify(limit, null, 2)}\n`);
    else ctx.stdout.write(render(limit, undefined));
    return 0;
  }
  const risk = overrelianceRisk({ ...common, model: limit.model, tolerableRate });
  const dec = decision({ achievedRisk: risk, confidence });
  const evaluation: LimitEvaluation = {
    ...limit,
    tolerableRate,
    overrelianceRisk: risk,
    decision: dec,
    extensionSize: null,
  };
  try {
    evaluation.extensionSize = extensionSize({ ...common, model: limit.model, tolerableRate, confidence });
  } catch (e) {
    if (!(e instanceof NoPracticalSizeError)) throw e;
    evaluation.extensionNote = e.message;
  }
  if (p.values.json) ctx.stdout.write(`${JSON.stringify(evaluation, null, 2)}\n`);
  else ctx.stdout.write(render(limit, evaluation));
  return 0;
}

function render(limit: UpperLimitResult, ev: LimitEvaluation | undefined): string {
  const { sampleSize: n, deviations: k, confidence } = limit;
  const beta = 1 - confidence;
  const lines: string[] = [];
  const shown = pctLimit(limit.rate, ev?.tolerableRate);
  lines.push(`Upper deviation limit: ${shown} at ${pctPlain(confidence)} confidence (one-sided)`);
  lines.push('');
  const rows: Array<[string, string]> = [
    ['Model', modelNote(limit.model, limit.populationSize)],
    ['Sample size', int(n)],
    ['Deviations', int(k)],
    ['Sample deviation rate', `${pct(k / n)} (${int(k)} / ${int(n)})`],
    ['Upper deviation limit', `${shown} (exact ${pctExact(limit.rate)}, shown rounded up)`],
  ];
  if (limit.populationSize !== undefined) rows.splice(1, 0, ['Population', `${int(limit.populationSize)} units`]);
  if (limit.deviationsInPopulation !== undefined && limit.populationSize !== undefined) {
    rows.push([
      'Deviations in population',
      `at most ${int(limit.deviationsInPopulation)} of ${int(limit.populationSize)} at this confidence`,
    ]);
  }
  if (ev) {
    rows.push(['Tolerable deviation rate', pctPlain(ev.tolerableRate)]);
    if (limit.populationSize !== undefined && limit.model === 'hypergeometric') {
      rows.push(['Tolerable deviations', `${int(tolerableDeviations(limit.populationSize, ev.tolerableRate))} in the population`]);
    }
    rows.push([
      'Risk of overreliance',
      `${pctUp(ev.overrelianceRisk)} (exact ${pctExact(ev.overrelianceRisk)}) at the tolerable rate (allowable ${pctPlain(beta)})`,
    ]);
    if (ev.decision.supported) {
      rows.push(['Extension needed', 'none']);
    } else if (ev.extensionSize !== null) {
      rows.push([
        'Extension needed',
        `${int(ev.extensionSize)} more item${ev.extensionSize === 1 ? '' : 's'} with no further deviations (total ${int(n + ev.extensionSize)})`,
      ]);
    } else {
      rows.push(['Extension needed', 'not practical']);
    }
  }
  lines.push(...block(rows));
  if (ev) {
    lines.push('');
    const lim = pctLimit(limit.rate, ev.tolerableRate);
    const tdr = pctPlain(ev.tolerableRate);
    if (ev.decision.supported) {
      lines.push(...wrap(
        `The results support the planned reliance on the control for this attribute: the upper deviation limit (${lim}) ` +
          `does not exceed the tolerable rate (${tdr}), and the risk of overreliance (${pctUp(ev.overrelianceRisk)}) is within ` +
          `the allowable ${pctPlain(beta)}. Review the cause of every deviation before concluding.`,
      ));
    } else {
      lines.push(...wrap(
        `The results do not support the planned reliance on the control for this attribute: the upper deviation limit (${lim}) ` +
          `exceeds the tolerable rate (${tdr}), and the risk of overreliance (${pctUp(ev.overrelianceRisk)}) is above the ` +
          `allowable ${pctPlain(beta)}.`,
      ));
      if (ev.extensionSize === null && ev.extensionNote) lines.push(...wrap(ev.extensionNote));
      lines.push(...wrap(
        'Options: extend the sample (if no further deviations are expected), test a compensating control, or reduce the ' +
          'planned reliance and expand the substantive work; consider whether the deviations indicate a deficiency.',
      ));
    }
  }
  lines.push('');
  lines.push(CAUTION);
  return lines.join('\n') + '\n';
}
