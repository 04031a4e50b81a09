/**
 * Planning, the approach: statistical (confidence, tolerable and expected rates, model; the
 * size the tool computes, why, and what it would be at neighbouring rates) or non-statistical
 * (the firm's sampling policy by control frequency and reliance level). The practitioner
 * accepts the size or enters a larger one with a reason.
 */
import { overrelianceRisk, planForBothRisks, sampleSize, twoStagePlan } from '../stats/index.js';
import type { BothRisksPlanResult, SampleSizeResult, TwoStagePlanResult } from '../stats/index.js';
import { TolrateInputError } from '../errors.js';
import type { Approach, Attribute, Model, SizeForAttribute } from '../workpaper/schema.js';
import { int, pctPlain, pctUp } from '../util/format.js';
import type { Session } from './session.js';
import { lastYearLines } from './carry-forward.js';
import { AnswerError, count, rate, requiredText } from './parse.js';
import { loadPolicy, policySize } from './policy.js';
import { table, wrap } from './show.js';
import { FREQUENCY_LABELS } from './plan-basics.js';
import { askRate } from './rate-question.js';

export const MODEL_LABELS: Record<Model, string> = {
  hypergeometric: 'Hypergeometric (exact for a known population size)',
  binomial: 'Binomial (large or unknown population; a little larger, conservative)',
  poisson: 'Poisson (approximation to the binomial; the factor method)',
};

export function modelWords(model: Model, N: number): string {
  return model === 'hypergeometric' ? `hypergeometric model, N = ${int(N)}` : `${model} model`;
}

/** Size per attribute and the adopted (largest) size. Throws NoPracticalSizeError / SamplingInputError. */
export function sizesFor(
  attributes: readonly Attribute[],
  plan: { confidence: number; tolerableRate: number; expectedRate: number; model: Model; populationSize: number },
): Array<{ attribute: Attribute; tolerableRate: number; result: SampleSizeResult }> {
  return attributes.map((attribute) => {
    const tolerableRate = attribute.tolerableRate ?? plan.tolerableRate;
    const result = sampleSize({
      confidence: plan.confidence,
      tolerableRate,
      expectedRate: plan.expectedRate,
      populationSize: plan.populationSize,
      model: plan.model,
    });
    return { attribute, tolerableRate, result };
  });
}

/** The sizes at neighbouring rates: TDR −1, 0, +1 points × EDR −0.5, 0, +0.5 points. */
export function neighbourGrid(plan: { confidence: number; tolerableRate: number; expectedRate: number; model: Model; populationSize: number }): string[] {
  const round = (x: number) => Number(x.toPrecision(10));
  const tdrs = [-0.01, 0, 0.01].map((d) => round(plan.tolerableRate + d));
  const edrs = [-0.005, 0, 0.005].map((d) => round(plan.expectedRate + d));
  const rows = edrs.map((e) => [
    e < 0 ? '—' : pctPlain(e),
    ...tdrs.map((t) => {
      if (e < 0 || t <= 0 || t >= 1 || e >= t) return '—';
      try {
        return int(sampleSize({ confidence: plan.confidence, tolerableRate: t, expectedRate: e, populationSize: plan.populationSize, model: plan.model }).sampleSize);
      } catch (err) {
        if (err instanceof TolrateInputError) return 'none';
        throw err;
      }
    }),
  ]);
  return table(['Expected \\ Tolerable', ...tdrs.map((t) => (t <= 0 ? '—' : pctPlain(t)))], rows.filter((r) => r[0] !== '—'));
}

