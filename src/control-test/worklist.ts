/**
 * The worklist of a test: which items are tested, in which order. The tested items are the
 * sample items in draw order, each followed, when it was properly voided, by the spare that
 * replaces it (spares are used in draw order). This is the only place that knows the rule: the
 * interview records against it, the evaluation counts only its items, and re-performance names
 * any result that does not fit it.
 */
import type { ItemResult, SelectedItem, Workpaper } from '../workpaper/schema.js';
import { needsSecondStage, twoStageOf } from './plan.js';

export interface WorkItem {
  item: SelectedItem;
  /** The voided item this spare replaces. */
  replaces?: string;
  /** Two-stage plan: the stage the item belongs to (a spare takes the stage of the item it replaces). */
  stage?: 1 | 2;
  /** The attributes this item is tested for: every attribute, or at the second stage those that need it. */
  attributes: string[];
}

/** Two-stage plan: where the stages stand. */
export interface StageState {
  /** Every first-stage item has its result. */
  firstComplete: boolean;
  /** Deviations found at the first stage, by attribute (so far, when it is not complete). */
  firstDeviations: Record<string, number>;
  /** With the first stage complete: the attributes whose first-stage deviations leave the decision to the second stage (c1 < k1 < r1). */
  secondNeeded: string[];
  /** The second-stage sample items (on the worklist only when the second stage is needed). */
  secondItems: SelectedItem[];
}

export interface Worklist {
  /** The items to test, in order: each sample item, and after a voided one the spare that replaces it. */
  items: WorkItem[];
  /** The first item with no result, or undefined when all are recorded. */
  next: WorkItem | undefined;
  /** The next spare not yet used, if any. */
  nextSpare: SelectedItem | undefined;
  /** Voided items for which no spare was left. */
  shortBy: number;
  /** Two-stage plan only. */
  stages?: StageState;
}

function byKey(wp: Workpaper): Map<string, ItemResult> {
  return new Map((wp.results?.items ?? []).map((r) => [r.key, r]));
}

/**
 * True when the item's result is complete: void, or a result for every attribute the item is
 * tested for (every attribute, or at the second stage of a two-stage plan the ones that need it).
 * The one rule the interview, the sheet reader, the evaluation and re-performance use.
 */
export function isComplete(r: ItemResult | undefined, work: Pick<WorkItem, 'attributes'>): boolean {
  return r !== undefined && (r.void !== undefined || work.attributes.every((id) => r.attributes[id] !== undefined));
}

/** The stage of each sample item under a two-stage plan: as recorded, else by draw order (the first n1 are stage 1). */
function stageOfItem(item: SelectedItem, index: number, n1: number): 1 | 2 {
  return item.stage ?? (index < n1 ? 1 : 2);
}

export function worklist(wp: Workpaper): Worklist {
  const sel = wp.selection;
  if (!sel) return { items: [], next: undefined, nextSpare: undefined, shortBy: 0 };
  const results = byKey(wp);
  const spares = sel.items.filter((i) => i.role === 'spare').sort((a, b) => a.seq - b.seq);
  const sample = sel.items.filter((i) => i.role === 'sample').sort((a, b) => a.seq - b.seq);
  const used = new Set([...results.values()].map((r) => r.void?.replacedBy).filter((k): k is string => k !== undefined));
  const all = (wp.attributes ?? []).map((a) => a.id);
  const items: WorkItem[] = [];
  let shortBy = 0;
  const visit = (item: SelectedItem, attributes: string[], stage: 1 | 2 | undefined, replaces?: string) => {
    items.push({ item, ...(replaces ? { replaces } : {}), ...(stage ? { stage } : {}), attributes });
    const r = results.get(item.key);
    if (r?.void) {
      const spare = r.void.replacedBy ? spares.find((s) => s.key === r.void!.replacedBy) : undefined;
      if (spare) visit(spare, attributes, stage, item.key);
      else shortBy++;
    }
  };
  const plan = twoStageOf(wp);
  let stages: StageState | undefined;
  if (!plan) {
    for (const it of sample) visit(it, all, undefined);
  } else {
    const first = sample.filter((it, i) => stageOfItem(it, i, plan.firstSampleSize) === 1);
    const second = sample.filter((it, i) => stageOfItem(it, i, plan.firstSampleSize) === 2);
    for (const it of first) visit(it, all, 1);
    const firstComplete = items.every((x) => isComplete(results.get(x.item.key), x));
    const firstDeviations: Record<string, number> = {};
    for (const id of all) {
      firstDeviations[id] = items.filter((x) => {
        const r = results.get(x.item.key);
        return r && !r.void && r.attributes[id]?.result === 'deviation';
      }).length;
    }
    const secondNeeded = firstComplete ? all.filter((id) => needsSecondStage(plan, firstDeviations[id]!)) : [];
    if (secondNeeded.length > 0) for (const it of second) visit(it, secondNeeded, 2);
    stages = { firstComplete, firstDeviations, secondNeeded, secondItems: second };
  }
  return {
    items,
    next: items.find((x) => !isComplete(results.get(x.item.key), x)),
    nextSpare: spares.find((s) => !used.has(s.key) && !results.has(s.key)),
    shortBy,
    ...(stages ? { stages } : {}),
  };
}

