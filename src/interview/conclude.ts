/**
 * Evaluate, conclude and sign off: the figures per attribute, the qualitative review, the
 * practitioner's conclusion, the follow-up actions, the severity (asked, never chosen by the
 * tool) and the preparer's sign-off.
 */
import { evaluate } from '../control-test/evaluate.js';
import { proposeConclusion, SEVERITY_QUESTIONS } from '../control-test/conclude.js';
import { FOLLOW_UP_LABELS, SEVERITY_LABELS } from '../control-test/index.js';
import {
  FOLLOW_UP_KINDS,
  SEVERITIES,
  type Conclusion,
  type Evaluation,
  type FollowUp,
  type FollowUpKind,
  type Workpaper,
} from '../workpaper/schema.js';
import { canonicalJson } from '../workpaper/log.js';
import { int, pct, pctLimit, pctPlain, pctUp } from '../util/format.js';
import type { Session } from './session.js';
import { date, optionalDate, optionalText, requiredText, today } from './parse.js';
import { CAUTION, table, wrap } from './show.js';

export { FOLLOW_UP_LABELS };

/** The evaluation table as text lines (also used by the demo narrative). */
export function evaluationLines(wp: Workpaper, ev: Evaluation): string[] {
  if (ev.attributes.some((a) => a.parts)) return partsEvaluationLines(ev);
  const rows = ev.attributes.map((a) => [
    a.attributeId,
    int(a.sampleSize),
    int(a.deviations),
    pct(a.sampleRate),
    pctLimit(a.upperLimit, a.tolerableRate),
    pctPlain(a.tolerableRate),
    `${pctUp(a.achievedRisk)} / ${pct(1 - a.confidence)}`,
    a.illustrative ? 'illustrative' : a.stage ? `${a.supportedByRates ? 'supported' : 'not supported'} (stage ${a.stage.reached})` : a.supportedByRates ? 'supported' : 'not supported',
  ]);
  const lines = table(['Attribute', 'n', 'k', 'Sample rate', 'Upper limit', 'Tolerable', 'Risk / allowed', 'By the rates'], rows);
  const first = ev.attributes[0];
  if (first) {
    const model = first.model === 'hypergeometric' ? `hypergeometric, N = ${int(wp.population?.fingerprint.rowCount ?? 0)}` : first.model;
    lines.push(
      ...wrap(
        first.stage
          ? `Two-stage plan: the decision is the plan's, stage by stage; Risk = the plan's risk of overreliance at the tolerable rate, exact over both stages. Sample rates and upper limits (at ${pct(first.confidence, 0)} confidence, ${model}, rounded up) are of the items tested.`
          : `Upper limits at ${pct(first.confidence, 0)} confidence (${model}), rounded up. Risk = the risk of overreliance at the tolerable rate.`,
        92,
        '  ',
      ),
    );
  }
  if (ev.attributes.some((a) => a.illustrative)) {
    lines.push(
      ...wrap(
        'The sample is non-statistical or was selected haphazardly: sampling risk cannot be quantified, so these figures are illustrative only and cannot support a statistical conclusion.',
        92,
        '  ',
      ),
    );
  }
  return lines;
}

/** A test done in parts: each part's figures, then the whole period's limit over both parts. */
function partsEvaluationLines(ev: Evaluation): string[] {
  const rows: string[][] = [];
  for (const a of ev.attributes) {
    for (const p of a.parts ?? []) {
      rows.push([a.attributeId, p.part, int(p.populationSize), int(p.sampleSize), int(p.deviations), pct(p.sampleRate), pctUp(p.upperLimit), '', '']);
    }
    const c = a.combined!;
    rows.push([
      a.attributeId,
      'whole period',
      int((a.parts ?? []).reduce((s, p) => s + p.populationSize, 0)),
      int(a.sampleSize),
      int(a.deviations),
      pct(a.sampleRate),
      c.rate !== null ? pctLimit(c.rate, a.tolerableRate) : 'not computed',
      `${pctUp(c.conservativeRate)}`,
      a.illustrative ? 'illustrative' : a.supportedByRates ? 'supported' : 'not supported',
    ]);
  }
  const lines = table(['Attribute', 'Part', 'N', 'n', 'k', 'Sample rate', 'Upper limit', 'Conservative', 'By the rates'], rows);
  const first = ev.attributes[0];
  if (first) {
    lines.push(
      ...wrap(
        `Upper limits at ${pct(first.confidence, 0)} confidence, rounded up: each part's own (${first.model}), and for the whole period the exact limit over both parts ` +
          `(the split of the deviations between the parts taken at its worst), with the conservative bound beside it (the parts' own limits at ${pct(1 - (1 - first.confidence) / 2)} confidence, added). ` +
          'The whole-period decision compares the exact limit with the tolerable rate (the conservative bound when the exact one cannot be computed).',
        92,
        '  ',
      ),
    );
  }
  if (ev.attributes.some((a) => a.illustrative)) {
    lines.push(...wrap('The sample is non-statistical or was selected haphazardly: sampling risk cannot be quantified, so these figures are illustrative only and cannot support a statistical conclusion.', 92, '  '));
  }
  return lines;
}

