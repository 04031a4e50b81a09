/**
 * From the evaluated figures and the recorded causes to a proposed conclusion and follow-up
 * actions. Everything here is a proposal: the interview shows it, the practitioner edits and
 * accepts it. The tool never classifies the severity of a deficiency; it asks the questions.
 */
import type { AttributeEvaluation, Conclusion, Evaluation, FollowUp, Workpaper } from '../workpaper/schema.js';
import { int, pct, pctLimit, pctPlain, pctUp } from '../util/format.js';
import { deviationRecordsByAttribute, evaluate, isIllustrative, type DeviationRecord } from './evaluate.js';
import { PART_LABELS } from './parts.js';
import { CAUSE_LABELS } from './labels.js';
import { bothRisksOf, plannedTolerableRate, STAGE_DECISION_WORDS, twoStageOf } from './plan.js';
import { TolrateInputError } from '../errors.js';

/** What the rates alone say. An illustrative evaluation (non-statistical, haphazard) supports reliance only without deviations. */
export function ratesSupport(ev: Pick<AttributeEvaluation, 'illustrative' | 'deviations' | 'supportedByRates'>): boolean {
  return ev.illustrative ? ev.deviations === 0 : ev.supportedByRates;
}

/** A deviation that escalates whatever the rates say: intentional or suspected, or systemic. */
export function escalates(d: { intentional: string; pattern: string }): { intentional: boolean; systemic: boolean } {
  return { intentional: d.intentional !== 'no', systemic: d.pattern === 'systemic' };
}

/** Whether the evidence (the rates and the qualitative review of the deviations) supports reliance. */
export function evidenceSupports(ev: Pick<AttributeEvaluation, 'illustrative' | 'deviations' | 'supportedByRates'>, deviations: ReadonlyArray<{ intentional: string; pattern: string }>): boolean {
  return ratesSupport(ev) && !deviations.some((d) => {
    const e = escalates(d);
    return e.intentional || e.systemic;
  });
}

export interface AttributeFinding {
  attributeId: string;
  supportsReliance: boolean;
  /** The rates alone would support reliance but the qualitative review overrides them. */
  overridden: boolean;
  reasoning: string;
  deviations: DeviationRecord[];
}

/**
 * Questions the practitioner answers before choosing a severity, one test each, in the order the
 * assessment runs: first the two dimensions of severity (likelihood, then magnitude against
 * materiality), then what can reduce it (a compensating control), then what points to a material
 * weakness (its indicators and the prudent-official test), and last the significant-deficiency
 * test for what falls short of one. The wording is ours; the factors follow the standards named
 * beside each question. Paragraph numbers are recalled, not read from the texts (from memory).
 */
export const SEVERITY_QUESTIONS = [
  // Likelihood: "a reasonable possibility" that the controls fail to prevent or detect a
  // misstatement, with its risk factors (PCAOB AS 2201 ¶62 and ¶65; AICPA AU-C 265 .A5 and
  // IAASB ISA 265 A5–A6; from memory).
  'Likelihood: is there a reasonable possibility that, as it operated, the control would fail to prevent, or detect and correct, a misstatement of the accounts or disclosures it covers? Consider how susceptible they are to error or fraud, how much judgement they involve and which other controls interact with this one.',
  // Magnitude of the potential (not only the actual) misstatement, judged against materiality
  // (AS 2201 ¶62–¶64 and ¶66; AU-C 265 .A6; ISA 265 A6; from memory).
  'Magnitude: how large could the resulting misstatement be, compared with materiality? Consider the amounts and the volume of transactions exposed to the deficiency in the period, not only the deviations found, and this deficiency together with any others affecting the same accounts.',
  // Compensating controls reduce severity only if tested and found effective (AS 2201 ¶68;
  // AU-C 265 .A7; from memory).
  'Compensating controls: does another control, tested and found to operate effectively, address the same risk precisely enough to prevent or detect a misstatement of that size?',
  // Indicators of a material weakness (AS 2201 ¶69; AU-C 265 .A11; ISA 265 A7; from memory).
  'Indicators of a material weakness: do the causes point to fraud by management, management override of controls, a misstatement that the controls of the entity did not find, or ineffective oversight by those charged with governance?',
  // Prudent-official test for a material weakness (AS 2201 ¶70; AU-C 265 .A10; from memory).
  'Prudent officials: knowing these facts, would prudent officials, in the conduct of their own affairs, still conclude that they have reasonable assurance that transactions are recorded as needed to prepare the financial statements?',
  // Significant deficiency: less severe than a material weakness yet important enough to merit
  // the attention of those charged with governance (AS 2201 Appendix A; AU-C 265 .07; ISA 265
  // ¶6(b) and A5; from memory).
  'Attention of governance: if it is not a material weakness, is the deficiency, alone or with others, important enough to merit the attention of those charged with governance (those responsible for overseeing financial reporting)?',
] as const;