export async function askSizeChoice(
  s: Session,
  computed: number,
  N: number,
  what: string,
  old: Approach | undefined,
): Promise<{ size: number; reason?: string }> {
  const a = s.asker;
  const choice = await a.select({
    id: 'plan.approach.size.accept',
    message: `Use a sample of ${int(computed)}?`,
    choices: [
      { value: 'accept', name: `Yes, test ${int(computed)} items` },
      { value: 'other', name: 'Use another size (with a reason)' },
      { value: 'change', name: 'Change the parameters' },
    ],
    default: old && old.sampleSize !== computed ? 'other' : 'accept',
  });
  if (choice === 'change') return { size: -1 };
  if (choice === 'accept') return { size: computed };
  for (;;) {
    const size = await a.text({
      id: 'plan.approach.size.other',
      message: `Sample size to use (the ${what} gives ${int(computed)})`,
      ...(old && old.sampleSize !== computed ? { default: String(old.sampleSize) } : {}),
      parse: count('The sample size', { min: 1, max: N, maxWhat: 'the population size' }),
    });
    if (size < computed) {
      s.print(
        `  Warning: ${int(size)} is smaller than the ${int(computed)} the ${what} gives. With fewer items the planned`,
        `  ${what === 'firm policy' ? 'policy is not followed' : 'risk of overreliance is not achieved'}; the memo will say so.`,
      );
      const sure = await a.confirm({ id: 'plan.approach.size.smallerConfirm', message: `Use ${int(size)} anyway?`, default: false });
      if (!sure) continue;
    }
    if (size === computed) return { size };
    const reason = await a.text({
      id: 'plan.approach.size.reason',
      message: `Why ${int(size)} rather than ${int(computed)}?`,
      parse: requiredText('The reason'),
    });
    return { size, reason };
  }
}

