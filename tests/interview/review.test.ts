/**
 * The review loop through the scripted answerer: the reviewer raises notes, sign-off is refused
 * while a note that must be cleared is open, the preparer answers one note and changes the record
 * for another, the reviewer re-opens and clears, and signs off; every refusal of bad input.
 */
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { runWith as review } from '../../src/commands/review/index.js';
import { runWith as conclude } from '../../src/commands/conclude/index.js';
import { TolrateInputError } from '../../src/errors.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { noteStatus, reviewStatus } from '../../src/control-test/index.js';
import type { Workpaper } from '../../src/workpaper/schema.js';
import { captureContext, fixedClock, plannedTest, tempDir } from '../fixtures/interview.js';

const WP = 'manual-journal-approval.tolrate.json';
let demoDir = '';

beforeAll(async () => {
  const cwd = tempDir('tolrate-review-');
  expect(await runCli(['demo', '--scenario', 'small', '--out', 'out'], captureContext(cwd, false))).toBe(0);
  demoDir = join(cwd, 'out');
});

function prepared(): { dir: string; wp: Workpaper } {
  const dir = tempDir('tolrate-review-case-');
  cpSync(demoDir, dir, { recursive: true });
  return { dir, wp: loadWorkpaper(join(dir, WP)) };
}

/** Answers for a reviewer's sitting: no note anywhere unless given. */
const quiet = (extra: Record<string, string | boolean | null | Array<string | boolean>> = {}) => new ScriptedAsker({ 'review.reviewer': 'C. Lindqvist', ...extra }, { defaults: true });