function causesText(devs: DeviationRecord[]): string {
  const by = new Map<string, number>();
  for (const d of devs) by.set(CAUSE_LABELS[d.result.cause], (by.get(CAUSE_LABELS[d.result.cause]) ?? 0) + 1);
  return [...by.entries()].map(([c, k]) => `${c.toLowerCase()} (${k})`).join(', ');
}

/** Per-attribute findings: the rates, then the qualitative review that may override them. */
export function attributeFindings(wp: Workpaper, evaluation: Evaluation): AttributeFinding[] {
  const byAttribute = deviationRecordsByAttribute(wp);
  const illustrative = isIllustrative(wp);
  return evaluation.attributes.map((ev) => {
    const devs = byAttribute.get(ev.attributeId) ?? [];
    const intentional = devs.filter((d) => escalates(d.result).intentional);
    const systemic = devs.filter((d) => escalates(d.result).systemic);
    const beta = 1 - ev.confidence;
    const parts: string[] = [];
    const byRates = ratesSupport(ev);
    if (illustrative) {
      // A statistically sized sample chosen haphazardly has no firm-policy size to point to.
      const nonStatistical = wp.approach?.kind === 'non-statistical';
      parts.push(
        nonStatistical
          ? ev.deviations === 0
            ? `No deviations in ${ev.sampleSize} items. The sample is non-statistical, so sampling risk is not quantified; the firm policy's size assumes no deviations.`
            : `${ev.deviations} deviation(s) in ${ev.sampleSize} items. The sample is non-statistical and its size assumes no deviations, so the result does not support the planned reliance without a larger sample or other evidence.`
          : ev.deviations === 0
            ? `No deviations in ${ev.sampleSize} items. The selection was haphazard, so the result cannot support a statistical conclusion and sampling risk is not quantified.`
            : `${ev.deviations} deviation(s) in ${ev.sampleSize} items. The selection was haphazard, so sampling risk is not quantified and the result does not support the planned reliance without a larger, randomly selected sample or other evidence.`,
      );
    } else if (ev.parts && ev.combined) {
      // A test in parts: each part's own figures, then the whole period's combined limit.
      for (const p of ev.parts) {
        parts.push(`${PART_LABELS[p.part]} part: ${p.deviations} deviation(s) in ${int(p.sampleSize)} of ${int(p.populationSize)} items, sample deviation rate ${pct(p.sampleRate)}, its own upper limit ${pctUp(p.upperLimit)}.`);
      }
      const cons = `the conservative bound (the two parts' own limits added, each at ${pctPlain(1 - beta / 2)} confidence) is ${pctUp(ev.combined.conservativeRate)}`;
      parts.push(
        ev.combined.rate !== null
          ? `Whole period: ${ev.deviations} deviation(s) in ${int(ev.sampleSize)} items; the upper deviation limit over both parts is ${pctLimit(ev.combined.rate, ev.tolerableRate)} (${int(ev.combined.deviationsInPopulation!)} deviations in the ${int(ev.parts.reduce((s, p) => s + p.populationSize, 0))} items) at ${pctPlain(ev.confidence)} confidence against a tolerable rate of ${pctPlain(ev.tolerableRate)}; ${cons}.`
          : `Whole period: ${ev.deviations} deviation(s) in ${int(ev.sampleSize)} items; the exact limit over both parts could not be computed (${ev.combined.note ?? 'the search is too large'}), so ${cons}, which is used for the decision against a tolerable rate of ${pctPlain(ev.tolerableRate)}.`,
      );
      parts.push(byRates ? 'The rates support the planned reliance for the whole period.' : 'The rates do not support the planned reliance for the whole period.');
    } else if (ev.stage) {
      const two = twoStageOf(wp);
      const st = ev.stage;
      const rule = two
        ? `the two-stage plan relies on the control with at most ${two.firstAcceptanceNumber} deviation(s) in the first ${two.firstSampleSize} items, does not with ${two.firstRejectionNumber} or more, and otherwise tests ${two.secondSampleSize} more and relies on it with at most ${two.secondAcceptanceNumber} in all`
        : 'the two-stage plan';
      parts.push(
        `${st.firstDeviations} deviation(s) in the ${st.firstSampleSize} first-stage items` +
          (st.secondSampleSize !== undefined ? ` and ${st.secondDeviations} in the ${st.secondSampleSize} second-stage items` : '') +
          ` (${rule}): the plan ${STAGE_DECISION_WORDS[st.decision]}. Sample deviation rate ${pct(ev.sampleRate)} and upper deviation limit ${pctLimit(ev.upperLimit, ev.tolerableRate)} as of the ${ev.sampleSize} items tested, at ${pctPlain(ev.confidence)} confidence against a tolerable rate of ${pctPlain(ev.tolerableRate)}; the plan's risk of overreliance, exact over both stages, is ${pctUp(ev.achievedRisk)} against ${pctPlain(beta)} allowed.`,
      );
      parts.push(byRates ? 'The results support the planned reliance.' : 'The results do not support the planned reliance.');
    } else {
      const both = bothRisksOf(wp);
      parts.push(
        (both ? bothRisksWords(both, plannedTolerableRate(wp) ?? ev.tolerableRate, ev.tolerableRate) : '') +
        `${ev.deviations} deviation(s) in ${ev.sampleSize} items: sample deviation rate ${pct(ev.sampleRate)}, upper deviation limit ${pctLimit(ev.upperLimit, ev.tolerableRate)} at ${pctPlain(ev.confidence)} confidence against a tolerable rate of ${pctPlain(ev.tolerableRate)}; risk of overreliance ${pctUp(ev.achievedRisk)} against ${pctPlain(beta)} allowed.`,
      );
      parts.push(byRates ? 'The rates support the planned reliance.' : 'The rates do not support the planned reliance.');
    }
    let supports = byRates;
    let overridden = false;
    if (intentional.length > 0) {
      parts.push(`${intentional.length} deviation(s) are or may be intentional (${intentional.map((d) => (d.part ? `${d.key}, ${d.part}` : d.key)).join(', ')}): this is escalated whatever the rates say, and reliance is not supported.`);
      if (supports) overridden = true;
      supports = false;
    }
    if (systemic.length > 0) {
      parts.push(`${systemic.length} deviation(s) look systemic (${causesText(systemic)}): the cause is likely to recur beyond the sample.`);
      if (supports) {
        overridden = true;
        supports = false;
        parts.push('Reliance is not supported while a systemic cause remains.');
      }
    }
    if (devs.length > 0) parts.push(`Causes: ${causesText(devs)}.`);
    return { attributeId: ev.attributeId, supportsReliance: supports, overridden, reasoning: parts.join(' '), deviations: devs };
  });
}