async function statistical(s: Session, old: Approach | undefined): Promise<Approach | undefined> {
  const a = s.asker;
  const attrs = s.wp.attributes!;
  const N = s.wp.population!.fingerprint.rowCount;
  const wasStat = old?.kind === 'statistical' ? old : undefined;
  const confidence = await askRate(a, {
    id: 'plan.approach.confidence',
    message: 'Confidence (%)',
    help: 'Usually 90 or 95. The planned risk of overreliance is 100% minus this.',
    default: wasStat ? pctPlain(wasStat.confidence) : s.folder?.defaults.confidence !== undefined ? pctPlain(s.folder.defaults.confidence) : '95',
    parse: rate('Confidence', { atLeast: 0.5, atLeastWhat: '50%, below which a sample gives no assurance', example: '95' }),
  });
  const own = attrs.filter((x) => x.tolerableRate !== undefined);
  const tolerableRate = await askRate(a, {
    id: 'plan.approach.tolerableRate',
    message: own.length === attrs.length ? 'Tolerable deviation rate (%) for the test (each attribute has its own; this is recorded for the test)' : 'Tolerable deviation rate (%)',
    help: 'The highest deviation rate at which you would still rely on the control as planned, e.g. 5 or 6.',
    ...(wasStat ? { default: pctPlain(wasStat.tolerableRate) } : {}),
    parse: rate('Tolerable rate', { below: 0.5, belowWhat: '50%' }),
  });
  const lowest = Math.min(...attrs.map((x) => x.tolerableRate ?? tolerableRate));
  const lowestId = attrs.find((x) => (x.tolerableRate ?? tolerableRate) === lowest)!.id;
  const lowestWhat = lowest === tolerableRate ? 'the tolerable rate' : `${lowestId}'s own tolerable rate`;
  if (s.wp.carriedForward) s.print(...lastYearLines(s.wp.carriedForward));
  const expectedRate = await askRate(a, {
    id: 'plan.approach.expectedRate',
    message: 'Expected deviation rate (%)',
    help:
      'The deviation rate you expect from prior years or a walkthrough; 0 if none. Must be below the tolerable rate' +
      (lowest === tolerableRate ? '.' : ` and below ${lowestId}'s own tolerable rate of ${pctPlain(lowest)} (set at the Attributes step).`),
    default: wasStat ? pctPlain(wasStat.expectedRate) : '0',
    parse: rate('Expected rate', { allowZero: true, below: lowest, belowWhat: lowestWhat }),
  });
  const model = await a.select<Model>({
    id: 'plan.approach.model',
    message: 'Probability model',
    help: `The population size is known (${int(N)}), so the exact hypergeometric model applies; the binomial gives a slightly larger, conservative size.`,
    choices: (['hypergeometric', 'binomial', 'poisson'] as const).map((m) => ({ value: m, name: MODEL_LABELS[m] })),
    default: wasStat?.model ?? 'hypergeometric',
  });
  const plan = { confidence, tolerableRate, expectedRate, model, populationSize: N };
  let sizes: ReturnType<typeof sizesFor>;
  try {
    sizes = sizesFor(attrs, plan);
  } catch (e) {
    if (e instanceof TolrateInputError) {
      s.print('', `  ${e.message}`, '');
      return undefined;
    }
    throw e;
  }
  const beta = 1 - confidence;
  const top = sizes.reduce((m, x) => (x.result.sampleSize > m.result.sampleSize ? x : m), sizes[0]!);
  const n = top.result.sampleSize;
  s.heading('Sample size');
  s.print(
    ...table(
      ['Attribute', 'Tolerable', 'Size', 'k_e', 'Risk at k_e', 'Allowed', 'Underreliance'],
      sizes.map((x) => [x.attribute.id, pctPlain(x.tolerableRate), int(x.result.sampleSize), String(x.result.expectedDeviations), pctUp(x.result.achievedRisk), pctPlain(beta), pctUp(x.result.underrelianceRisk)]),
    ),
  );
  const why =
    `${int(n)} is the smallest sample for which finding k_e = ⌈${int(n)} × ${pctPlain(expectedRate)}⌉ = ${top.result.expectedDeviations} ` +
    `deviation(s) still leaves the risk of overreliance at ${pctUp(top.result.achievedRisk)} (rounded up), within the ${pctPlain(beta)} allowed at ` +
    `${pctPlain(confidence)} confidence against a tolerable rate of ${pctPlain(top.tolerableRate)} (${modelWords(model, N)}).` +
    (sizes.length > 1 ? ` It is the largest of the attributes' sizes (${top.attribute.id}), so it serves every attribute.` : '') +
    ` The sample supports reliance with up to ${top.result.acceptanceNumber} deviation(s); the risk of underreliance (that a control working at the expected ${pctPlain(expectedRate)} shows more and is not relied on) is ${pctUp(top.result.underrelianceRisk)}.` +
    (top.result.sizeRemark ? ` ${top.result.sizeRemark}` : '');
  s.print('', ...wrap(why, 92, '  '));
  const fpc = top.result.finitePopulationCorrection;
  if (fpc) {
    s.print(
      ...wrap(
        `Beside it, the textbook approximation: the binomial size ${int(fpc.binomialSampleSize)} corrected for the finite population, ` +
          `n' = n / (1 + n/N) = ${int(fpc.correctedSampleSize)}. Shown for comparison only; the size above is the one computed exactly.`,
        92,
        '  ',
      ),
    );
  }
  s.print('', `  Sizes at neighbouring rates (${top.attribute.id}, ${modelWords(model, N)}, ${pctPlain(confidence)} confidence):`);
  s.print(...neighbourGrid({ ...plan, tolerableRate: top.tolerableRate }));
  s.print('');
  const whole = n >= N;
  if (whole) s.print(`  The size reaches the population (${int(N)}): every item is tested.`);
  const perAttr: SizeForAttribute[] = sizes.map((x) => ({
    attributeId: x.attribute.id,
    tolerableRate: x.tolerableRate,
    sampleSize: x.result.sampleSize,
    expectedDeviations: x.result.expectedDeviations,
    achievedRisk: x.result.achievedRisk,
    acceptanceNumber: x.result.acceptanceNumber,
    underrelianceRisk: x.result.underrelianceRisk,
  }));
  const base = {
    kind: 'statistical' as const,
    confidence,
    tolerableRate,
    expectedRate,
    model,
    sizes: perAttr,
    ...(fpc ? { finitePopulationCorrection: { binomialSampleSize: fpc.binomialSampleSize, correctedSampleSize: fpc.correctedSampleSize } } : {}),
  };
  const planned = await askPlan(s, { ...plan, single: top.result, lowest, oneRate: attrs.every((x) => x.tolerableRate === undefined || x.tolerableRate === tolerableRate) }, wasStat);
  if (planned === 'change') return undefined;
  if (planned !== 'single') return { ...base, plan: planned.plan, sampleSize: planned.sampleSize, rationale: planned.rationale };
  const chosen = await askSizeChoice(s, Math.min(n, N), N, 'computation', wasStat);
  if (chosen.size < 0) return undefined;
  const rationale =
    `Statistical sample: ${why}` +
    (fpc ? ` (Textbook finite population correction of the binomial size ${fpc.binomialSampleSize}: ${fpc.correctedSampleSize}, not used.)` : '') +
    (chosen.size !== n ? ` The practitioner adopted ${int(chosen.size)} items instead of ${int(n)}: ${chosen.reason ?? 'the whole population'}.` : '');
  return { ...base, sampleSize: chosen.size, rationale };
}