describe('the review loop', () => {
  it('notes raised, sign-off refused while one must be cleared, answered, re-opened, changed, cleared, signed', async () => {
    const { dir, wp } = prepared();
    expect(reviewStatus(wp).stage).toBe('prepared');
    const item = wp.results!.items.find((r) => !r.void)!.key;
    const now = fixedClock('2026-01-29T09:00:00.000Z');
    // 1. The reviewer raises two notes and tries to sign off.
    const r1 = quiet({
      'review.population.note.1': ['section', 'no'],
      'review.population.note.1.text': 'Attach the journal listing the count was agreed to.',
      'review.population.note.1.mustClear': true,
      'review.results.note.1': ['item', 'no'],
      'review.results.note.1.item': ['JV-NOPE', item],
      'review.results.note.1.text': `Re-check the approval evidence of ${item}.`,
      'review.results.note.1.mustClear': false,
    });
    const out1 = captureContext(dir);
    expect(await review([WP], out1, r1, { now })).toBe(0);
    // A note on an item that does not exist is refused, with the items that do.
    expect(r1.refusals[0]).toMatchObject({ id: 'review.results.note.1.item', answer: 'JV-NOPE' });
    expect(r1.refusals[0]!.message).toMatch(/There is no selected item JV-NOPE/);
    const t1 = out1.text().replace(/\s+/g, ' ');
    expect(t1).toMatch(/Re-performance first/);
    expect(t1).toMatch(/Everything re-derived agrees with the workpaper/);
    expect(t1).toMatch(/The reviewer cannot sign off yet: - note N1 \(Population and completeness\) must be cleared first/);
    let got = loadWorkpaper(join(dir, WP));
    expect(got.signoffs?.reviewer).toBeUndefined();
    expect(got.signoffs?.preparer).toBeDefined();
    expect(got.review!.notes.map((n) => [n.id, n.section, n.item ?? '', n.mustClear])).toEqual([
      ['N1', 'population', '', true],
      ['N2', 'results', item, false],
    ]);
    expect(reviewStatus(got).label).toBe('in review (2 open notes)');
    // The step list shows it too.
    const { statusLines } = await import('../../src/interview/flow.js');
    expect(statusLines(got).at(-1)).toBe('  Review: in review (2 open notes)');
    // Every review save is the reviewer's, in the log.
    expect(got.log.filter((e) => e.step.startsWith('review.')).every((e) => e.by === 'C. Lindqvist' && e.role === 'reviewer')).toBe(true);

    // 2. The preparer answers N1 (no change: the preparer's sign-off stays) and leaves N2 for later.
    const p1 = new ScriptedAsker({ 'notes.N1.action': 'answer', 'notes.N1.answer': 'Filed as GL-journal-listing-2025.pdf.', 'notes.N2.action': 'later', 'conclude.again': false }, { defaults: true });
    expect(await conclude([WP], captureContext(dir), p1, { now })).toBe(0);
    got = loadWorkpaper(join(dir, WP));
    expect(got.signoffs?.preparer).toBeDefined();
    expect(noteStatus(got.review!.notes[0]!)).toBe('answered');
    expect(got.log.at(-1)!.role).toBe('preparer');

    // 3. The reviewer re-opens N1 with a further comment.
    const r2 = quiet({ 'review.note.N1.decision': 'reopen', 'review.note.N1.comment': 'The listing filed is for November only.' });
    expect(await review([WP], captureContext(dir), r2, { now })).toBe(0);
    got = loadWorkpaper(join(dir, WP));
    expect(got.review!.notes[0]!.thread.map((e) => e.kind)).toEqual(['raised', 'answered', 'reopened']);

    // 4. The preparer answers N1 again, and answers N2 by changing the record (the item's result).
    const seq = got.results!.items.find((r) => r.key === item)!.seq;
    const p2 = new ScriptedAsker(
      {
        'notes.N1.action': 'answer',
        'notes.N1.answer': 'The full-year listing is now filed.',
        'notes.N2.action': 'change:record',
        'edit.reason': 'Review note N2: the approval evidence was re-checked',
        'record.change.1': item,
        [`record.item.${seq}.A1.result`]: 'deviation',
        [`record.item.${seq}.A1.found`]: 'The approver initialled the wrong journal; no approval for this one.',
        [`record.item.${seq}.A1.cause`]: 'evidence-missing',
        [`record.item.${seq}.A1.intent`]: 'no',
        [`record.item.${seq}.A1.pattern`]: 'isolated',
        'record.change.2': '',
        'notes.N2.answer': 'Re-checked: it is a deviation; recorded.',
        'conclude.severity.q*': 'Answered in the severity memo.',
        'conclude.severity.classification': 'deficiency',
        'conclude.severity.rationale': 'One isolated deviation of evidence.',
        'conclude.followUps.*.owner': 'E. Marchetti',
      },
      { defaults: true },
    );
    const outP2 = captureContext(dir);
    const { wholeInterview } = await import('../../src/interview/stages.js');
    expect(await wholeInterview(outP2, p2, { file: WP, now })).toBe(0);
    got = loadWorkpaper(join(dir, WP));
    expect(verifyLog(got)).toEqual([]);
    // The change to the record is an amendment that cleared both sign-offs; the test was signed again.
    const am = got.amendments!.at(-1)!;
    expect(am).toMatchObject({ by: 'E. Marchetti', role: 'preparer', why: 'Review note N2: the approval evidence was re-checked', cleared: ['preparer'] });
    const at = got.results!.items.findIndex((r) => r.key === item);
    expect(am.changes.find((c) => c.path === `results.items[${at}] (${item}).attributes.A1.result`)).toMatchObject({ old: 'conforms', new: 'deviation' });
    expect(got.signoffs?.preparer).toBeDefined();
    expect(got.review!.notes[1]!.thread.at(-1)).toMatchObject({ kind: 'answered', changedRecord: true, role: 'preparer' });

    // 5. The reviewer clears both and signs off; a date before the preparer's and one after today are refused.
    const r3 = quiet({
      'review.note.N1.decision': 'clear',
      'review.note.N2.decision': 'clear',
      'review.signoff': true,
      'review.signoff.date': ['2026-01-01', '2027-01-01', '2026-01-29'],
    });
    expect(await review([WP], captureContext(dir), r3, { now })).toBe(0);
    expect(r3.refusals.map((r) => r.message)).toEqual([
      expect.stringMatching(/2026-01-01 is before the preparer's sign-off/),
      expect.stringMatching(/2027-01-01 is after today \(2026-01-29\)/),
    ]);
    got = loadWorkpaper(join(dir, WP));
    expect(got.signoffs!.reviewer).toEqual({ name: 'C. Lindqvist', date: '2026-01-29' });
    expect(reviewStatus(got).stage).toBe('reviewed');
    // The memo is final now, and shows the review.
    const m = captureContext(dir, false);
    expect(await runCli(['memo', WP], m)).toBe(0);
    expect(m.text()).not.toMatch(/DRAFT/);
    const { readMemoBlocks } = await import('../../src/memo/read.js');
    const blocks = await readMemoBlocks(readFileSync(join(dir, 'manual-journal-approval.memo.docx')));
    const text = blocks.map((b) => (b.kind === 'paragraph' ? b.text : b.rows.map((r) => r.join(' | ')).join('\n'))).join('\n');
    expect(text).toMatch(/Amendments after sign-off/);
    expect(text).toMatch(/Review note N2: the approval evidence was re-checked/);
    expect(text).toMatch(/Appendix C — Review notes/);
    expect(text).toMatch(/re-opened — C\. Lindqvist \(reviewer\), \S+ \S+ UTC: The listing filed is for November only\./);
    expect(text).toMatch(/Reviewed by \| C\. Lindqvist \|  \| 2026-01-29/);
  });
});

describe('refusals', () => {
  it('a review of a file the preparer has not signed is refused (exit 2 through the CLI)', async () => {
    const t = await plannedTest();
    await expect(review(['t1.tolrate.json'], captureContext(t.dir), quiet(), { now: fixedClock() })).rejects.toThrow(TolrateInputError);
    await expect(review(['t1.tolrate.json'], captureContext(t.dir), quiet(), { now: fixedClock() })).rejects.toThrow(/not signed off by its preparer yet/);
  });

  it('a blank reviewer is refused, and a reviewer who is the preparer is warned and the warning recorded', async () => {
    const { dir } = prepared();
    const a = new ScriptedAsker({ 'review.reviewer': ['  ', 'E. Marchetti'] }, { defaults: true });
    const out = captureContext(dir);
    expect(await review([WP], out, a, { now: fixedClock('2026-01-29T09:00:00.000Z') })).toBe(0);
    expect(a.refusals[0]!.message).toMatch(/The reviewer must not be empty/);
    expect(out.text().replace(/\s+/g, ' ')).toMatch(/Warning: The reviewer \(E\. Marchetti\) is the preparer who signed off/);
    const wp = loadWorkpaper(join(dir, WP));
    expect(wp.review!.sittings.at(-1)!.warning).toMatch(/not an independent review/);
  });

  it('a review note edited outside tolrate is caught by re-performance', async () => {
    const { dir } = prepared();
    expect(await review([WP], captureContext(dir), quiet({ 'review.approach.note.1': ['section', 'no'], 'review.approach.note.1.text': 'Why 95%?', 'review.approach.note.1.mustClear': true }), { now: fixedClock('2026-01-29T09:00:00.000Z') })).toBe(0);
    const file = join(dir, WP);
    const raw = JSON.parse(readFileSync(file, 'utf8'));
    raw.review.notes[0].thread[0].text = 'No note';
    writeFileSync(file, JSON.stringify(raw, null, 2));
    const ctx = captureContext(dir, false);
    expect(await runCli(['reperform', WP], ctx)).toBe(1);
    expect(ctx.text().replace(/\s+/g, ' ')).toMatch(/review\.notes\[0\]\.thread\[0\]\.text: was changed outside tolrate/);
  });
});