/** " (Head of purchasing)"; brackets inside the name become commas: " (Head of Finance, G. Tallamy)". */
function ownerText(owner: string | undefined): string {
  if (!owner) return '';
  return ` (${owner.replace(/\s*\(([^)]*)\)/g, ', $1').trim()})`;
}

/** Proposed follow-up actions from the outcome; the practitioner edits, adds owners and dates. */
export function proposeFollowUps(wp: Workpaper, evaluation: Evaluation, findings: AttributeFinding[]): FollowUp[] {
  const out: FollowUp[] = [];
  const owner = wp.control?.owner;
  const failing = findings.filter((f) => !f.supportsReliance);
  const anyIntentional = findings.some((f) => f.deviations.some((d) => escalates(d.result).intentional));
  for (const f of failing) {
    const ev = evaluation.attributes.find((e) => e.attributeId === f.attributeId)!;
    // Extending the sample answers sampling risk only: not an intentional or systemic cause.
    const intentional = f.deviations.some((d) => escalates(d.result).intentional);
    const systemic = f.deviations.some((d) => escalates(d.result).systemic);
    if (!intentional && !systemic && !ev.illustrative && ev.extension !== null && ev.extension > 0) {
      // An extension decided after seeing the results is a second look: offered with the exact risk
      // of the procedure followed, beside the planned one, never as "supports reliance".
      const risk = ev.extensionRisk;
      out.push({
        kind: 'extend-sample',
        description:
          `Extend the sample for ${f.attributeId} by ${ev.extension} items (to ${ev.sampleSize + ev.extension}) and rely on the control only if none of them deviates` +
          (risk
            ? `: because the extension is decided after seeing these results, the risk of overreliance of doing so is ${pctUp(risk.procedure)}, not the planned ${pctPlain(1 - ev.confidence)} (${pctUp(risk.repeated)} if the sample is extended again after each failure). Extend only if that risk is acceptable under the firm's methodology and documented; otherwise test a compensating control or reduce reliance.`
            : '.'),
        items: ev.extension,
      });
    } else if (!ev.illustrative && ev.stage && !intentional) {
      out.push({
        kind: 'other',
        description: `No extension of the sample is proposed for ${f.attributeId}: the two-stage plan already had its second look${ev.stage.reached === 1 ? ' (here the first stage alone decided)' : ''}, and testing more items after it would raise the risk of overreliance above the planned ${pctPlain(1 - ev.confidence)}.`,
      });
    } else if (!ev.illustrative && ev.extension === null && !intentional && !ev.parts) {
      out.push({
        kind: 'other',
        description: `Extending the sample for ${f.attributeId} is not practical: even with no further deviations no reasonable extension reaches the planned risk.`,
      });
    }
  }
  if (failing.length > 0) {
    out.push({ kind: 'test-compensating-control', description: 'Identify and test a compensating control that addresses the same risk, if one exists.' });
    out.push({
      kind: 'reduce-reliance',
      description: 'Reduce the planned reliance on this control and expand substantive procedures over the assertions it addresses.',
    });
    out.push({
      kind: 'communicate',
      description: `Communicate the deviations and their causes to the control owner${ownerText(owner)}${anyIntentional ? ', to the engagement leader, and consider the implications for the risk of fraud' : ''}; communicate to those charged with governance where the severity warrants it.`,
    });
    out.push({
      kind: 'assess-severity',
      description: 'Assess the severity of the deficiency (deficiency, significant deficiency or material weakness) and document the reasons.',
    });
  } else if (findings.some((f) => f.deviations.length > 0)) {
    out.push({
      kind: 'communicate',
      description: `Inform the control owner${ownerText(owner)} of the isolated deviations found and their causes.`,
    });
  }
  return out;
}