type PlanParams = { confidence: number; tolerableRate: number; expectedRate: number; model: Model; populationSize: number };
type Planned = 'single' | 'change' | { plan: NonNullable<Approach['plan']>; sampleSize: number; rationale: string };

/** The figures of the ordinary single-stage sample, beside which the other plans are shown. */
function singleRow(single: SampleSizeResult, p: PlanParams & { lowest: number }): string[] {
  // The one-sample size is that of the lowest tolerable rate (the largest size).
  const atC = overrelianceRisk({ sampleSize: single.sampleSize, deviations: single.acceptanceNumber, tolerableRate: p.lowest, model: p.model, ...(p.model === 'hypergeometric' ? { populationSize: p.populationSize } : {}) });
  return ['One sample', int(single.sampleSize), `${single.acceptanceNumber}`, pctUp(atC), pctUp(single.underrelianceRisk), int(single.sampleSize), '—'];
}

function twoStageRow(t: TwoStagePlanResult): string[] {
  const p = t.plan;
  return [
    'Two stages',
    `${int(p.firstSampleSize)} + ${int(p.secondSampleSize)}`,
    `${p.firstAcceptanceNumber} of ${int(p.firstSampleSize)} (${p.firstRejectionNumber}+ fails); ${p.secondAcceptanceNumber} of ${int(p.firstSampleSize + p.secondSampleSize)}`,
    pctUp(t.overrelianceRisk),
    pctUp(t.underrelianceRisk),
    t.averageSampleNumber.toFixed(1),
    pctUp(t.secondStageProbability),
  ];
}

function bothRow(b: BothRisksPlanResult, label: string): string[] {
  return [label, int(b.sampleSize), String(b.acceptanceNumber), pctUp(b.overrelianceRisk), pctUp(b.underrelianceRisk), int(b.sampleSize), '—'];
}

const PLAN_HEADER = ['Plan', 'Items', 'Rely with at most', 'Overreliance', 'Underreliance', 'Expected items', 'Second stage'];

