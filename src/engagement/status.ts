/**
 * Where every test of an engagement folder stands, read from its workpaper files: one entry per
 * `*.tolrate.json`, a file that cannot be read listed with its problem. Figures come from the
 * recorded evaluation (checked against the results by `testState`); a test without one shows the
 * deviations counted so far. Pure but for reading the files.
 */
import { basename, join } from 'node:path';
import { countResults, firstOpen, reviewStatus, STEP_LABELS, testState, type ReviewStatus } from '../control-test/index.js';
import { stateHash } from '../workpaper/log.js';
import { loadWorkpaper } from '../workpaper/file.js';
import type { FollowUp, Workpaper } from '../workpaper/schema.js';
import { workpaperFiles } from './folder.js';

/** Follow-ups due within this many days of the as-of date are listed as due. */
export const DUE_WITHIN_DAYS = 30;

export interface AttributeStatus {
  id: string;
  description: string;
  sampleSize: number;
  deviations: number;
  sampleRate?: number;
  upperLimit?: number;
  tolerableRate?: number;
  /** The practitioner's decision, once concluded: supports the planned reliance or not. */
  decision: 'supports reliance' | 'does not support reliance' | 'not concluded';
}

export interface FollowUpStatus extends FollowUp {
  /** Against the as-of date: overdue (due before it), due (within DUE_WITHIN_DAYS), later, or no date. */
  timing: 'overdue' | 'due' | 'later' | 'no due date';
}

export interface TestEntry {
  file: string;
  path: string;
  readable: true;
  stateHash: string;
  reference?: string;
  control?: string;
  controlDescription?: string;
  approach?: 'statistical' | 'non-statistical';
  sampleSize?: number;
  /** A test done at an interim date: the interim date and the roll-forward's size (sampleSize is the interim part's). */
  rollForward?: { interimDate: string; sampleSize?: number };
  attributes: AttributeStatus[];
  /** The first step not answered, or "complete". */
  stepReached: string;
  review: ReviewStatus;
  openNotes: number;
  followUps: FollowUpStatus[];
  /** Concluded: the conclusion is recorded (a test in progress is never counted as concluded). */
  concluded: boolean;
  /** Complete: nothing keeps its memo from being final (every step, the review, untouched, figures agree). */
  complete: boolean;
  /** Why it is not complete, in words. */
  notFinal: string[];
  /** Edited outside tolrate: the number of differences from its change log. */
  tampered: number;
  /** With --reperform: the differences re-performance found (empty when it agrees). */
  reperform?: string[];
  workpaper: Workpaper;
}

export interface UnreadableEntry {
  file: string;
  path: string;
  readable: false;
  problem: string;
}

export type FolderEntry = TestEntry | UnreadableEntry;

function daysBetween(from: string, to: string): number {
  return Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);
}

export function followUpTiming(f: FollowUp, asOf: string): FollowUpStatus['timing'] {
  if (!f.due) return 'no due date';
  const d = daysBetween(asOf, f.due);
  return d < 0 ? 'overdue' : d <= DUE_WITHIN_DAYS ? 'due' : 'later';
}

/** The entry of one workpaper. */
export function testEntry(wp: Workpaper, path: string, asOf: string): TestEntry {
  const st = testState(wp);
  const open = firstOpen(wp);
  const rv = reviewStatus(wp);
  const counts = wp.attributes ? countResults(wp) : [];
  const attributes: AttributeStatus[] = (wp.attributes ?? []).map((a) => {
    const ev = wp.evaluation?.attributes.find((x) => x.attributeId === a.id);
    const c = counts.find((x) => x.attributeId === a.id);
    const con = wp.conclusion?.attributes.find((x) => x.attributeId === a.id);
    return {
      id: a.id,
      description: a.description,
      sampleSize: ev?.sampleSize ?? c?.sampleSize ?? 0,
      deviations: ev?.deviations ?? c?.deviations ?? 0,
      ...(ev ? { sampleRate: ev.sampleRate, upperLimit: ev.upperLimit, tolerableRate: ev.tolerableRate } : {}),
      decision: con ? (con.supportsReliance ? 'supports reliance' : 'does not support reliance') : 'not concluded',
    };
  });
  return {
    file: basename(path),
    path,
    readable: true,
    stateHash: stateHash(wp),
    ...(wp.engagement ? { reference: wp.engagement.reference } : {}),
    ...(wp.control ? { control: wp.control.id, controlDescription: wp.control.description } : {}),
    ...(wp.approach ? { approach: wp.approach.kind, sampleSize: wp.approach.sampleSize } : {}),
    ...(wp.rollForward ? { rollForward: { interimDate: wp.rollForward.interimDate, ...(wp.rollForward.sampleSize !== undefined ? { sampleSize: wp.rollForward.sampleSize } : {}) } } : {}),
    attributes,
    stepReached: open ? STEP_LABELS[open] : 'complete',
    review: rv,
    openNotes: rv.open,
    followUps: (wp.conclusion?.followUps ?? []).map((f) => ({ ...f, timing: followUpTiming(f, asOf) })),
    concluded: wp.conclusion !== undefined && wp.evaluation !== undefined,
    complete: st.notFinal.length === 0,
    notFinal: st.notFinal,
    tampered: st.integrity.length,
    workpaper: wp,
  };
}

/** Every workpaper of a folder, in file-name order; unreadable files listed with their problem. */
export function folderStatus(dir: string, asOf: string): FolderEntry[] {
  return workpaperFiles(dir).map((file) => {
    const path = join(dir, file);
    try {
      return testEntry(loadWorkpaper(path), path, asOf);
    } catch (e) {
      const err = e as Error & { details?: string[] };
      const details = err.details?.length ? `: ${err.details.slice(0, 3).join('; ')}` : '';
      return { file, path, readable: false, problem: `${err.message.replace(/:$/, '')}${details}` } as UnreadableEntry;
    }
  });
}
