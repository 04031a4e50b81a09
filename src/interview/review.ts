/**
 * The review, in the interview: the reviewer's sitting (`tolrate review FILE`: re-performance
 * first, then each section shown with the notes raised on it, the answered notes cleared or
 * re-opened, and the reviewer's sign-off), and the preparer's answers to open notes at the start
 * of every preparer sitting. The rules (what may follow what, when the reviewer may sign) are in
 * src/control-test/review.ts.
 */
import { relative } from 'node:path';
import { TolrateInputError } from '../errors.js';
import {
  addNoteEvent,
  addSitting,
  checkNoteItem,
  noteStatus,
  notes,
  raiseNote,
  REVIEW_SECTION_LABELS,
  reviewerSignoffProblems,
  reviewStatus,
  SECTION_STEPS,
  STEP_LABELS,
  type StepName,
} from '../control-test/index.js';
import { REVIEW_SECTIONS, type ReviewNote, type ReviewSection, type Workpaper } from '../workpaper/schema.js';
import { formatReport, reperform } from '../reperform/index.js';
import { describePeriods, groupDigits } from '../population/index.js';
import { int, pct, pctPlain } from '../util/format.js';
import type { Session } from './session.js';
import { date, requiredText, today } from './parse.js';
import { evaluationLines } from './conclude.js';
import { recordSummary } from './record.js';
import { wrap } from './show.js';

/** A note's thread, as lines. */
export function threadLines(n: ReviewNote): string[] {
  const head = `${n.id} on ${REVIEW_SECTION_LABELS[n.section]}${n.item ? `, item ${n.item}` : ''}${n.mustClear ? ' (must be cleared before sign-off)' : ''}: ${noteStatus(n)}`;
  const lines = [`  ${head}`];
  for (const e of n.thread) {
    const what = e.kind === 'raised' ? 'raised' : e.kind === 'answered' ? (e.changedRecord ? 'answered, with a change to the record' : 'answered') : e.kind === 'reopened' ? 're-opened' : 'cleared';
    lines.push(...wrap(`${what} by ${e.by} (${e.role}), ${e.at.replace('T', ' ').replace(/(\.\d+)?Z$/, ' UTC')}${e.text ? `: ${e.text}` : ''}`, 92, '    '));
  }
  return lines;
}