function twoStageWords(t: TwoStagePlanResult, p: PlanParams): string {
  const x = t.plan;
  return (
    `Two-stage plan: test ${int(x.firstSampleSize)} items first. With at most ${x.firstAcceptanceNumber} deviation(s) the control is relied on; ` +
    `with ${x.firstRejectionNumber} or more it is not. Otherwise (${x.firstAcceptanceNumber + 1}${x.firstRejectionNumber - 1 > x.firstAcceptanceNumber + 1 ? ` to ${x.firstRejectionNumber - 1}` : ''} deviation(s)) ` +
    `${int(x.secondSampleSize)} more items are tested and the control is relied on with at most ${x.secondAcceptanceNumber} deviation(s) in all ${int(x.firstSampleSize + x.secondSampleSize)}. ` +
    `Computed exactly over both stages (${modelWords(p.model, p.populationSize)}${p.model === 'hypergeometric' ? ', the second stage drawn from the items the first left untested' : ''}): ` +
    `risk of overreliance ${pctUp(t.overrelianceRisk)} at the tolerable rate of ${pctPlain(p.tolerableRate)} (${pctPlain(1 - p.confidence)} allowed); ` +
    `risk of underreliance ${pctUp(t.underrelianceRisk)} at the expected rate of ${pctPlain(p.expectedRate)} (at most the one-sample plan's ${pctUp(t.allowedUnderrelianceRisk)}); ` +
    `at the expected rate ${t.averageSampleNumber.toFixed(1)} items are tested on average, and the second stage is needed with a chance of ${pctUp(t.secondStageProbability)}. ` +
    `Both stages are selected now (${int(x.firstSampleSize + x.secondSampleSize)} items, the most that may be tested); the second-stage items are tested only when the first stage is inconclusive.`
  );
}

function bothRisksWords(b: BothRisksPlanResult, p: PlanParams): string {
  return (
    `Sample planned for both risks: ${int(b.sampleSize)} items, relying on the control with at most ${b.acceptanceNumber} deviation(s). ` +
    `Risk of overreliance ${pctUp(b.overrelianceRisk)} at the tolerable rate of ${pctPlain(p.tolerableRate)} (${pctPlain(1 - p.confidence)} allowed); ` +
    `risk of underreliance ${pctUp(b.underrelianceRisk)} at the expected rate of ${pctPlain(p.expectedRate)} (${pctPlain(b.allowedUnderrelianceRisk)} accepted); ` +
    `${modelWords(p.model, p.populationSize)}, computed exactly. It is the smallest sample that keeps both risks within those limits.`
  );
}

/**
 * After the sizes are shown: the plan. One sample (the usual); planned for both risks (also limit
 * the risk of underreliance, which the practitioner gives); or two stages (only when every
 * attribute uses the test's one tolerable rate). Each with the figures needed to choose, computed
 * exactly by the engine (twoStagePlan, planForBothRisks).
 */