/** True when the item is on the worklist and has its complete result (void, or every attribute it is tested for). */
export function isRecorded(wp: Workpaper, key: string): boolean {
  const w = worklist(wp).items.find((x) => x.item.key === key);
  return w !== undefined && isComplete(wp.results?.items.find((x) => x.key === key), w);
}

/** Items of the worklist with their result, and in all. */
export function progress(wp: Workpaper): { recorded: number; total: number } {
  const wl = worklist(wp);
  const results = byKey(wp);
  return { recorded: wl.items.filter((x) => isComplete(results.get(x.item.key), x)).length, total: wl.items.length };
}

export function recordingComplete(wp: Workpaper): boolean {
  return wp.selection !== undefined && wp.results !== undefined && worklist(wp).next === undefined;
}

/** The tested items: the worklist's items that have a result and are not void, in worklist order. */
export function testedResults(wp: Workpaper): ItemResult[] {
  return testedWork(wp).map((x) => x.result);
}

/** The tested items with their place on the worklist (stage, attributes tested for). */
export function testedWork(wp: Workpaper): Array<{ work: WorkItem; result: ItemResult }> {
  const results = byKey(wp);
  return worklist(wp)
    .items.map((work) => ({ work, result: results.get(work.item.key) }))
    .filter((x): x is { work: WorkItem; result: ItemResult } => x.result !== undefined && x.result.void === undefined);
}

/**
 * results.items in the order of the worklist: the recorded results, and a placeholder (no result
 * yet) for every other item to test. Keeping every item in place means each later save changes
 * one element, so the change log names the item recorded.
 */
function arranged(wp: Workpaper, items: readonly ItemResult[]): ItemResult[] {
  const probe: Workpaper = { ...wp, results: { source: 'interview', items: [...items], recordedAt: wp.updatedAt } };
  const by = new Map(items.map((r) => [r.key, r]));
  return worklist(probe).items.map(
    ({ item, replaces }) => by.get(item.key) ?? { key: item.key, seq: item.seq, ...(replaces ? { replaces } : {}), attributes: {} },
  );
}

/**
 * The workpaper with one item's result recorded (replacing any earlier result of that item).
 * Results are kept in worklist order; a result for an item off the worklist cannot be recorded.
 */
export function withResult(
  wp: Workpaper,
  r: ItemResult,
  o: { source: 'interview' | 'sheet'; sheetPath?: string | readonly string[]; at: Date },
): Workpaper {
  const prev = wp.results;
  const items = arranged(wp, [...(prev?.items ?? []).filter((x) => x.key !== r.key), r]);
  if (!items.some((x) => x.key === r.key)) throw new Error(`internal: ${r.key} is not on the worklist`);
  const src = prev?.source === 'sheet' || o.source === 'sheet' ? 'sheet' : 'interview';
  // Several sheets (one per tester): every one kept, the first also as sheetPath.
  const paths = o.sheetPath === undefined ? (prev?.sheetPaths ?? (prev?.sheetPath ? [prev.sheetPath] : [])) : typeof o.sheetPath === 'string' ? [o.sheetPath] : [...o.sheetPath];
  return {
    ...wp,
    results: { source: src, ...(paths[0] ? { sheetPath: paths[0] } : {}), ...(paths.length > 1 ? { sheetPaths: paths } : {}), items, recordedAt: o.at.toISOString() },
  };
}

