/**
 * The review of a test: the reviewer's notes and their threads (raised, answered, re-opened,
 * cleared, each with who and when), where the test stands (prepared, in review, reviewed), when
 * the reviewer may sign off, and the amendments made after a sign-off. Pure: no I/O.
 */
import { diff, content, formatPath } from '../workpaper/log.js';
import type { Amendment, NoteEvent, ReviewNote, ReviewSection, Role, Workpaper } from '../workpaper/schema.js';
import { TolrateInputError } from '../errors.js';
import type { StepName } from './steps.js';

export const REVIEW_SECTION_LABELS: Record<ReviewSection, string> = {
  engagement: 'Engagement and control',
  attributes: 'Attributes',
  population: 'Population and completeness',
  approach: 'Approach and sample size',
  selection: 'Selection',
  results: 'Results',
  evaluation: 'Evaluation',
  conclusion: 'Conclusion and follow-ups',
  severity: 'Severity',
};

/** The steps a preparer may change to answer a note on a section. */
export const SECTION_STEPS: Record<ReviewSection, StepName[]> = {
  engagement: ['plan.engagement', 'plan.control'],
  attributes: ['plan.attributes'],
  population: ['plan.population', 'rollforward.period', 'rollforward.population'],
  approach: ['plan.approach', 'rollforward.size'],
  selection: ['plan.selection', 'rollforward.selection'],
  results: ['record', 'rollforward.record'],
  evaluation: ['record', 'rollforward.record', 'conclude'],
  conclusion: ['conclude'],
  severity: ['conclude'],
};

export type NoteStatus = 'open' | 'answered' | 'cleared';

/** Open: raised or re-opened, waiting for the preparer. Answered: waiting for the reviewer. */
export function noteStatus(n: ReviewNote): NoteStatus {
  const last = n.thread[n.thread.length - 1]!;
  return last.kind === 'cleared' ? 'cleared' : last.kind === 'answered' ? 'answered' : 'open';
}

export function notes(wp: Workpaper): ReviewNote[] {
  return wp.review?.notes ?? [];
}

export interface ReviewStatus {
  stage: 'in progress' | 'prepared' | 'in review' | 'reviewed';
  /** Notes waiting for the preparer. */
  open: number;
  /** Notes answered, waiting for the reviewer. */
  answered: number;
  /** In words: "in review (2 open notes)". */
  label: string;
}

export function reviewStatus(wp: Workpaper): ReviewStatus {
  const all = notes(wp);
  const open = all.filter((n) => noteStatus(n) === 'open').length;
  const answered = all.filter((n) => noteStatus(n) === 'answered').length;
  const counts = [open ? `${open} open note${open === 1 ? '' : 's'}` : '', answered ? `${answered} answered, to clear` : ''].filter(Boolean).join(', ');
  if (wp.signoffs?.reviewer) return { stage: 'reviewed', open, answered, label: `reviewed by ${wp.signoffs.reviewer.name} on ${wp.signoffs.reviewer.date}` };
  if (all.length > 0 || (wp.review?.sittings.length ?? 0) > 0) return { stage: 'in review', open, answered, label: `in review${counts ? ` (${counts})` : ''}` };
  if (wp.signoffs?.preparer) return { stage: 'prepared', open, answered, label: `prepared by ${wp.signoffs.preparer.name} on ${wp.signoffs.preparer.date}, not yet reviewed` };
  return { stage: 'in progress', open, answered, label: `in progress${counts ? ` (${counts})` : ''}` };
}

/** Why the reviewer cannot sign off now (empty when they can). */
export function reviewerSignoffProblems(wp: Workpaper, reperformDifferences: readonly string[]): string[] {
  const out: string[] = [];
  if (!wp.signoffs?.preparer) out.push('the preparer has not signed off');
  for (const n of notes(wp)) {
    const st = noteStatus(n);
    if (n.mustClear && st !== 'cleared') out.push(`note ${n.id} (${REVIEW_SECTION_LABELS[n.section]}${n.item ? `, ${n.item}` : ''}) must be cleared first: it is ${st === 'open' ? 'waiting for the preparer\'s answer' : 'answered, not yet cleared'}`);
  }
  for (const d of reperformDifferences) out.push(`re-performance: ${d}`);
  return out;
}