async function askPlan(s: Session, p: PlanParams & { single: SampleSizeResult; lowest: number; oneRate: boolean }, old: Approach | undefined): Promise<Planned> {
  // Both risks are planned at the lowest tolerable rate: the same n and c then keep the risk of
  // overreliance within β at every attribute's own (higher) rate, and the risk of underreliance is the same.
  const pb: PlanParams = { ...p, tolerableRate: p.lowest };
  const a = s.asker;
  let two: TwoStagePlanResult | undefined;
  let whyNotTwo: string | undefined;
  if (!p.oneRate) whyNotTwo = 'Two stages are not offered: a two-stage plan is searched for one tolerable rate, and some attributes have their own.';
  else {
    try {
      two = twoStagePlan({ confidence: p.confidence, tolerableRate: p.tolerableRate, expectedRate: p.expectedRate, model: p.model, populationSize: p.populationSize });
      if (two.plan.firstSampleSize + two.plan.secondSampleSize > p.populationSize) {
        whyNotTwo = `Two stages are not offered: the plan found needs up to ${int(two.plan.firstSampleSize + two.plan.secondSampleSize)} items, more than the population of ${int(p.populationSize)}.`;
        two = undefined;
      }
    } catch (e) {
      if (!(e instanceof TolrateInputError)) throw e;
      whyNotTwo = `Two stages are not offered: ${e.message}`;
    }
  }
  // For both risks, an example at the risk of underreliance offered as the default (it depends on the one given).
  const exampleAlpha = old?.plan?.kind === 'both-risks' ? old.plan.allowedUnderrelianceRisk : 0.1;
  let example: string[] | undefined;
  {
    try {
      const b = planForBothRisks({ confidence: p.confidence, tolerableRate: pb.tolerableRate, expectedRate: p.expectedRate, underrelianceRisk: exampleAlpha, model: p.model, populationSize: p.populationSize });
      if (b.sampleSize <= p.populationSize) example = bothRow(b, `Both risks, ≤ ${pctPlain(exampleAlpha)}`);
    } catch (e) {
      if (!(e instanceof TolrateInputError)) throw e;
    }
  }
  s.heading('Sampling plan');
  s.print(...table(PLAN_HEADER, [singleRow(p.single, p), ...(example ? [example] : []), ...(two ? [twoStageRow(two)] : [])]));
  s.print(
    ...wrap(
      `Both risks: ${example ? `the row shows the plan for at most ${pctPlain(exampleAlpha)} risk of underreliance; ` : ''}you give the most risk of underreliance you accept, and the sample is planned for it` +
        (p.oneRate ? '.' : ` at the lowest tolerable rate, ${pctPlain(p.lowest)}, so that it serves every attribute.`),
      92,
      '  ',
    ),
  );
  s.print(
    ...wrap(
      'Overreliance: the chance of relying on the control when its deviation rate is at the tolerable rate. Underreliance: the chance of not relying on it when ' +
        'it works at the expected rate. Expected items: the items tested on average at the expected rate. Second stage: the chance, at the expected rate, that the second stage is needed.',
      92,
      '  ',
    ),
  );
  if (two) s.print('', ...wrap(twoStageWords(two, p), 92, '  '), ...wrap('A two-stage plan needs random selection (the first items drawn are then themselves a random sample).', 92, '  '));
  if (whyNotTwo) s.print('', ...wrap(whyNotTwo, 92, '  '));
  s.print('', ...wrap('The tool computes the plans; which one suits the test is your judgement under the standards and the firm methodology that apply.', 92, '  '));
  for (;;) {
    const kind = await a.select<'single' | 'both-risks' | 'two-stage'>({
      id: 'plan.approach.plan',
      message: 'Sampling plan',
      choices: [
        { value: 'single', name: `One sample (the usual): ${int(p.single.sampleSize)} items` },
        { value: 'both-risks' as const, name: 'Planned for both risks (also limit the risk of underreliance)' },
        ...(two ? [{ value: 'two-stage' as const, name: `Two stages (test ${int(two.plan.firstSampleSize)}; test ${int(two.plan.secondSampleSize)} more only when the first stage is inconclusive)` }] : []),
      ],
      default: old?.plan?.kind === 'two-stage' && two ? 'two-stage' : old?.plan?.kind === 'both-risks' ? 'both-risks' : 'single',
    });
    if (kind === 'single') return 'single';
    if (kind === 'two-stage') {
      const t = two!;
      const accept = await a.select({
        id: 'plan.approach.plan.accept',
        message: `Use the two-stage plan (up to ${int(t.plan.firstSampleSize + t.plan.secondSampleSize)} items selected)?`,
        choices: [
          { value: 'accept', name: 'Yes' },
          { value: 'other', name: 'Choose another plan' },
          { value: 'change', name: 'Change the parameters' },
        ],
        default: 'accept',
      });
      if (accept === 'change') return 'change';
      if (accept === 'other') continue;
      const x = t.plan;
      return {
        plan: {
          kind: 'two-stage',
          firstSampleSize: x.firstSampleSize,
          firstAcceptanceNumber: x.firstAcceptanceNumber,
          firstRejectionNumber: x.firstRejectionNumber,
          secondSampleSize: x.secondSampleSize,
          secondAcceptanceNumber: x.secondAcceptanceNumber,
          overrelianceRisk: t.overrelianceRisk,
          underrelianceRisk: t.underrelianceRisk,
          averageSampleNumber: t.averageSampleNumber,
          secondStageProbability: t.secondStageProbability,
          allowedUnderrelianceRisk: t.allowedUnderrelianceRisk,
        },
        sampleSize: x.firstSampleSize + x.secondSampleSize,
        rationale:
          `Statistical sample, two stages: ${twoStageWords(t, p)} The sample size recorded, ${int(x.firstSampleSize + x.secondSampleSize)}, is the most items that may be tested (${int(x.firstSampleSize)} + ${int(x.secondSampleSize)}). ` +
          `The single-stage sample would be ${int(t.singleStage.sampleSize)} items, relying on the control with at most ${t.singleStage.acceptanceNumber} deviation(s).`,
      };
    }
    const wasBoth = old?.plan?.kind === 'both-risks' ? old.plan : undefined;
    const alpha = await askRate(a, {
      id: 'plan.approach.underrelianceRisk',
      message: 'Most risk of underreliance you accept (%)',
      help: `The chance of not relying on the control although it works at the expected rate of ${pctPlain(p.expectedRate)}. With one sample of ${int(p.single.sampleSize)} it is ${pctUp(p.single.underrelianceRisk)}; a lower figure needs a larger sample. E.g. 10 or 20.`,
      default: wasBoth ? pctPlain(wasBoth.allowedUnderrelianceRisk) : '10',
      parse: rate('The risk of underreliance', { below: 1, belowWhat: '100%', example: '10' }),
    });
    let b: BothRisksPlanResult;
    try {
      b = planForBothRisks({ confidence: p.confidence, tolerableRate: pb.tolerableRate, expectedRate: p.expectedRate, underrelianceRisk: alpha, model: p.model, populationSize: p.populationSize });
    } catch (e) {
      if (!(e instanceof TolrateInputError)) throw e;
      s.print('', ...wrap(e.message, 92, '  '));
      continue;
    }
    if (b.sampleSize > p.populationSize) {
      s.print('', ...wrap(`No plan within the population of ${int(p.populationSize)} items keeps the risk of underreliance within ${pctPlain(alpha)}: it would need ${int(b.sampleSize)}. Accept a higher risk of underreliance or choose another plan.`, 92, '  '));
      continue;
    }
    s.print('', ...table(PLAN_HEADER, [singleRow(p.single, p), bothRow(b, 'Both risks')]));
    s.print('', ...wrap(bothRisksWords(b, pb), 92, '  '));
    if (b.sizeRemark) s.print(...wrap(b.sizeRemark, 92, '  '));
    const accept = await a.select({
      id: 'plan.approach.plan.accept',
      message: `Use ${int(b.sampleSize)} items, relying on the control with at most ${b.acceptanceNumber} deviation(s)?`,
      choices: [
        { value: 'accept', name: 'Yes' },
        { value: 'other', name: 'Choose another plan (or another risk of underreliance)' },
        { value: 'change', name: 'Change the parameters' },
      ],
      default: 'accept',
    });
    if (accept === 'change') return 'change';
    if (accept === 'other') continue;
    return {
      plan: { kind: 'both-risks', sampleSize: b.sampleSize, acceptanceNumber: b.acceptanceNumber, overrelianceRisk: b.overrelianceRisk, underrelianceRisk: b.underrelianceRisk, allowedUnderrelianceRisk: alpha },
      sampleSize: b.sampleSize,
      rationale: `Statistical sample planned for both risks: ${bothRisksWords(b, pb)} The one-sample plan would be ${int(p.single.sampleSize)} items with a risk of underreliance of ${pctUp(p.single.underrelianceRisk)}.` +
        (p.oneRate ? '' : ` Planned at the lowest of the attributes' tolerable rates (${pctPlain(p.lowest)}), so the same acceptance number serves every attribute.`),
    };
  }
}