/** What was recorded for a section, as lines for the reviewer. */
export function sectionLines(wp: Workpaper, section: ReviewSection): string[] {
  const L: string[] = [];
  const kv = (k: string, v: string | undefined) => v !== undefined && L.push(...wrap(`${k}: ${v}`, 92, '  '));
  switch (section) {
    case 'engagement': {
      const e = wp.engagement;
      const c = wp.control;
      kv('Entity', e?.entity);
      kv('Period', e ? `${e.periodStart} to ${e.periodEnd}` : undefined);
      kv('Reference', e?.reference);
      kv('Preparer / reviewer', e ? `${e.preparer} / ${e.reviewer}` : undefined);
      kv('Control', c ? `${c.id}: ${c.description}` : undefined);
      kv('Objective', c?.objective);
      kv('Owner, frequency, nature, key', c ? `${c.owner}; ${c.frequency}; ${c.nature}; ${c.key ? 'key control' : 'not a key control'}` : undefined);
      break;
    }
    case 'attributes':
      for (const a of wp.attributes ?? []) kv(a.id, `${a.description}. Deviation: ${a.deviationDefinition}${a.tolerableRate !== undefined ? ` (tolerable ${pctPlain(a.tolerableRate)})` : ''}`);
      break;
    case 'population': {
      const p = wp.population;
      if (!p) break;
      kv('Population', `${p.description}; sampling unit: ${p.samplingUnit}`);
      kv('Source', p.source.kind === 'ranges' ? `ranges ${p.source.ranges}` : p.source.kind === 'periods' ? describePeriods(p.source) : p.source.path);
      kv('Count', `${int(p.fingerprint.rowCount)} (ledger ${p.tieOut.ledgerCount !== undefined ? int(p.tieOut.ledgerCount) : 'not given'}, difference ${p.tieOut.countDifference !== undefined ? int(p.tieOut.countDifference) : 'n/a'})`);
      kv('Total', p.fingerprint.amountTotal !== undefined ? `${groupDigits(p.fingerprint.amountTotal)} (ledger ${p.tieOut.ledgerTotal !== undefined ? groupDigits(p.tieOut.ledgerTotal) : 'not given'}, difference ${p.tieOut.totalDifference !== undefined ? groupDigits(p.tieOut.totalDifference) : 'n/a'})` : undefined);
      kv('Ledger source', p.tieOut.ledgerSource);
      kv('Explanation of differences', p.tieOut.explanation);
      kv('Validation', p.validation.ok ? 'no problems' : `${p.validation.messages.length} problem(s) accepted: ${p.validation.acceptedReason ?? ''}`);
      break;
    }
    case 'approach': {
      const a = wp.approach;
      if (!a) break;
      kv('Approach', `${a.kind}, ${pctPlain(a.confidence)} confidence, tolerable ${pct(a.tolerableRate)}, expected ${pct(a.expectedRate)}, ${a.model} model`);
      kv('Sample size', `${int(a.sampleSize)}`);
      kv('Rationale', a.rationale);
      break;
    }
    case 'selection': {
      const s = wp.selection;
      if (!s) break;
      kv('Method', `${s.method} (${s.algorithm.split(':')[0]})${s.seed ? `, seed ${s.seed}` : ''}`);
      kv('Items', `${int(s.sampleSize)} and ${int(s.spares)} spares; first: ${s.items.slice(0, 6).map((i) => i.key).join(', ')}${s.items.length > 6 ? ', ...' : ''}`);
      break;
    }
    case 'results':
      if (wp.results) L.push(...recordSummary(wp));
      for (const r of wp.results?.items ?? []) {
        for (const [id, x] of Object.entries(r.attributes)) {
          if (x.result === 'deviation') L.push(...wrap(`${r.key} ${id}: ${x.found} (cause ${x.cause}${x.causeDetail ? `: ${x.causeDetail}` : ''}; intentional ${x.intentional}; ${x.pattern})`, 92, '  '));
        }
      }
      break;
    case 'evaluation':
      if (wp.evaluation) L.push(...evaluationLines(wp, wp.evaluation));
      break;
    case 'conclusion': {
      const c = wp.conclusion;
      if (!c) break;
      kv('Conclusion', c.control.text);
      kv('Compensating controls', c.qualitative.compensatingControls ?? 'none');
      for (const f of c.followUps) kv(`Follow-up (${f.kind})`, `${f.description} Owner ${f.owner ?? 'none'}, due ${f.due ?? 'none'}.`);
      break;
    }
    case 'severity': {
      const v = wp.conclusion?.severity;
      if (!v) {
        if (wp.conclusion) L.push('  Not assessed: the results support reliance.');
        break;
      }
      kv('Classification', `${v.classification}: ${v.rationale}`);
      for (const x of v.answers) kv(x.question, x.answer);
      break;
    }
  }
  if (L.length === 0) L.push('  Nothing recorded.');
  return L;
}

/** Re-perform the workpaper for the reviewer; every difference (or why it could not run) is returned. */
async function reperformFor(s: Session): Promise<string[]> {
  try {
    const report = await reperform({ workpaper: s.wp, workpaperPath: s.path });
    s.print('', ...formatReport({ ...report, workpaperPath: relative(s.cwd, s.path) || s.path }).trimEnd().split('\n').map((l) => `  ${l}`));
    return report.checks.flatMap((c) => c.differences.map((d) => `${c.area}: ${d}`));
  } catch (e) {
    if (!(e instanceof TolrateInputError)) throw e;
    s.print('', `  Re-performance could not be completed: ${e.message}`);
    return [`could not be completed: ${e.message}`];
  }
}