/** A key of a selected item, or a refusal naming what is there. */
export function checkNoteItem(wp: Workpaper, key: string): string {
  const k = key.trim();
  const items = wp.selection?.items ?? [];
  if (items.some((i) => i.key === k)) return k;
  const sample = items.slice(0, 5).map((i) => i.key).join(', ');
  throw new TolrateInputError(`There is no selected item ${k}.${sample ? ` Selected items are, for example, ${sample}${items.length > 5 ? ` (and ${items.length - 5} more)` : ''}.` : ''}`, 'NO_SUCH_ITEM');
}

function withNotes(wp: Workpaper, list: ReviewNote[]): Workpaper {
  return { ...wp, review: { notes: list, sittings: wp.review?.sittings ?? [] } };
}

export function raiseNote(wp: Workpaper, o: { section: ReviewSection; item?: string; text: string; mustClear: boolean; by: string; at: Date }): { wp: Workpaper; note: ReviewNote } {
  const list = notes(wp);
  const id = `N${list.length + 1}`;
  const note: ReviewNote = {
    id,
    section: o.section,
    ...(o.item ? { item: checkNoteItem(wp, o.item) } : {}),
    mustClear: o.mustClear,
    thread: [{ kind: 'raised', by: o.by, role: 'reviewer', at: o.at.toISOString(), text: o.text }],
  };
  return { wp: withNotes(wp, [...list, note]), note };
}

/** Add an event to a note's thread, checking that it may follow the note's state. */
export function addNoteEvent(wp: Workpaper, id: string, e: NoteEvent): Workpaper {
  const list = notes(wp);
  const n = list.find((x) => x.id === id);
  if (!n) throw new TolrateInputError(`There is no review note ${id}.`);
  const st = noteStatus(n);
  const allowed = e.kind === 'answered' ? st === 'open' : e.kind === 'cleared' || e.kind === 'reopened' ? st === 'answered' : false;
  if (!allowed) throw new TolrateInputError(`Note ${id} is ${st}: it cannot be ${e.kind} now.`);
  return withNotes(wp, list.map((x) => (x.id === id ? { ...x, thread: [...x.thread, e] } : x)));
}

export function addSitting(wp: Workpaper, by: string, at: Date, warning?: string): Workpaper {
  return { ...wp, review: { notes: notes(wp), sittings: [...(wp.review?.sittings ?? []), { by, at: at.toISOString(), ...(warning ? { warning } : {}) }] } };
}

/** Members that are not the record itself: changing them is not an amendment. */
const NOT_RECORD = new Set(['signoffs', 'review', 'amendments', 'memos', 'updatedAt', 'unfinishedStep', 'earlierConclusion', 'log']);

/** The order of the record's members, for listing changes as the test runs. */
const ORDER = ['engagement', 'control', 'attributes', 'population', 'approach', 'selection', 'results', 'rollForward', 'evaluation', 'conclusion'];
/** When a step was answered: it changes with every answer, so it is not listed as a change. */
const TIMES = new Set(['scannedAt', 'selectedAt', 'recordedAt', 'evaluatedAt', 'concludedAt']);

/** The changes to the record between two states of a workpaper, as amendment changes (in step order, times left out). */
export function recordChanges(before: Workpaper, after: Workpaper): Amendment['changes'] {
  const rank = (p: readonly (string | number)[]) => {
    const i = ORDER.indexOf(String(p[0]));
    return i < 0 ? ORDER.length : i;
  };
  return diff(content(before), content(after))
    .filter((c) => !NOT_RECORD.has(String(c.path[0])) && !TIMES.has(String(c.path[c.path.length - 1])))
    .sort((x, y) => rank(x.path) - rank(y.path))
    .map((c) => ({ path: withItemKey(formatPath(c.path), before, after), ...(c.old !== undefined ? { old: c.old } : {}), ...(c.deleted ? {} : { new: c.new }) }));
}

/** "results.items[64].attributes.A1.cause" -> "results.items[64] (PI-253141).attributes.A1.cause", so a reader finds the item. */
function withItemKey(path: string, before: Workpaper, after: Workpaper): string {
  const m = /^(results|selection)\.items\[(\d+)\]/.exec(path);
  if (!m) return path;
  const i = Number(m[2]);
  const key = (m[1] === 'results' ? (after.results?.items[i] ?? before.results?.items[i]) : (after.selection?.items[i] ?? before.selection?.items[i]))?.key;
  return key ? `${m[0]} (${key})${path.slice(m[0].length)}` : path;
}

/** The sign-offs present (the ones a change to the record clears). */
export function signedRoles(wp: Workpaper): Role[] {
  return [...(wp.signoffs?.preparer ? (['preparer'] as const) : []), ...(wp.signoffs?.reviewer ? (['reviewer'] as const) : [])];
}
