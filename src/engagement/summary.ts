/**
 * The engagement summary's content, from the folder's workpapers: the workpapers it was written
 * from (with their state hashes), each control tested with its result per attribute, every
 * deviation with its cause, the deficiencies with the practitioner's classification and reasons,
 * and every follow-up action with owner and due date. Only concluded tests count as concluded;
 * a test in progress is listed as such. The DOCX and the XLSX are both written from this model.
 */
import { CAUSE_LABELS, countResults, FOLLOW_UP_LABELS, INTENT_LABELS, PATTERN_LABELS, SEVERITY_LABELS } from '../control-test/index.js';
import type { EngagementFolder } from './folder.js';
import type { FolderEntry, TestEntry } from './status.js';

export interface SummarySource {
  file: string;
  reference: string;
  control: string;
  /** concluded, in progress, or cannot be read. */
  state: 'concluded' | 'in progress' | 'cannot be read';
  stepReached: string;
  review: string;
  stateHash: string;
  problem?: string;
}

export interface SummaryResult {
  reference: string;
  control: string;
  attribute: string;
  description: string;
  sampleSize: number;
  deviations: number;
  sampleRate?: number;
  upperLimit?: number;
  tolerableRate?: number;
  /** The practitioner's decision; "in progress" for a test not concluded. */
  decision: string;
  concluded: boolean;
}

export interface SummaryDeviation {
  reference: string;
  control: string;
  item: string;
  attribute: string;
  found: string;
  cause: string;
  causeDetail: string;
  intentional: string;
  pattern: string;
  concluded: boolean;
}

export interface SummaryDeficiency {
  reference: string;
  control: string;
  classification: string;
  reasons: string;
  controlConclusion: string;
  supportsReliance: boolean;
}

export interface SummaryFollowUp {
  reference: string;
  control: string;
  kind: string;
  description: string;
  owner: string;
  due?: string;
  timing: string;
}

export interface SummaryModel {
  title: string;
  folder?: EngagementFolder;
  asOf: string;
  writtenAt: string;
  counts: { workpapers: number; concluded: number; inProgress: number; unreadable: number };
  sources: SummarySource[];
  controls: Array<{ reference: string; control: string; description: string; approach: string; sampleSize?: number; state: string; conclusion: string }>;
  results: SummaryResult[];
  deviations: SummaryDeviation[];
  deficiencies: SummaryDeficiency[];
  followUps: SummaryFollowUp[];
}

const ref = (e: TestEntry) => e.reference ?? e.file;

export function summaryModel(entries: readonly FolderEntry[], o: { folder?: EngagementFolder; asOf: string; now: Date }): SummaryModel {
  const tests = entries.filter((e): e is TestEntry => e.readable);
  const sources: SummarySource[] = entries.map((e) =>
    e.readable
      ? { file: e.file, reference: ref(e), control: e.control ?? '', state: e.concluded ? 'concluded' : 'in progress', stepReached: e.stepReached, review: e.review.label, stateHash: e.stateHash }
      : { file: e.file, reference: '', control: '', state: 'cannot be read', stepReached: '', review: '', stateHash: '', problem: e.problem },
  );
  const controls = tests.map((e) => ({
    reference: ref(e),
    control: e.control ?? '',
    description: e.controlDescription ?? '',
    approach: e.approach ?? 'not planned',
    ...(e.sampleSize !== undefined ? { sampleSize: e.sampleSize } : {}),
    state: e.concluded ? 'concluded' : `in progress (step reached: ${e.stepReached})`,
    conclusion: e.concluded ? e.workpaper.conclusion!.control.text : 'in progress: not concluded',
  }));
  const results: SummaryResult[] = tests.flatMap((e) =>
    e.attributes.map((a) => ({
      reference: ref(e),
      control: e.control ?? '',
      attribute: a.id,
      description: a.description,
      sampleSize: a.sampleSize,
      deviations: a.deviations,
      ...(a.sampleRate !== undefined ? { sampleRate: a.sampleRate } : {}),
      ...(a.upperLimit !== undefined ? { upperLimit: a.upperLimit } : {}),
      ...(a.tolerableRate !== undefined ? { tolerableRate: a.tolerableRate } : {}),
      decision: e.concluded ? a.decision : 'in progress: not concluded',
      concluded: e.concluded,
    })),
  );
  const deviations: SummaryDeviation[] = tests.flatMap((e) =>
    e.workpaper.attributes
      ? countResults(e.workpaper).flatMap((c) =>
          c.deviationRecords.map((d) => {
            const r = d.result.result === 'deviation' ? d.result : undefined;
            return {
              reference: ref(e),
              control: e.control ?? '',
              item: d.key,
              attribute: d.attributeId,
              found: r?.found ?? '',
              cause: r ? CAUSE_LABELS[r.cause] : '',
              causeDetail: r?.causeDetail ?? '',
              intentional: r ? INTENT_LABELS[r.intentional] : '',
              pattern: r ? PATTERN_LABELS[r.pattern] : '',
              concluded: e.concluded,
            };
          }),
        )
      : [],
  );
  const deficiencies: SummaryDeficiency[] = tests
    .filter((e) => e.concluded)
    .filter((e) => {
      const c = e.workpaper.conclusion!;
      return !c.control.supportsReliance || (c.severity !== undefined && c.severity.classification !== 'none');
    })
    .map((e) => {
      const c = e.workpaper.conclusion!;
      return {
        reference: ref(e),
        control: e.control ?? '',
        classification: c.severity ? SEVERITY_LABELS[c.severity.classification] : 'not classified',
        reasons: c.severity?.rationale ?? '',
        controlConclusion: c.control.text,
        supportsReliance: c.control.supportsReliance,
      };
    });
  const followUps: SummaryFollowUp[] = tests
    .filter((e) => e.concluded)
    .flatMap((e) =>
      e.followUps.map((f) => ({ reference: ref(e), control: e.control ?? '', kind: FOLLOW_UP_LABELS[f.kind], description: f.description, owner: f.owner ?? '', ...(f.due ? { due: f.due } : {}), timing: f.timing })),
    );
  const concluded = tests.filter((e) => e.concluded).length;
  return {
    title: o.folder ? `${o.folder.entity}: summary of the tests of controls` : 'Summary of the tests of controls',
    ...(o.folder ? { folder: o.folder } : {}),
    asOf: o.asOf,
    writtenAt: o.now.toISOString(),
    counts: { workpapers: entries.length, concluded, inProgress: tests.length - concluded, unreadable: entries.length - tests.length },
    sources,
    controls,
    results,
    deviations,
    deficiencies,
    followUps,
  };
}