/** The reviewer's sitting. */
export async function reviewSitting(s: Session): Promise<void> {
  const a = s.asker;
  const wp = s.wp;
  const prep = wp.signoffs?.preparer;
  if (!prep) {
    throw new TolrateInputError('The test is not signed off by its preparer yet, so there is nothing to review.', 'NOT_PREPARED', [
      `The preparer signs off at the end of: ${s.command('conclude', relative(s.cwd, s.path) || s.path)}`,
    ]);
  }
  s.heading('Review');
  const name = await a.text({
    id: 'review.reviewer',
    message: 'Reviewed by',
    ...(wp.engagement?.reviewer ? { default: wp.engagement.reviewer } : {}),
    parse: requiredText('The reviewer'),
  });
  s.actor = { name, role: 'reviewer' };
  const same = name.trim().toLowerCase() === prep.name.trim().toLowerCase();
  const warning = same ? `The reviewer (${name}) is the preparer who signed off: a review by the preparer is not an independent review.` : undefined;
  if (warning) s.print('', ...wrap(`Warning: ${warning} The warning is recorded in the workpaper and shown in the memo.`, 92, '  '));
  s.wp = addSitting(s.wp, name, s.now(), warning);
  await s.save('review.start');
  s.print('', '  Re-performance first:');
  const differences = await reperformFor(s);

  // Answered notes: clear, or re-open with a further comment.
  const answered = notes(s.wp).filter((n) => noteStatus(n) === 'answered');
  if (answered.length > 0) s.heading('Answered notes');
  for (const n of answered) {
    s.print('', ...threadLines(n));
    const what = await a.select({
      id: `review.note.${n.id}.decision`,
      message: `${n.id}: clear it or re-open it?`,
      choices: [
        { value: 'clear', name: 'Clear it: the answer resolves the note' },
        { value: 'reopen', name: 'Re-open it with a further comment' },
        { value: 'later', name: 'Leave it for now' },
      ],
    });
    if (what === 'later') continue;
    const text =
      what === 'reopen'
        ? await a.text({ id: `review.note.${n.id}.comment`, message: 'Further comment', parse: requiredText('The comment') })
        : undefined;
    s.wp = addNoteEvent(s.wp, n.id, { kind: what === 'clear' ? 'cleared' : 'reopened', by: name, role: 'reviewer', at: s.now().toISOString(), ...(text ? { text } : {}) });
    await s.save(`review.note.${n.id}`);
  }

  // Each section, with what was recorded; notes on it or on one of its items.
  for (const section of REVIEW_SECTIONS) {
    s.heading(REVIEW_SECTION_LABELS[section]);
    s.print(...sectionLines(s.wp, section));
    for (const n of notes(s.wp).filter((x) => x.section === section && noteStatus(x) !== 'cleared')) s.print(...threadLines(n));
    const onItems = section === 'selection' || section === 'results';
    for (let i = 1; ; i++) {
      const id = `review.${section}.note.${i}`;
      const what = await a.select({
        id,
        message: 'Raise a review note here?',
        choices: [
          { value: 'no', name: 'No' },
          { value: 'section', name: `Yes, on ${REVIEW_SECTION_LABELS[section].toLowerCase()}` },
          ...(onItems ? [{ value: 'item' as const, name: 'Yes, on one item' }] : []),
        ],
        default: 'no',
      });
      if (what === 'no') break;
      const item =
        what === 'item'
          ? await a.text({ id: `${id}.item`, message: 'Which item (its key)?', parse: (t) => checkNoteItem(s.wp, t) })
          : undefined;
      const text = await a.text({ id: `${id}.text`, message: 'The note', help: 'What the preparer should answer or do.', parse: requiredText('The note') });
      const mustClear = await a.confirm({ id: `${id}.mustClear`, message: 'Must it be cleared before you sign off?', default: true });
      const got = raiseNote(s.wp, { section, ...(item ? { item } : {}), text, mustClear, by: name, at: s.now() });
      s.wp = got.wp;
      await s.save(`review.note.${got.note.id}`);
      s.print(`  Raised ${got.note.id}.`);
    }
  }

  // The reviewer's sign-off.
  s.heading('Reviewer sign-off');
  const problems = reviewerSignoffProblems(s.wp, differences);
  if (problems.length > 0) {
    s.print('  The reviewer cannot sign off yet:', ...problems.flatMap((p) => wrap(p, 88, '    ').map((l, i) => (i === 0 ? `  - ${l.trimStart()}` : l))));
    const st = reviewStatus(s.wp);
    s.print('', `  Status: ${st.label}.`);
    if (st.open > 0) s.print(...wrap(`The preparer answers the open notes with: ${s.command('', relative(s.cwd, s.path) || s.path)}`, 92, '  '));
    return;
  }
  const sign = await a.confirm({ id: 'review.signoff', message: 'Sign off the review now?', default: true });
  if (!sign) {
    s.print('', `  Not signed off. Status: ${reviewStatus(s.wp).label}.`);
    return;
  }
  const d = await a.text({
    id: 'review.signoff.date',
    message: 'Date (YYYY-MM-DD)',
    default: today(s.now()),
    parse: (t) => {
      const v = date('Review sign-off date', { notBefore: prep.date, notBeforeWhat: `the preparer's sign-off` })(t);
      if (v > today(s.now())) throw new TolrateInputError(`Review sign-off date: ${v} is after today (${today(s.now())}).`);
      return v;
    },
  });
  s.wp = { ...s.wp, signoffs: { ...(s.wp.signoffs ?? {}), reviewer: { name, date: d } } };
  await s.save('review.signoff');
  s.print('', `  Reviewed and signed off by ${name} on ${d}.`);
}

