/**
 * Planning, the approach: statistical (confidence, tolerable and expected rates, model; the
 * size the tool computes, why, and what it would be at neighbouring rates) or non-statistical
 * (the firm's sampling policy by control frequency and reliance level). The practitioner
 * accepts the size or enters a larger one with a reason.
 */
import { sampleSize } from '../stats/index.js';
import type { SampleSizeResult } from '../stats/index.js';
import { TolrateInputError } from '../errors.js';
import type { Approach, Attribute, Model, SizeForAttribute } from '../workpaper/schema.js';
import { int, pctPlain, pctUp } from '../util/format.js';
import type { Session } from './session.js';
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

function modelWords(model: Model, N: number): string {
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

async function askSizeChoice(
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
    default: wasStat ? pctPlain(wasStat.confidence) : '95',
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
  const chosen = await askSizeChoice(s, Math.min(n, N), N, 'computation', wasStat);
  if (chosen.size < 0) return undefined;
  const rationale =
    `Statistical sample: ${why}` +
    (fpc ? ` (Textbook finite population correction of the binomial size ${fpc.binomialSampleSize}: ${fpc.correctedSampleSize}, not used.)` : '') +
    (chosen.size !== n ? ` The practitioner adopted ${int(chosen.size)} items instead of ${int(n)}: ${chosen.reason ?? 'the whole population'}.` : '');
  const perAttr: SizeForAttribute[] = sizes.map((x) => ({
    attributeId: x.attribute.id,
    tolerableRate: x.tolerableRate,
    sampleSize: x.result.sampleSize,
    expectedDeviations: x.result.expectedDeviations,
    achievedRisk: x.result.achievedRisk,
    acceptanceNumber: x.result.acceptanceNumber,
    underrelianceRisk: x.result.underrelianceRisk,
  }));
  return {
    kind: 'statistical',
    confidence,
    tolerableRate,
    expectedRate,
    model,
    sizes: perAttr,
    ...(fpc ? { finitePopulationCorrection: { binomialSampleSize: fpc.binomialSampleSize, correctedSampleSize: fpc.correctedSampleSize } } : {}),
    sampleSize: chosen.size,
    rationale,
  };
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