/** Run the evaluation and save it (computed: saved by "tolrate"). */
export async function runEvaluation(s: Session): Promise<Evaluation> {
  const ev = evaluate(s.wp, s.now());
  const same = s.wp.evaluation && canonicalJson(s.wp.evaluation.attributes) === canonicalJson(ev.attributes);
  if (!same) {
    s.wp = { ...s.wp, evaluation: ev };
    await s.save('evaluate', 'tolrate');
  }
  return s.wp.evaluation!;
}

async function askFollowUpDetails(s: Session, id: string, f: FollowUp, editDescription: boolean): Promise<FollowUp> {
  const a = s.asker;
  const description = editDescription
    ? await a.text({ id: `${id}.description`, message: 'Description', default: f.description, editable: true, parse: requiredText('The description') })
    : f.description;
  const owner = await a.text({
    id: `${id}.owner`,
    message: 'Owner (blank = none yet)',
    default: f.owner ?? '',
    parse: optionalText,
  });
  const periodStart = s.wp.engagement?.periodStart;
  const due = await a.text({
    id: `${id}.due`,
    message: 'Due date (YYYY-MM-DD, blank = none yet)',
    default: f.due ?? '',
    parse: optionalDate('Due date', periodStart ? { notBefore: periodStart, notBeforeWhat: 'the start of the period' } : {}),
  });
  const out: FollowUp = { kind: f.kind, description };
  if (owner) out.owner = owner;
  if (due) out.due = due;
  if (f.items !== undefined) out.items = f.items;
  return out;
}

async function askFollowUps(s: Session, proposed: FollowUp[], prior: readonly FollowUp[]): Promise<FollowUp[]> {
  const a = s.asker;
  const out: FollowUp[] = [];
  s.heading('Follow-up actions');
  if (proposed.length === 0) s.print('The tool proposes no follow-up action.');
  const unused = [...prior];
  for (const [i, f] of proposed.entries()) {
    const id = `conclude.followUps.${i + 1}`;
    // An earlier answer of the same kind: its owner, due date and wording are offered again.
    const j = unused.findIndex((x) => x.kind === f.kind);
    const before = j >= 0 ? unused.splice(j, 1)[0] : undefined;
    // The heading already ends with a blank line; later actions are set apart by one.
    s.print(...(i > 0 ? [''] : []), `${i + 1}. ${FOLLOW_UP_LABELS[f.kind]}:`, ...wrap(f.description, 92, '   '));
    const reworded = before !== undefined && before.description !== f.description && f.kind !== 'extend-sample';
    if (before) s.print(...wrap(`Earlier answer: ${reworded ? `"${before.description}"; ` : ''}owner ${before.owner ?? 'none yet'}, due ${before.due ?? 'none yet'}.`, 92, '   '));
    const what = await a.select({
      id: `${id}.action`,
      message: 'Keep this action?',
      choices: [
        { value: 'keep', name: 'Keep it as proposed' },
        { value: 'edit', name: reworded ? 'Keep it, with my earlier (or new) wording' : 'Keep it, with my own wording' },
        { value: 'remove', name: 'Remove it' },
      ],
      default: reworded ? 'edit' : 'keep',
    });
    if (what === 'remove') continue;
    const base: FollowUp = { ...f, ...(before?.owner ? { owner: before.owner } : {}), ...(before?.due ? { due: before.due } : {}) };
    out.push(await askFollowUpDetails(s, id, what === 'edit' && reworded ? { ...base, description: before!.description } : base, what === 'edit'));
  }
  // Earlier actions the tool no longer proposes (the practitioner's own ones among them).
  for (const [k, f] of unused.entries()) {
    const id = `conclude.followUps.earlier.${k + 1}`;
    s.print('', `Earlier action: ${FOLLOW_UP_LABELS[f.kind]}:`, ...wrap(f.description, 92, '   '), ...wrap(`Owner ${f.owner ?? 'none yet'}, due ${f.due ?? 'none yet'}.`, 92, '   '));
    const keep = await a.confirm({ id: `${id}.keep`, message: 'Keep this earlier action?', default: f.kind === 'other' || f.kind === 'communicate' });
    if (keep) out.push(f);
  }
  for (let j = 1; ; j++) {
    const more = await a.confirm({ id: `conclude.followUps.add.${j}`, message: 'Add a follow-up action of your own?', default: false });
    if (!more) break;
    const id = `conclude.followUps.own.${j}`;
    const kind = await a.select({
      id: `${id}.kind`,
      message: 'Kind of action',
      choices: FOLLOW_UP_KINDS.map((k) => ({ value: k, name: FOLLOW_UP_LABELS[k] })),
      default: 'other',
    });
    out.push(await askFollowUpDetails(s, id, { kind, description: '' }, true));
  }
  return out;
}