/**
 * At the start of a preparer's sitting: the open review notes, each answered, or answered after
 * changing the record (the step is run again; the change is an amendment and clears the sign-offs).
 */
export async function answerOpenNotes(s: Session, runStep: (st: StepName) => Promise<unknown>): Promise<void> {
  const open = notes(s.wp).filter((n) => noteStatus(n) === 'open');
  if (open.length === 0) return;
  s.heading(`Review notes to answer (${open.length})`);
  for (const n of open) {
    s.print('', ...threadLines(n));
    // The roll-forward's steps only for a test that has a roll-forward part.
    const steps = SECTION_STEPS[n.section].filter((st) => !st.startsWith('rollforward.') || s.wp.rollForward !== undefined);
    const what = await s.asker.select({
      id: `notes.${n.id}.action`,
      message: `${n.id}: how do you answer it?`,
      choices: [
        { value: 'answer', name: 'Answer it (no change to the record)' },
        ...steps.map((st) => ({ value: `change:${st}`, name: `Change the record (${STEP_LABELS[st]}), then answer` })),
        { value: 'later', name: 'Later' },
      ],
    });
    if (what === 'later') continue;
    let changed = false;
    if (what.startsWith('change:')) {
      const st = what.slice('change:'.length) as StepName;
      const before = s.wp.log.length;
      s.focusItem = n.item;
      await runStep(st);
      s.focusItem = undefined;
      changed = s.wp.log.length > before;
    }
    const text = await s.asker.text({ id: `notes.${n.id}.answer`, message: 'Your answer', parse: requiredText('The answer') });
    s.wp = addNoteEvent(s.wp, n.id, { kind: 'answered', by: s.by, role: 'preparer', at: s.now().toISOString(), text, ...(changed ? { changedRecord: true } : {}) });
    await s.save(`notes.${n.id}.answer`);
  }
}

/** Used by the start screen and the step list. */
export function reviewLine(wp: Workpaper): string {
  return `  Review: ${reviewStatus(wp).label}`;
}
