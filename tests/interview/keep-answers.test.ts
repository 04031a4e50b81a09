/**
 * Changes keep what still holds: a re-opened item offers its recorded result and finding, a
 * change to the results after sign-off keeps every conclusion answer as the default (flagging only
 * the ones the new figures contradict), and a step stopped half-way keeps the answers given.
 */
import { cpSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { ScriptedAsker, ScriptError } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { captureContext, fixedClock, planAnswers, tempDir, writePopulation } from '../fixtures/interview.js';

const WP = 'supplier-invoice-approval.tolrate.json';
let demoDir = '';

beforeAll(async () => {
  const cwd = tempDir('tolrate-keep-');
  expect(await runCli(['demo', '--out', 'out'], captureContext(cwd, false))).toBe(0);
  demoDir = join(cwd, 'out');
});

function demoCopy(): { dir: string; wp: Workpaper } {
  const dir = tempDir('tolrate-keep-case-');
  cpSync(demoDir, dir, { recursive: true });
  return { dir, wp: loadWorkpaper(join(dir, WP)) };
}

const seqOf = (wp: Workpaper, key: string) => wp.results!.items.find((r) => r.key === key)!.seq;

describe('re-opening a recorded item', () => {
  it('preselects its recorded result and offers what was found, cause, intent and pattern (Enter keeps them)', async () => {
    const { dir, wp } = demoCopy();
    const key = wp.results!.items.find((r) => r.attributes.A1?.result === 'deviation')!.key;
    const before = wp.results!.items.find((r) => r.key === key)!;
    const answers = { 'edit.reason': 'Looked at the item again on review', 'record.change.1': key, 'record.change.2': '' };
    expect(await record([WP], captureContext(dir), new ScriptedAsker(answers, { defaults: true }), { now: fixedClock('2026-02-01T09:00:00.000Z') })).toBe(0);
    const after = loadWorkpaper(join(dir, WP));
    expect(after.results!.items.find((r) => r.key === key)).toEqual(before);
    // Nothing changed, so the conclusion still stands.
    expect(after.conclusion).toEqual(wp.conclusion);
  });

  it('a change to the evidence or the note alone keeps the evaluation and the conclusion', async () => {
    const { dir, wp } = demoCopy();
    const item = wp.results!.items.find((r) => !r.void && r.attributes.A1?.result === 'conforms')!;
    const answers = {
      'edit.reason': 'Evidence reference completed on review',
      'record.change.1': item.key,
      [`record.item.${item.seq}.evidence`]: `${item.evidence!.map((e) => e.ref).join('; ')}; payment run report`,
      [`record.item.${item.seq}.note`]: 'Payment run report added to the file.',
      'record.change.2': '',
    };
    expect(await record([WP], captureContext(dir), new ScriptedAsker(answers, { defaults: true }), { now: fixedClock('2026-02-01T09:00:00.000Z') })).toBe(0);
    const after = loadWorkpaper(join(dir, WP));
    const r = after.results!.items.find((x) => x.key === item.key)!;
    expect(r.evidence!.map((e) => e.ref)).toContain('payment run report');
    expect(r.note).toBe('Payment run report added to the file.');
    expect(after.evaluation).toEqual(wp.evaluation);
    expect(after.conclusion).toEqual(wp.conclusion);
    // The change after sign-off is an amendment all the same.
    expect(after.amendments!.at(-1)!.why).toBe('Evidence reference completed on review');
  });
});

describe('a change to the results after sign-off', () => {
  it('keeps compensating controls, notes, follow-ups with owners and due dates, and the severity answers as defaults', async () => {
    const { dir, wp } = demoCopy();
    const key = wp.results!.items.find((r) => r.attributes.A2?.result === 'deviation')!.key;
    const seq = seqOf(wp, key);
    const answers = {
      'edit.reason': 'The goods received note was found in the warehouse file',
      'record.change.1': key,
      [`record.item.${seq}.A2.result`]: 'conforms',
      'record.change.2': '',
    };
    const now = fixedClock('2026-02-01T09:00:00.000Z');
    expect(await record([WP], captureContext(dir), new ScriptedAsker(answers, { defaults: true }), { now })).toBe(0);
    const mid = loadWorkpaper(join(dir, WP));
    expect(mid.conclusion).toBeUndefined();
    expect(mid.signoffs).toBeUndefined();
    expect(mid.earlierConclusion).toEqual(wp.conclusion);
    // Conclude again pressing Enter everywhere: every earlier answer is the default.
    const out = captureContext(dir);
    expect(await conclude([WP], out, new ScriptedAsker({}, { defaults: true }), { now })).toBe(0);
    const done = loadWorkpaper(join(dir, WP));
    expect(verifyLog(done)).toEqual([]);
    expect(done.earlierConclusion).toBeUndefined();
    expect(done.conclusion!.qualitative.compensatingControls).toBe(wp.conclusion!.qualitative.compensatingControls);
    expect(done.conclusion!.qualitative.notes).toBe(wp.conclusion!.qualitative.notes);
    expect(done.conclusion!.severity).toEqual(wp.conclusion!.severity);
    for (const f of done.conclusion!.followUps) {
      const old = wp.conclusion!.followUps.find((x) => x.kind === f.kind && x.description === f.description) ?? wp.conclusion!.followUps.find((x) => x.kind === f.kind);
      if (old) expect({ owner: f.owner, due: f.due }).toEqual({ owner: old.owner, due: old.due });
    }
    expect(done.signoffs?.preparer?.name).toBe(wp.signoffs!.preparer!.name);
    expect(out.text().replace(/\s+/g, ' ')).toMatch(/Your earlier answers are offered as defaults/);
  });

  it('flags an answer the new figures contradict and asks it afresh, with no default', async () => {
    const { dir, wp } = demoCopy();
    const devs = wp.results!.items.filter((r) => r.attributes.A1?.result === 'deviation');
    expect(devs.length).toBe(2);
    const answers: Record<string, string> = { 'edit.reason': 'Both approvals were found in the archive', 'record.change.1': devs[0]!.key, 'record.change.2': devs[1]!.key, 'record.change.3': '' };
    for (const d of devs) answers[`record.item.${d.seq}.A1.result`] = 'conforms';
    const now = fixedClock('2026-02-01T09:00:00.000Z');
    expect(await record([WP], captureContext(dir), new ScriptedAsker(answers, { defaults: true }), { now })).toBe(0);
    const out = captureContext(dir);
    const asker = new ScriptedAsker({}, { defaults: true });
    // The question has no default to take: the script (pressing Enter) cannot answer it.
    await expect(conclude([WP], out, asker, { now })).rejects.toThrow(ScriptError);
    await expect(conclude([WP], captureContext(dir), new ScriptedAsker({}, { defaults: true }), { now })).rejects.toThrow(/No scripted answer for question "conclude\.attribute\.A1\.agree"/);
    expect(out.text().replace(/\s+/g, ' ')).toMatch(/Changed: earlier you concluded that A1 does not support reliance; the figures now say it supports it/);
  });
});

describe('Ctrl-C inside a step', () => {
  it('keeps the answers already given in that step and offers them when it is asked again', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    const all = planAnswers(total);
    // Stop at the 4th question of the control step (the engagement has 6 questions and is saved).
    const stopped = new ScriptedAsker(all, { stopAt: 9 });
    const err = (await plan(['t1'], captureContext(dir), stopped, { now: fixedClock() }).catch((e: unknown) => e)) as { keptUnfinished?: boolean; workpaper?: string };
    expect(err.keptUnfinished).toBe(true);
    expect(err.workpaper).toBe(join(dir, 't1.tolrate.json'));
    const mid = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(mid.control).toBeUndefined();
    expect(mid.unfinishedStep).toEqual({ step: 'plan.control', answers: { 'plan.control.id': 'PAY-02', 'plan.control.description': all['plan.control.description'], 'plan.control.objective': all['plan.control.objective'] } });
    // Asked again: the three kept answers are the defaults (Enter), the rest is answered.
    const rest = Object.fromEntries(Object.entries(all).filter(([k]) => !['plan.control.id', 'plan.control.description', 'plan.control.objective'].includes(k)));
    const asked: string[] = [];
    const probe = new ScriptedAsker({ ...rest, 'plan.control.id': '', 'plan.control.description': '', 'plan.control.objective': '' }, { onAsk: (r) => asked.push(`${r.id}=${r.answer}`) });
    expect(await plan(['t1'], captureContext(dir), probe, { now: fixedClock('2026-01-20T10:00:00.000Z') })).toBe(0);
    expect(asked).toContain('plan.control.id=');
    const done = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(done.control!.id).toBe('PAY-02');
    expect(done.control!.objective).toBe(all['plan.control.objective']);
    expect(done.unfinishedStep).toBeUndefined();
    expect(verifyLog(done)).toEqual([]);
  });
});