async function askSeverity(s: Session, prior?: Conclusion['severity']): Promise<NonNullable<Conclusion['severity']>> {
  const a = s.asker;
  s.heading('Severity of the deficiency');
  s.print(...wrap('Reliance is not supported. Answer these questions; then choose the classification yourself. The tool does not classify the deficiency.'));
  const answers: Array<{ question: string; answer: string }> = [];
  for (const [i, q] of SEVERITY_QUESTIONS.entries()) {
    const earlier = prior?.answers.find((x) => x.question === q)?.answer;
    const answer = await a.text({ id: `conclude.severity.q${i + 1}`, message: q, ...(earlier ? { default: earlier, editable: true } : {}), parse: requiredText('The answer') });
    answers.push({ question: q, answer });
  }
  const order = ['deficiency', 'significant-deficiency', 'material-weakness', 'none'] as const;
  if (order.length !== SEVERITIES.length) throw new Error('severity list out of date');
  const classification = await a.select({
    id: 'conclude.severity.classification',
    message: 'Your classification',
    help: 'Your judgement under the applicable standards and the firm\'s methodology.',
    choices: order.map((v) => ({ value: v, name: SEVERITY_LABELS[v] })),
    ...(prior ? { default: prior.classification } : {}),
  });
  const rationale = await a.text({
    id: 'conclude.severity.rationale',
    message: 'Why this classification?',
    ...(prior && prior.classification === classification ? { default: prior.rationale, editable: true } : {}),
    parse: requiredText('The rationale'),
  });
  return { answers, classification, rationale };
}

