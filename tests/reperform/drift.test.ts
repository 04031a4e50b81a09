/**
 * The record cannot drift from the selection or from its memo: results that do not fit the
 * worklist, a memo edited by hand, a memo of a file changed outside tolrate, and an outside edit
 * accepted (which clears the sign-offs and evaluates again) are each caught or handled.
 */
import { cpSync, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { openSession } from '../../src/interview/session.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { testState } from '../../src/control-test/index.js';
import { captureContext, fixedClock, tempDir } from '../fixtures/interview.js';

const WP = 'supplier-invoice-approval.tolrate.json';
const MEMO = 'supplier-invoice-approval.memo.docx';
let demoDir = '';

beforeAll(async () => {
  const cwd = tempDir('tolrate-drift-');
  expect(await runCli(['demo', '--out', 'out'], captureContext(cwd, false))).toBe(0);
  demoDir = join(cwd, 'out');
});

function copy(edit?: (wp: any) => void): string {
  const dir = tempDir('tolrate-drift-case-');
  cpSync(demoDir, dir, { recursive: true });
  if (edit) {
    const file = join(dir, WP);
    const wp = JSON.parse(readFileSync(file, 'utf8'));
    edit(wp);
    writeFileSync(file, JSON.stringify(wp, null, 2));
  }
  return dir;
}

async function reperform(dir: string, extra: string[] = []) {
  const ctx = captureContext(dir, false);
  const code = await runCli(['reperform', WP, ...extra], ctx);
  return { code, out: ctx.text().replace(/\s+/g, ' '), err: ctx.err.join('') };
}

/** Rewrite the memo's document.xml with `edit` (a hand edit of the DOCX). */
async function editMemo(dir: string, edit: (xml: string) => string): Promise<void> {
  const { default: JSZip } = await import('jszip');
  const path = join(dir, MEMO);
  const zip = await JSZip.loadAsync(readFileSync(path));
  const xml = await zip.file('word/document.xml')!.async('string');
  const changed = edit(xml);
  expect(changed).not.toBe(xml);
  zip.file('word/document.xml', changed);
  writeFileSync(path, await zip.generateAsync({ type: 'nodebuffer' }));
}

describe('results tied to the selection', () => {
  it('a result for a key never selected, and a deviating item whose result was removed, are named (exit 1)', async () => {
    const dir = copy((wp) => {
      const i = wp.results.items.findIndex((r: any) => Object.values(r.attributes).some((x: any) => x.result === 'deviation'));
      const removed = wp.results.items.splice(i, 1)[0];
      wp.results.items.push({ ...removed, key: 'PI-999999', seq: removed.seq });
    });
    const r = await reperform(dir);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/results DIFFERS/);
    expect(r.out).toMatch(/PI-999999: a result is recorded for an item that was not selected/);
    expect(r.out).toMatch(/on the worklist but has no complete result/);
  });

  it('a spare used without a voided item before it, and results out of draw order, are named', async () => {
    const dir = copy((wp) => {
      const spare = wp.selection.items.filter((i: any) => i.role === 'spare').sort((a: any, b: any) => b.seq - a.seq)[0];
      wp.results.items.push({ key: spare.key, seq: spare.seq, attributes: { A1: { result: 'conforms' }, A2: { result: 'conforms' } } });
      const [a, b] = [wp.results.items[0], wp.results.items[1]];
      wp.results.items[0] = b;
      wp.results.items[1] = a;
    });
    const r = await reperform(dir);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/a result is recorded for a spare that replaces no voided item/);
    expect(r.out).toMatch(/results are out of draw order/);
  });

  it('the evaluation counts only the worklist: an extra result does not change n', () => {
    const dir = copy((wp) => {
      wp.results.items.push({ key: 'PI-999999', seq: 999, attributes: { A1: { result: 'deviation', found: 'x', cause: 'other', causeDetail: 'x', intentional: 'no', pattern: 'isolated' }, A2: { result: 'conforms' } } });
    });
    const wp = loadWorkpaper(join(dir, WP));
    const st = testState(wp);
    expect(st.worklist.join(' ')).toMatch(/PI-999999/);
    expect(st.evaluation).toEqual([]);
  });
});