/** A proposed conclusion (without severity, which the practitioner chooses). */
export function proposeConclusion(
  wp: Workpaper,
  evaluation: Evaluation,
  now = new Date(),
): Omit<Conclusion, 'severity'> & { findings: AttributeFinding[] } {
  const findings = attributeFindings(wp, evaluation);
  const all = findings.every((f) => f.supportsReliance);
  const control = wp.control?.id ?? 'the control';
  const text = all
    ? `The results support the planned reliance on ${control} for the period tested.`
    : `The results do not support the planned reliance on ${control} (${findings.filter((f) => !f.supportsReliance).map((f) => f.attributeId).join(', ')}). The follow-up actions below apply.`;
  return {
    findings,
    attributes: findings.map((f) => ({ attributeId: f.attributeId, supportsReliance: f.supportsReliance, reasoning: f.reasoning })),
    qualitative: {
      intentionalFound: findings.some((f) => f.deviations.some((d) => escalates(d.result).intentional)),
      systemicFound: findings.some((f) => f.deviations.some((d) => escalates(d.result).systemic)),
    },
    control: { supportsReliance: all, text },
    followUps: proposeFollowUps(wp, evaluation, findings),
    concludedAt: now.toISOString(),
  };
}

/**
 * Where a recorded conclusion goes further than the evidence: an attribute or the control
 * concluded as supporting reliance that the figures or the recorded causes do not support, or
 * qualitative findings recorded against what the results say. Empty when it is consistent.
 */
export function conclusionProblems(wp: Workpaper): string[] {
  if (!wp.conclusion || !wp.results) return [];
  let proposal;
  try {
    proposal = proposeConclusion(wp, evaluate(wp));
  } catch (e) {
    if (e instanceof TolrateInputError) return [`cannot re-derive the conclusion: ${e.message}`];
    throw e;
  }
  const diffs: string[] = [];
  for (const f of proposal.findings) {
    const r = wp.conclusion.attributes.find((a) => a.attributeId === f.attributeId);
    if (!r) diffs.push(`${f.attributeId}: no recorded conclusion`);
    else if (r.supportsReliance && !f.supportsReliance) {
      diffs.push(`${f.attributeId}: concluded as supporting reliance, but the recomputed figures and recorded causes do not support it`);
    }
  }
  const allAttr = wp.conclusion.attributes.every((a) => a.supportsReliance);
  if (wp.conclusion.control.supportsReliance && !allAttr) diffs.push('the control is concluded as supporting reliance although an attribute does not');
  if (wp.conclusion.control.supportsReliance && !proposal.control.supportsReliance) {
    diffs.push('the control is concluded as supporting reliance, but the recomputed results do not support it');
  }
  if (wp.conclusion.qualitative.intentionalFound !== proposal.qualitative.intentionalFound) diffs.push(`recorded that intentional deviations were ${wp.conclusion.qualitative.intentionalFound ? '' : 'not '}found; the results say otherwise`);
  if (wp.conclusion.qualitative.systemicFound !== proposal.qualitative.systemicFound) diffs.push(`recorded that systemic deviations were ${wp.conclusion.qualitative.systemicFound ? '' : 'not '}found; the results say otherwise`);
  return diffs;
}

/** The plan for both risks in the reasoning of one attribute, and at which rate that attribute is judged. */
function bothRisksWords(both: { sampleSize: number; acceptanceNumber: number }, plannedAt: number, own: number): string {
  const plan = `Sample planned for both risks at a tolerable rate of ${pctPlain(plannedAt)} (rely on the control with at most ${both.acceptanceNumber} deviation(s) in ${both.sampleSize} items at that rate)`;
  return own > plannedAt ? `${plan}; this attribute is judged at its own tolerable rate of ${pctPlain(own)} by the exact risk rule. ` : `${plan}. `;
}