/** The conclude step: evaluate, review, conclude, follow-ups, severity. */
export async function askConclusion(s: Session): Promise<Conclusion> {
  const a = s.asker;
  s.heading('Evaluation');
  const ev = await runEvaluation(s);
  s.print(...evaluationLines(s.wp, ev));
  const proposal = proposeConclusion(s.wp, ev, s.now());
  // Concluding again (after a change to the results or an earlier answer): every earlier answer
  // is offered as the default; the ones the new figures contradict are flagged and asked afresh.
  const prior = s.wp.conclusion ?? s.wp.earlierConclusion;
  if (prior && !s.wp.conclusion) {
    s.print('', ...wrap('The test was concluded before, from other results or answers. Your earlier answers are offered as defaults; the ones the new figures contradict are marked and must be answered afresh.', 92, '  '));
  }

  s.heading('Qualitative review');
  for (const f of proposal.findings) s.print(...wrap(`${f.attributeId}: ${f.reasoning}`, 92, '  '), '');
  if (proposal.qualitative.intentionalFound) {
    s.print(...wrap('An intentional or possibly intentional deviation was recorded: it is escalated whatever the rates say.', 92, '  '));
  }
  const compensatingControls = await a.text({
    id: 'conclude.compensatingControls',
    message: 'Compensating controls considered (blank = none)',
    help: 'Another control over the same risk, and whether it has been tested.',
    default: prior?.qualitative.compensatingControls ?? '',
    parse: optionalText,
  });
  const notes = await a.text({
    id: 'conclude.notes',
    message: 'Other notes on the qualitative review (blank = none)',
    default: prior?.qualitative.notes ?? '',
    parse: optionalText,
  });

  s.heading('Conclusion');
  const attributes: Conclusion['attributes'] = [];
  for (const f of proposal.findings) {
    const word = f.supportsReliance ? 'supports' : 'does not support';
    const before = prior?.attributes.find((x) => x.attributeId === f.attributeId);
    // The earlier answer agreed with the evidence as it was; it holds if the evidence says the same now.
    const earlierDisagreed = before !== undefined && / The practitioner concluded otherwise: /.test(before.reasoning);
    const contradicted = before !== undefined && !earlierDisagreed && before.supportsReliance !== f.supportsReliance;
    if (contradicted) {
      s.print(...wrap(`Changed: earlier you concluded that ${f.attributeId} ${before.supportsReliance ? 'supports' : 'does not support'} reliance; the figures now say it ${word} it. Answer afresh.`, 92, '  '));
    }
    const agree = await a.confirm({
      id: `conclude.attribute.${f.attributeId}.agree`,
      message: `${f.attributeId}: the evidence ${word} the planned reliance. Do you agree?`,
      ...(contradicted ? {} : { default: !earlierDisagreed || before!.supportsReliance === f.supportsReliance }),
    });
    if (agree) {
      attributes.push({ attributeId: f.attributeId, supportsReliance: f.supportsReliance, reasoning: f.reasoning });
      continue;
    }
    if (!f.supportsReliance) {
      s.print(...wrap('Warning: the rates or the qualitative review do not support reliance; concluding otherwise needs a strong, documented reason.', 92, '  '));
    }
    const earlierWhy = earlierDisagreed && before!.supportsReliance !== f.supportsReliance ? before!.reasoning.split(' The practitioner concluded otherwise: ')[1] : undefined;
    const why = await a.text({
      id: `conclude.attribute.${f.attributeId}.reason`,
      message: `Why do you conclude that ${f.attributeId} ${f.supportsReliance ? 'does not support' : 'supports'} reliance?`,
      ...(earlierWhy ? { default: earlierWhy, editable: true } : {}),
      parse: requiredText('The reason'),
    });
    attributes.push({
      attributeId: f.attributeId,
      supportsReliance: !f.supportsReliance,
      reasoning: `${f.reasoning} The practitioner concluded otherwise: ${why}`,
    });
  }
  const all = attributes.every((x) => x.supportsReliance);
  const controlId = s.wp.control?.id ?? 'the control';
  const proposedText =
    all === proposal.control.supportsReliance
      ? proposal.control.text
      : all
        ? `The results support the planned reliance on ${controlId} for the period tested, as concluded by the practitioner.`
        : `The results do not support the planned reliance on ${controlId} (${attributes.filter((x) => !x.supportsReliance).map((x) => x.attributeId).join(', ')}). The follow-up actions below apply.`;
  const earlierText = prior && prior.control.supportsReliance === all && prior.control.text !== proposedText ? prior.control.text : undefined;
  if (prior && prior.control.supportsReliance !== all) {
    s.print(...wrap(`Changed: earlier the conclusion on the control was that the results ${prior.control.supportsReliance ? 'support' : 'do not support'} the planned reliance; now they ${all ? 'do' : 'do not'}. The proposed wording replaces your earlier one.`, 92, '  '));
  }
  const text = await a.text({
    id: 'conclude.control.text',
    message: 'Conclusion on the control (edit it, or press Enter to keep it)',
    default: earlierText ?? proposedText,
    editable: true,
    parse: requiredText('The conclusion'),
  });
  const followUps = await askFollowUps(s, proposal.followUps, prior?.followUps ?? []);
  const severity = all ? undefined : await askSeverity(s, prior?.severity);
  s.print('', ...wrap(CAUTION));
  return {
    attributes,
    qualitative: {
      intentionalFound: proposal.qualitative.intentionalFound,
      systemicFound: proposal.qualitative.systemicFound,
      ...(compensatingControls ? { compensatingControls } : {}),
      ...(notes ? { notes } : {}),
    },
    control: { supportsReliance: all, text },
    ...(severity ? { severity } : {}),
    followUps,
    concludedAt: s.now().toISOString(),
  };
}

export async function askSignoff(s: Session): Promise<{ name: string; date: string }> {
  const a = s.asker;
  s.heading('Sign-off');
  const name = await a.text({
    id: 'signoff.name',
    message: 'Prepared by',
    ...(s.wp.engagement ? { default: s.wp.engagement.preparer } : {}),
    parse: requiredText('The preparer'),
  });
  const start = s.wp.engagement?.periodStart;
  const d = await a.text({
    id: 'signoff.date',
    message: 'Date (YYYY-MM-DD)',
    default: today(s.now()),
    parse: date('Sign-off date', start ? { notBefore: start, notBeforeWhat: 'the start of the period' } : {}),
  });
  return { name, date: d };
}
