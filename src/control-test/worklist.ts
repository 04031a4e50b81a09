/**
 * The worklist of a test: which items are tested, in which order. The tested items are the
 * sample items in draw order, each followed, when it was properly voided, by the spare that
 * replaces it (spares are used in draw order). This is the only place that knows the rule: the
 * interview records against it, the evaluation counts only its items, and re-performance names
 * any result that does not fit it.
 */
import type { ItemResult, SelectedItem, Workpaper } from '../workpaper/schema.js';

export interface WorkItem {
  item: SelectedItem;
  /** The voided item this spare replaces. */
  replaces?: string;
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
}

function byKey(wp: Workpaper): Map<string, ItemResult> {
  return new Map((wp.results?.items ?? []).map((r) => [r.key, r]));
}

/** True when the result is complete: void, or a result for every attribute. */
export function isComplete(wp: Workpaper, r: ItemResult | undefined): boolean {
  return r !== undefined && (r.void !== undefined || (wp.attributes ?? []).every((a) => r.attributes[a.id] !== undefined));
}

export function worklist(wp: Workpaper): Worklist {
  const sel = wp.selection;
  if (!sel) return { items: [], next: undefined, nextSpare: undefined, shortBy: 0 };
  const results = byKey(wp);
  const spares = sel.items.filter((i) => i.role === 'spare').sort((a, b) => a.seq - b.seq);
  const sample = sel.items.filter((i) => i.role === 'sample').sort((a, b) => a.seq - b.seq);
  const used = new Set([...results.values()].map((r) => r.void?.replacedBy).filter((k): k is string => k !== undefined));
  const items: WorkItem[] = [];
  let shortBy = 0;
  const visit = (item: SelectedItem, replaces?: string) => {
    items.push({ item, ...(replaces ? { replaces } : {}) });
    const r = results.get(item.key);
    if (r?.void) {
      const spare = r.void.replacedBy ? spares.find((s) => s.key === r.void!.replacedBy) : undefined;
      if (spare) visit(spare, item.key);
      else shortBy++;
    }
  };
  for (const it of sample) visit(it);
  return {
    items,
    next: items.find((x) => !isComplete(wp, results.get(x.item.key))),
    nextSpare: spares.find((s) => !used.has(s.key) && !results.has(s.key)),
    shortBy,
  };
}

/** True when the item has its result: void, or a result for every attribute. */
export function isRecorded(wp: Workpaper, key: string): boolean {
  return isComplete(wp, wp.results?.items.find((x) => x.key === key));
}

/** Items of the worklist with their result, and in all. */
export function progress(wp: Workpaper): { recorded: number; total: number } {
  const wl = worklist(wp);
  const results = byKey(wp);
  return { recorded: wl.items.filter((x) => isComplete(wp, results.get(x.item.key))).length, total: wl.items.length };
}

export function recordingComplete(wp: Workpaper): boolean {
  return wp.selection !== undefined && wp.results !== undefined && worklist(wp).next === undefined;
}

/** The tested items: the worklist's items that have a result and are not void, in worklist order. */
export function testedResults(wp: Workpaper): ItemResult[] {
  const results = byKey(wp);
  return worklist(wp)
    .items.map((x) => results.get(x.item.key))
    .filter((r): r is ItemResult => r !== undefined && r.void === undefined);
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
      if (sel.role === 'spare' && hasResult) problems.push(`${r.key} (spare, item ${sel.seq}): a result is recorded for a spare that replaces no voided item`);
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
    if (!isComplete(wp, r)) problems.push(`${x.item.key} (item ${x.item.seq}${x.replaces ? `, spare replacing ${x.replaces}` : ''}): on the worklist but has no complete result`);
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
