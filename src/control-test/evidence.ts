/**
 * The evidence of each tested item: who tested it, the date tested, the evidence inspected (one
 * or more references: a document number, a file name) and a note. A reference that names a file
 * beside the workpaper (in its folder or below) is fingerprinted with SHA-256 when it is recorded,
 * so that re-performance can say whether the file is still the one inspected. The interview and
 * the sheet reader ask or read; the rules are here.
 */
import { createHash } from 'node:crypto';
import { readFileSync, statSync } from 'node:fs';
import { isAbsolute, relative, resolve } from 'node:path';
import type { EvidenceRef, ItemResult, Workpaper } from '../workpaper/schema.js';
import { testedResults } from './worklist.js';

/** What is recorded beside an item's result. */
export interface ItemFieldwork {
  testedBy?: string;
  testedOn?: string;
  evidence?: EvidenceRef[];
  note?: string;
}

/** The separator between evidence references, in a typed answer or a sheet cell. */
export const EVIDENCE_SEPARATOR = ';';

/** The references in a typed answer or a cell: split at `;` or a line break, trimmed, each once. */
export function evidenceRefs(text: string): string[] {
  const out: string[] = [];
  for (const part of text.split(/[;\r\n]+/)) {
    const t = part.trim();
    if (t !== '' && !out.includes(t)) out.push(t);
  }
  return out;
}

/** The path of a reference if it names a file in the workpaper's folder or below, else undefined. */
export function evidenceFile(dir: string, ref: string): string | undefined {
  const abs = resolve(dir, ref);
  const rel = relative(dir, abs);
  if (rel === '' || rel.startsWith('..') || isAbsolute(rel)) return undefined;
  try {
    return statSync(abs).isFile() ? abs : undefined;
  } catch {
    return undefined;
  }
}

function sha256Of(path: string): { sha256: string; bytes: number } {
  const data = readFileSync(path);
  return { sha256: createHash('sha256').update(data).digest('hex'), bytes: data.length };
}

/** The references as recorded: a file beside the workpaper gets its SHA-256 and size. */
export function fingerprintEvidence(dir: string, refs: readonly string[]): EvidenceRef[] {
  return refs.map((ref) => {
    const file = evidenceFile(dir, ref);
    return file ? { ref, ...sha256Of(file) } : { ref };
  });
}

/** ISO date of a moment, in UTC. */
export function isoDay(at: Date): string {
  return at.toISOString().slice(0, 10);
}

/**
 * Why a date tested cannot be right, or undefined when it can: it must be a real date written
 * YYYY-MM-DD, not after today, and not before the period under test starts.
 */
export function testedOnProblem(text: string, o: { today: string; periodStart?: string }): string | undefined {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(text.trim());
  if (!m) return 'write the date tested as YYYY-MM-DD, e.g. 2026-01-20';
  const d = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])));
  if (isoDay(d) !== text.trim()) return `${text.trim()} is not a date`;
  if (text.trim() > o.today) return `${text.trim()} is after today (${o.today}): an item is recorded once it is tested`;
  if (o.periodStart && text.trim() < o.periodStart) return `${text.trim()} is before the period under test starts (${o.periodStart})`;
  return undefined;
}

/** The result with its fieldwork (tester, date, evidence, note) set; empty parts are left out. */
export function withFieldwork(r: ItemResult, f: ItemFieldwork): ItemResult {
  const { testedBy: _b, testedOn: _o, evidence: _e, note: _n, ...rest } = r;
  return {
    ...rest,
    ...(f.testedBy ? { testedBy: f.testedBy } : {}),
    ...(f.testedOn ? { testedOn: f.testedOn } : {}),
    ...(f.evidence && f.evidence.length > 0 ? { evidence: f.evidence } : {}),
    ...(f.note ? { note: f.note } : {}),
  };
}

/** Tested items without a tester, a date tested or any evidence (older sheets, or blank columns). */
export function fieldworkGaps(wp: Workpaper): Array<{ key: string; seq: number; missing: string[] }> {
  return testedResults(wp)
    .map((r) => ({
      key: r.key,
      seq: r.seq,
      missing: [!r.testedBy ? 'who tested it' : '', !r.testedOn ? 'the date tested' : '', !r.evidence?.length ? 'evidence' : ''].filter((x) => x !== ''),
    }))
    .filter((x) => x.missing.length > 0);
}

/**
 * Every evidence file recorded with a fingerprint that is no longer as recorded: missing, or its
 * SHA-256 differs. `dir` is the workpaper's folder.
 */
export function evidenceDifferences(wp: Workpaper, dir: string): { checked: number; differences: string[] } {
  let checked = 0;
  const differences: string[] = [];
  for (const r of wp.results?.items ?? []) {
    for (const e of r.evidence ?? []) {
      if (!e.sha256) continue;
      checked++;
      const file = evidenceFile(dir, e.ref);
      if (!file) {
        differences.push(`item ${r.seq} (${r.key}): evidence file ${e.ref} is missing (recorded with SHA-256 ${e.sha256.slice(0, 16)}…)`);
        continue;
      }
      const now = sha256Of(file);
      if (now.sha256 !== e.sha256) {
        differences.push(`item ${r.seq} (${r.key}): evidence file ${e.ref} has changed since it was recorded: SHA-256 recorded ${e.sha256.slice(0, 16)}…, now ${now.sha256.slice(0, 16)}…${e.bytes !== undefined && e.bytes !== now.bytes ? ` (${e.bytes} bytes then, ${now.bytes} now)` : ''}`);
      }
    }
  }
  return { checked, differences };
}

/**
 * True when two recordings of an item give the same finding (results, void, replacement): a
 * change to who tested it, when, the evidence or the note alone leaves the evaluation and the
 * conclusion standing.
 */
export function sameFinding(a: ItemResult | undefined, b: ItemResult): boolean {
  if (!a) return false;
  const finding = (r: ItemResult) => JSON.stringify([r.void ?? null, r.replaces ?? null, Object.entries(r.attributes).sort(([x], [y]) => x.localeCompare(y))]);
  return finding(a) === finding(b);
}