describe('the memo compared in place', () => {
  it('an untouched memo agrees and says which state it shows', async () => {
    const r = await reperform(copy(), ['--memo', MEMO]);
    expect(r.code).toBe(0);
    expect(r.out).toMatch(/memo agrees .* as tolrate wrote it on .* it shows the state after log entry \d+; every section and table cell agrees/);
  });

  it('a results table cell edited by hand is named with its section, row, column and both texts', async () => {
    const dir = copy();
    await editMemo(dir, (xml) => xml.replace('Does not support reliance', 'Supports reliance'));
    const r = await reperform(dir, ['--memo', MEMO]);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/is not a memo tolrate recorded writing from this workpaper/);
    expect(r.out).toMatch(/Results by attribute, table 1, row 2 \(A1\), column 8 \("Decision"\): the memo has "Supports reliance", the workpaper gives "Does not support reliance"/);
  });

  it('the conclusion sentence edited by hand is named', async () => {
    const dir = copy();
    await editMemo(dir, (xml) => xml.replace('The results do not support the planned reliance on P2P-07', 'The results support the planned reliance on P2P-07'));
    const r = await reperform(dir, ['--memo', MEMO]);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/Conclusion, paragraph \d+: the memo has "[^"]*The results support the planned reliance on P2P-07/);
  });

  it('a memo that is not XML is named, not a crash', async () => {
    const dir = copy();
    await editMemo(dir, (xml) => xml.replace('<w:body>', '<w:body><w:p>'));
    const r = await reperform(dir, ['--memo', MEMO]);
    expect(r.code).toBe(1);
    expect(r.out).toMatch(/does not parse as XML/);
  });

  it('writing a memo records its SHA-256 and the state it shows', async () => {
    const dir = copy();
    const ctx = captureContext(dir, false);
    expect(await runCli(['memo', WP, '--out', 'again.docx'], ctx)).toBe(0);
    const wp = loadWorkpaper(join(dir, WP));
    const rec = wp.memos!.at(-1)!;
    const { createHash } = await import('node:crypto');
    expect(rec.sha256).toBe(createHash('sha256').update(readFileSync(join(dir, 'again.docx'))).digest('hex'));
    expect(rec.path).toBe('again.docx');
    expect(rec.final).toBe(true);
    expect(wp.log.at(-1)!.step).toBe('memo');
    expect(verifyLog(wp)).toEqual([]);
    const r = await reperform(dir, ['--memo', 'again.docx']);
    expect(r.code).toBe(0);
  });
});

describe('sign-offs follow the record', () => {
  it('memo of a file changed outside tolrate: no final memo; --draft writes a DRAFT listing the changes and leaves the file alone', async () => {
    const dir = copy((wp) => {
      const i = wp.results.items.findIndex((r: any) => r.attributes.A1?.result === 'deviation');
      wp.results.items[i].attributes.A1 = { result: 'conforms' };
    });
    const before = readFileSync(join(dir, WP), 'utf8');
    const ctx = captureContext(dir, false);
    expect(await runCli(['memo', WP, '--out', 'x.docx'], ctx)).toBe(1);
    expect(ctx.err.join('')).toMatch(/changed outside tolrate/);
    expect(ctx.err.join('')).toMatch(/No memo was written/);
    expect(existsSync(join(dir, 'x.docx'))).toBe(false);
    const ctx2 = captureContext(dir, false);
    expect(await runCli(['memo', WP, '--out', 'x.docx', '--draft'], ctx2)).toBe(0);
    expect(readFileSync(join(dir, WP), 'utf8')).toBe(before);
    const { readMemoBlocks } = await import('../../src/memo/read.js');
    const blocks = await readMemoBlocks(readFileSync(join(dir, 'x.docx')));
    const text = blocks.map((b) => (b.kind === 'paragraph' ? b.text : b.rows.flat().join(' | '))).join('\n');
    expect(text).toMatch(/DRAFT — this memo is not final/);
    expect(text).toMatch(/changed outside tolrate: results\.items\[\d+\]\.attributes\.A1/);
    // The figures shown are the ones the results give now, never the stale recorded ones.
    expect(text).toMatch(/evaluation: A1: recorded 2 deviation\(s\), the results give 1/);
  });

  it('accepting an outside edit evaluates again, clears the sign-offs with the reason in the log, and says so', async () => {
    const dir = copy((wp) => {
      const i = wp.results.items.findIndex((r: any) => r.attributes.A1?.result === 'deviation');
      wp.results.items[i].attributes.A1 = { result: 'conforms' };
    });
    const out = captureContext(dir);
    const s = await openSession({
      asker: new ScriptedAsker({ 'open.outsideChanges.continue': true, 'open.outsideChanges.reason': 'Corrected a keying error found on review' }),
      out: out.stdout,
      path: join(dir, WP),
      now: fixedClock('2026-02-01T09:00:00.000Z'),
    });
    expect(s).toBeDefined();
    const wp = loadWorkpaper(join(dir, WP));
    expect(verifyLog(wp)).toEqual([]);
    expect(wp.signoffs).toBeUndefined();
    expect(wp.conclusion).toBeUndefined();
    expect(wp.earlierConclusion).toBeDefined();
    expect(wp.evaluation!.attributes.find((a) => a.attributeId === 'A1')!.deviations).toBe(1);
    const entry = wp.log.at(-1)!;
    expect(entry.reason).toMatch(/Corrected a keying error/);
    expect(entry.reason).toMatch(/sign-offs are cleared/);
    expect(out.text()).toMatch(/Because of the change: the sign-offs are cleared/);
    // The memo of it is a DRAFT now (the test must be concluded and signed again).
    const m = captureContext(dir, false);
    expect(await runCli(['memo', WP], m)).toBe(0);
    expect(m.text()).toMatch(/DRAFT: the memo is marked DRAFT on every page/);
    expect(m.text()).toMatch(/steps still open: Evaluation and conclusion, Sign-off/);
  });
});