async function nonStatistical(s: Session, old: Approach | undefined): Promise<Approach | undefined> {
  const a = s.asker;
  const policy = loadPolicy(s.policyPath);
  const frequency = s.wp.control!.frequency;
  const N = s.wp.population!.fingerprint.rowCount;
  const attrs = s.wp.attributes!;
  const wasNs = old?.kind === 'non-statistical' ? old : undefined;
  s.print('', `  Firm policy: ${policy.name}${policy.version ? ` (${policy.version})` : ''}`, ...wrap(policy.assumptions.text, 92, '  '));
  const levels = policy.relianceLevels;
  const reliance = await a.select({
    id: 'plan.approach.reliance',
    message: 'Planned reliance on the control',
    choices: levels.map((l) => ({ value: l.id, name: `${l.label}: ${policySize(policy, frequency, l.id)} items for a ${FREQUENCY_LABELS[frequency].toLowerCase()} control`, ...(l.description ? { description: l.description } : {}) })),
    ...(wasNs?.policy ? { default: levels.find((l) => l.label === wasNs.policy!.reliance || l.id === wasNs.policy!.reliance)?.id ?? levels[0]!.id } : {}),
  });
  const level = levels.find((l) => l.id === reliance)!;
  const size = policySize(policy, frequency, reliance);
  const range = policy.ranges?.[frequency];
  const tolerableRate = await askRate(a, {
    id: 'plan.approach.tolerableRate',
    message: 'Tolerable deviation rate (%)',
    help: `The policy's size for ${level.label.toLowerCase()} is meant for a tolerable rate of about ${level.tolerableRatePercent}%.`,
    default: wasNs ? pctPlain(wasNs.tolerableRate) : String(level.tolerableRatePercent),
    parse: rate('Tolerable rate', { below: 0.5, belowWhat: '50%' }),
  });
  const confidence = Number((policy.assumptions.confidencePercent / 100).toPrecision(12));
  const capped = Math.min(size, N);
  s.heading('Sample size');
  s.print(
    ...wrap(
      `The policy gives ${int(size)} items for a ${FREQUENCY_LABELS[frequency].toLowerCase()} control at ${level.label.toLowerCase()}` +
        `${range ? ` (usual range ${range})` : ''}, assuming about ${policy.assumptions.confidencePercent}% confidence and no expected deviations.` +
        (capped < size ? ` The population has only ${int(N)} items: every item is tested.` : '') +
        ' Sampling risk is not quantified for a non-statistical sample; any deviation found usually means the control cannot be relied on as planned without a larger sample.',
      92,
      '  ',
    ),
  );
  if (attrs.some((x) => x.tolerableRate !== undefined)) s.print('  (Attributes with their own tolerable rates use the same policy size.)');
  const chosen = await askSizeChoice(s, capped, N, 'firm policy', wasNs);
  if (chosen.size < 0) return undefined;
  const assumptions = policy.assumptions.text;
  const rationale =
    `Non-statistical sample under "${policy.name}": ${int(size)} items for a ${FREQUENCY_LABELS[frequency].toLowerCase()} control at ${level.label.toLowerCase()}` +
    `${range ? ` (usual range ${range})` : ''}; ${assumptions}` +
    (capped < size ? ` The population has ${int(N)} items, all tested.` : '') +
    (chosen.size !== capped ? ` The practitioner adopted ${int(chosen.size)} items: ${chosen.reason ?? ''}.` : '');
  return {
    kind: 'non-statistical',
    confidence,
    tolerableRate,
    expectedRate: 0,
    model: 'binomial',
    sizes: [],
    policy: { name: policy.name, frequency, reliance: level.label, size, assumptions },
    sampleSize: chosen.size,
    rationale,
  };
}

export async function askApproach(s: Session): Promise<Approach> {
  const a = s.asker;
  if (!s.wp.attributes || !s.wp.population || !s.wp.control) throw new AnswerError('plan the control, attributes and population first');
  const old = s.wp.approach;
  s.heading('Approach');
  for (;;) {
    const kind = await a.select({
      id: 'plan.approach.kind',
      message: 'Approach',
      choices: [
        { value: 'statistical', name: 'Statistical: size from confidence, tolerable and expected rates' },
        { value: 'non-statistical', name: 'Non-statistical: size from the firm\'s sampling policy' },
      ],
      default: old?.kind ?? 'statistical',
    });
    const got = kind === 'statistical' ? await statistical(s, old) : await nonStatistical(s, old);
    if (got) return got;
    s.print('  Enter the parameters again.');
  }
}