/** The result of voiding an item: it is replaced by the next unused spare (or the sample is one short). */
export function voidResult(wp: Workpaper, item: SelectedItem, replaces: string | undefined, reason: string): { result: ItemResult; spare: SelectedItem | undefined } {
  const spare = worklist(wp).nextSpare;
  return {
    result: { key: item.key, seq: item.seq, ...(replaces ? { replaces } : {}), void: { reason, ...(spare ? { replacedBy: spare.key } : {}) }, attributes: {} },
    spare,
  };
}

/**
 * Every way the recorded results do not fit the selection: a result for an item that is not on
 * the worklist, a worklist item without a complete result, a spare used without a voided item
 * before it, a void replaced by a spare out of draw order, or results out of worklist order.
 * Empty when results and selection agree. Missing results count only with `requireComplete` (a
 * test that was evaluated claims every item has its result).
 */
export function worklistProblems(wp: Workpaper, o: { requireComplete?: boolean } = {}): string[] {
  if (!wp.results || !wp.selection) return [];
  const problems: string[] = [];
  const wl = worklist(wp);
  const onList = new Map(wl.items.map((x, i) => [x.item.key, { ...x, at: i }]));
  const selected = new Map(wp.selection.items.map((i) => [i.key, i]));
  const spares = wp.selection.items.filter((i) => i.role === 'spare').sort((a, b) => a.seq - b.seq);
  const results = wp.results.items;
  const seen = new Set<string>();
  for (const r of results) {
    if (seen.has(r.key)) problems.push(`${r.key}: recorded more than once`);
    seen.add(r.key);
    const sel = selected.get(r.key);
    if (!sel) {
      problems.push(`${r.key}: a result is recorded for an item that was not selected`);
      continue;
    }
    const w = onList.get(r.key);
    if (!w) {
      const hasResult = r.void !== undefined || Object.keys(r.attributes).length > 0;
      if (sel.role === 'sample' && sel.stage === 2 && hasResult) problems.push(`${r.key} (item ${sel.seq}, second stage): a result is recorded, but the first stage decided every attribute, so the second stage is not tested`);
      else if (sel.role === 'spare' && hasResult) problems.push(`${r.key} (spare, item ${sel.seq}): a result is recorded for a spare that replaces no voided item`);
      else if (hasResult) problems.push(`${r.key} (item ${sel.seq}): a result is recorded for an item that is not on the worklist`);
      continue;
    }
    if (r.seq !== sel.seq) problems.push(`${r.key}: recorded as item ${r.seq}, selected as item ${sel.seq}`);
    if ((r.replaces ?? undefined) !== (w.replaces ?? undefined)) {
      problems.push(`${r.key}: recorded as replacing ${r.replaces ?? 'nothing'}, but on the worklist it replaces ${w.replaces ?? 'nothing'}`);
    }
  }
  // Voids take the spares in draw order.
  const voided = wl.items.map((x) => results.find((r) => r.key === x.item.key)).filter((r): r is ItemResult => r?.void?.replacedBy !== undefined);
  voided.forEach((r, i) => {
    const expected = spares[i];
    if (expected && r.void!.replacedBy !== expected.key) {
      problems.push(`${r.key}: voided and replaced by spare ${r.void!.replacedBy}, but the next spare in draw order was ${expected.key}`);
    }
    const sp = selected.get(r.void!.replacedBy!);
    if (!sp || sp.role !== 'spare') problems.push(`${r.key}: replaced by ${r.void!.replacedBy}, which is not a selected spare`);
  });
  for (const x of o.requireComplete ? wl.items : []) {
    const r = results.find((y) => y.key === x.item.key);
    if (!isComplete(r, x)) problems.push(`${x.item.key} (item ${x.item.seq}${x.replaces ? `, spare replacing ${x.replaces}` : ''}): on the worklist but has no complete result`);
  }
  // Order: sample items' results follow the draw order (seq), and so do the spares' among themselves.
  for (const role of ['sample', 'spare'] as const) {
    const seqs = results.filter((r) => selected.get(r.key)?.role === role && onList.has(r.key));
    for (let i = 1; i < seqs.length; i++) {
      if (seqs[i]!.seq < seqs[i - 1]!.seq) {
        problems.push(`results are out of draw order: ${seqs[i]!.key} (item ${seqs[i]!.seq}) is recorded after ${seqs[i - 1]!.key} (item ${seqs[i - 1]!.seq})`);
        break;
      }
    }
  }
  return problems;
}
