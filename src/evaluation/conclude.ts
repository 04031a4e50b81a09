/**
 * From the evaluated figures and the recorded causes to a proposed conclusion and follow-up
 * actions. Everything here is a proposal: the interview shows it, the practitioner edits and
 * accepts it. The tool never classifies the severity of a deficiency; it asks the questions.
 */
import type { Conclusion, Evaluation, FollowUp, Workpaper } from '../workpaper/schema.js';
import { CAUSE_LABELS } from '../workpaper/schema.js';
import { pct, pctLimit, pctPlain, pctUp } from '../util/format.js';
import { countResults, isIllustrative, type DeviationRecord } from './evaluate.js';

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
  const counts = countResults(wp);
  const illustrative = isIllustrative(wp);
  return evaluation.attributes.map((ev) => {
    const devs = counts.find((c) => c.attributeId === ev.attributeId)?.deviationRecords ?? [];
    const intentional = devs.filter((d) => d.result.intentional !== 'no');
    const systemic = devs.filter((d) => d.result.pattern === 'systemic');
    const beta = 1 - ev.confidence;
    const parts: string[] = [];
    let byRates: boolean;
    if (illustrative) {
      byRates = ev.deviations === 0;
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
    } else {
      byRates = ev.supportedByRates;
      parts.push(
        `${ev.deviations} deviation(s) in ${ev.sampleSize} items: sample deviation rate ${pct(ev.sampleRate)}, upper deviation limit ${pctLimit(ev.upperLimit, ev.tolerableRate)} at ${pctPlain(ev.confidence)} confidence against a tolerable rate of ${pctPlain(ev.tolerableRate)}; risk of overreliance ${pctUp(ev.achievedRisk)} against ${pctPlain(beta)} allowed.`,
      );
      parts.push(byRates ? 'The rates support the planned reliance.' : 'The rates do not support the planned reliance.');
    }
    let supports = byRates;
    let overridden = false;
    if (intentional.length > 0) {
      parts.push(`${intentional.length} deviation(s) are or may be intentional (${intentional.map((d) => d.key).join(', ')}): this is escalated whatever the rates say, and reliance is not supported.`);
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
  const anyIntentional = findings.some((f) => f.deviations.some((d) => d.result.intentional !== 'no'));
  for (const f of failing) {
    const ev = evaluation.attributes.find((e) => e.attributeId === f.attributeId)!;
    // Extending the sample answers sampling risk only: not an intentional or systemic cause.
    const intentional = f.deviations.some((d) => d.result.intentional !== 'no');
    const systemic = f.deviations.some((d) => d.result.pattern === 'systemic');
    if (!intentional && !systemic && !ev.illustrative && ev.extension !== null && ev.extension > 0) {
      out.push({
        kind: 'extend-sample',
        description: `Extend the sample for ${f.attributeId} by ${ev.extension} items (to ${ev.sampleSize + ev.extension}); the extended sample supports reliance only if none of the additional items deviates.`,
        items: ev.extension,
      });
    } else if (!ev.illustrative && ev.extension === null && !intentional) {
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
      intentionalFound: findings.some((f) => f.deviations.some((d) => d.result.intentional !== 'no')),
      systemicFound: findings.some((f) => f.deviations.some((d) => d.result.pattern === 'systemic')),
    },
    control: { supportsReliance: all, text },
    followUps: proposeFollowUps(wp, evaluation, findings),
    concludedAt: now.toISOString(),
  };
}
