import { parseFlags, required, type FlagSpec } from '../args.js';
import { UsageError } from '../../errors.js';
import {
  acceptanceNumber,
  decision,
  extensionRisk,
  limitDecision,
  overrelianceRisk,
  tolerableDeviations,
  underrelianceRisk,
  upperLimit,
  type DecisionResult,
  type ExtensionRiskResult,
  type LimitDecisionResult,
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
  expected: { type: 'string' },
  population: { type: 'string' },
  model: { type: 'string' },
  json: { type: 'boolean' },
};

export function help(): string {
  return `tolrate limit — evaluate an attribute: upper deviation limit, risk of overreliance, decision

Usage: tolrate limit --sample N --deviations K --confidence PCT [--tolerable PCT [--expected PCT]]
                     [--population N] [--model binomial|hypergeometric|poisson] [--json]

Options:
  --sample N         items tested (the sample size)
  --deviations K     deviations found in them
  --confidence PCT   confidence level, e.g. 95
  --tolerable PCT    tolerable deviation rate, e.g. 6; adds the risk of overreliance at that
                     rate, the decision and, when the results do not support reliance, the
                     exact risk of extending the sample
  --expected PCT     expected deviation rate (with --tolerable), e.g. 1; adds the risk of
                     underreliance of this sample at that rate
  --population N     number of units in the population (default model becomes hypergeometric)
  --model NAME       binomial (default without --population), hypergeometric, or poisson
  --json             print the result object instead of the text
  -h, --help         show this help

PCT is a percentage: 6, 6% and 6,5 (decimal comma) mean 6%, 6% and 6.5%. A number between 0 and
1 needs its % sign (0.5%): typed bare, 0.05 is refused, since it may have meant 5%.

The upper deviation limit is one-sided: binomial Clopper-Pearson, the hypergeometric count
limit M*/N for a known population, or the Poisson factor; it is shown rounded UP to 0.1%.
The results support the planned reliance when the risk of overreliance at the tolerable rate
does not exceed 100% - confidence: the same as the limit not exceeding the tolerable rate
(binomial, Poisson) or being below it (hypergeometric, where the limit is a count and can
equal the tolerable rate).

An extension decided after the results are seen is a second look: its true risk of
overreliance is that of the whole procedure ("test n; if the results do not support reliance,
extend and rely only if none of the added items deviates"), computed exactly and shown beside
the planned risk. The number of items that would be needed if the extended sample had been
planned in advance is shown as a labelled figure only.

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
  /** The rule and how the limit stands against the tolerable rate. */
  limitDecision: LimitDecisionResult;
  /**
   * The single-stage extension figure (items needed, none deviating, as if planned in advance);
   * null when none is offered. Not a statement that an extension would support reliance: see
   * `extension.procedureRisk`.
   */
  extensionSize: number | null;
  extensionNote?: string;
  /** When the results do not support reliance: the exact risk of the extension procedure. */
  extension?: ExtensionRiskResult;
  /** With --expected: the acceptance number of this sample and its risk of underreliance. */
  expectedRate?: number;
  acceptanceNumber?: number | null;
  underrelianceRisk?: number;
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
  const exp = p.values.expected;
  const expectedRate = typeof exp === 'string' ? parsePercent(exp, '--expected', { allowZero: true, refuseBareFraction: true }) : undefined;
  if (expectedRate !== undefined && tolerableRate === undefined) {
    throw new UsageError('tolrate limit: --expected needs --tolerable (the risk of underreliance is that of the plan at both rates).', [
      'See: tolrate limit --help',
    ]);
  }
  if (expectedRate !== undefined && tolerableRate !== undefined && expectedRate >= tolerableRate) {
    throw new UsageError(
      `tolrate limit: --expected (${pctPlain(expectedRate)}) must be below --tolerable (${pctPlain(tolerableRate)}).`,
      ['See: tolrate limit --help'],
    );
  }
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
    limitDecision: limitDecision({ ...common, model: limit.model, tolerableRate, confidence }),
    extensionSize: dec.supported ? 0 : null,
  };
  if (!dec.supported) {
    const ext = extensionRisk({ ...common, model: limit.model, tolerableRate, confidence });
    evaluation.extension = ext;
    evaluation.extensionSize = ext.extensionSize;
    if (ext.note) evaluation.extensionNote = ext.note;
  }
  if (expectedRate !== undefined) {
    const c = acceptanceNumber({ ...common, model: limit.model, tolerableRate, confidence });
    evaluation.expectedRate = expectedRate;
    evaluation.acceptanceNumber = c;
    evaluation.underrelianceRisk =
      c === null
        ? 1
        : underrelianceRisk({ sampleSize, acceptanceNumber: c, expectedRate, model: limit.model, ...(populationSize !== undefined ? { populationSize } : {}) });
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
    if (ev.expectedRate !== undefined && ev.underrelianceRisk !== undefined) {
      rows.push([
        'Risk of underreliance',
        ev.acceptanceNumber === null
          ? `100% at the expected rate ${pctPlain(ev.expectedRate)}: ${int(n)} items cannot support reliance even with no deviation`
          : `${pctUp(ev.underrelianceRisk)} (exact ${pctExact(ev.underrelianceRisk)}): the chance that ${int(n)} items show more than ` +
            `${ev.acceptanceNumber} deviation${ev.acceptanceNumber === 1 ? '' : 's'} (and so do not support reliance) if the control ` +
            `works at the expected rate ${pctPlain(ev.expectedRate)}`,
      ]);
    }
    const ext = ev.extension;
    if (ev.decision.supported) {
      rows.push(['Extension', 'none needed']);
    } else if (ext) {
      if (ext.extensionSize !== null && ext.totalSize !== null && ext.singleStageFigure !== null) {
        rows.push([
          'Extension figure',
          `${int(ext.extensionSize)} more item${ext.extensionSize === 1 ? '' : 's'}, none deviating (total ${int(ext.totalSize)}): ` +
            `the number that would bring the risk to ${pctUp(ext.singleStageFigure)} if the ${int(ext.totalSize)} items had been one ` +
            'sample planned in advance; an extension decided now is not',
        ]);
      } else {
        rows.push(['Extension figure', 'none offered (see below)']);
      }
      if (ext.extensionSize !== null) rows.push([
        'Risk of extending',
        `${pctUp(ext.procedureRisk)} (exact ${pctExact(ext.procedureRisk)}), not the planned ${pctPlain(beta)}: the risk of overreliance of ` +
          `"test ${int(n)}; if the results do not support reliance, extend and rely only if none of the added items deviates"`,
      ]);
      if (ext.extensionSize !== null) rows.push([
        'Extending again',
        `${pctUp(ext.repeatedProcedureRisk)} (exact ${pctExact(ext.repeatedProcedureRisk)}) if the sample is extended again after each extension that finds a deviation`,
      ]);
    }
  }
  lines.push(...block(rows, '  ', 110));
  if (ev) {
    lines.push('');
    const lim = pctLimit(limit.rate, ev.tolerableRate);
    const tdr = pctPlain(ev.tolerableRate);
    const below = ev.limitDecision.rule === 'below';
    if (ev.decision.supported) {
      lines.push(...wrap(
        `The results support the planned reliance on the control for this attribute: the upper deviation limit (${lim}) ` +
          `${below ? 'is below' : 'does not exceed'} the tolerable rate (${tdr}), and the risk of overreliance (${pctUp(ev.overrelianceRisk)}) is within ` +
          `the allowable ${pctPlain(beta)}. Review the cause of every deviation before concluding.`,
      ));
    } else {
      const relation = below
        ? ev.limitDecision.relation === 'equal'
          ? 'is not below the tolerable rate (it equals it'
          : 'is not below the tolerable rate (it exceeds it'
        : 'exceeds the tolerable rate (';
      lines.push(...wrap(
        `The results do not support the planned reliance on the control for this attribute: the upper deviation limit (${lim}) ` +
          `${relation}${relation.endsWith('(') ? '' : ', '}${tdr}), and the risk of overreliance (${pctUp(ev.overrelianceRisk)}) is above the ` +
          `allowable ${pctPlain(beta)}.`,
      ));
      if (ev.extensionSize === null && ev.extensionNote) lines.push(...wrap(ev.extensionNote));
      const offered = ev.extension !== undefined && ev.extension.extensionSize !== null;
      lines.push(...wrap(
        'Options: test a compensating control, or reduce the planned reliance and expand the substantive work' +
          (offered ? `; an extension carries the risk of extending shown above, not the planned ${pctPlain(beta)}` : '') +
          '. Consider whether the deviations indicate a deficiency.',
      ));
    }
  }
  lines.push('');
  lines.push(CAUTION);
  return lines.join('\n') + '\n';
}
