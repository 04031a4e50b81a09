/**
 * Evidence per item: who tested each item, when, on what evidence and with what note, typed in
 * the interview or read from the sheet's columns; evidence files beside the workpaper are
 * fingerprinted (SHA-256) when recorded and re-performance reads them again.
 */
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runWith as record } from '../../src/commands/record/index.js';
import { runCli } from '../../src/cli/main.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { parseResultsSheet, resultColumns, FIELDWORK_COLUMNS } from '../../src/interview/sheet-results.js';
import { evidenceRefs, testedOnProblem } from '../../src/control-test/index.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import type { Attribute, SelectedItem } from '../../src/workpaper/schema.js';
import { captureContext, fixedClock, plannedTest } from '../fixtures/interview.js';
import { fillSheet } from '../fixtures/sheet.js';

describe('the fieldwork of an item (rules)', () => {
  it('splits evidence references at ; and line breaks, each once', () => {
    expect(evidenceRefs(' PV-1 ; scan.pdf;\nPV-1;; ')).toEqual(['PV-1', 'scan.pdf']);
  });

  it('a date tested must be a real date, not after today and not before the period', () => {
    const o = { today: '2026-01-20', periodStart: '2025-01-01' };
    expect(testedOnProblem('2026-01-20', o)).toBeUndefined();
    expect(testedOnProblem('20/01/2026', o)).toMatch(/YYYY-MM-DD/);
    expect(testedOnProblem('2026-02-30', o)).toBe('2026-02-30 is not a date');
    expect(testedOnProblem('2026-01-21', o)).toMatch(/after today/);
    expect(testedOnProblem('2024-12-31', o)).toMatch(/before the period/);
  });
});

describe('the sheet columns for the fieldwork', () => {
  const attrs: Attribute[] = [{ id: 'A1', description: 'd', deviationDefinition: 'x' }];
  const items: SelectedItem[] = [1, 2].map((seq) => ({ seq, role: 'sample', position: seq, row: seq + 1, key: `K${seq}`, values: {} }));
  const header = ['Seq', 'Role', 'Row', 'Key', ...resultColumns(attrs), ...FIELDWORK_COLUMNS, 'Note'].join(',');
  const o = { today: '2026-01-20', periodStart: '2025-01-01' };

  it('reads tester, date, evidence and the note (the Note column is no longer dropped)', () => {
    const r = parseResultsSheet(`${header}\n1,sample,2,K1,C,,,,,,A. Tester,2026-01-19,PV-1; scan 1.pdf,Seen with the clerk\n`, items, attrs, o);
    expect(r.items.get(1)!.problems).toEqual([]);
    expect(r.items.get(1)!.fieldwork).toEqual({ testedBy: 'A. Tester', testedOn: '2026-01-19', evidence: ['PV-1', 'scan 1.pdf'], note: 'Seen with the clerk' });
  });

  it('a tested row without tester, date or evidence, or with a date after today, is named cell by cell', () => {
    const r = parseResultsSheet(`${header}\n1,sample,2,K1,C,,,,,,,2026-03-01,,\n2,sample,3,K2,C,,,,,,B. Tester,,PV-2,\n`, items, attrs, o);
    const p = [...r.items.values()].flatMap((x) => x.problems).map((x) => [x.row, x.column, x.value, x.why]);
    expect(p).toEqual([
      [2, 'Tested by', '', 'a tested item needs who tested it'],
      [2, 'Date tested [YYYY-MM-DD]', '2026-03-01', '2026-03-01 is after today (2026-01-20): an item is recorded once it is tested'],
      [2, 'Evidence [references; separated by ;]', '', 'a tested item needs the evidence inspected: document numbers or file names, separated by ;'],
      [3, 'Date tested [YYYY-MM-DD]', '', 'a tested item needs the date it was tested (YYYY-MM-DD)'],
    ]);
  });
});

describe('evidence files beside the workpaper', () => {
  it('are fingerprinted when recorded; re-performance agrees, then names a changed and a missing file (exit 1)', async () => {
    const { dir, file } = await plannedTest();
    const n = loadWorkpaper(file).selection!.sampleSize;
    mkdirSync(join(dir, 'evidence'));
    writeFileSync(join(dir, 'evidence', 'approval-1.txt'), 'Approved by J. Brandt on 2025-03-02\n');
    writeFileSync(join(dir, 'evidence', 'approval-2.txt'), 'Approved by J. Brandt on 2025-04-11\n');
    const answers = {
      'record.source': 'type',
      'record.item.*.A1.result': 'conforms',
      'record.item.*.A2.result': 'conforms',
      'record.item.*.testedBy': 'R. Tester',
      'record.item.*.testedOn': '2026-01-15',
      'record.item.*.evidence': 'voucher in the paid file',
      'record.item.1.evidence': ['', 'evidence/approval-1.txt; voucher in the paid file'],
      'record.item.2.evidence': 'evidence/approval-2.txt',
      'record.item.*.note': '',
      'record.item.2.note': 'Second approval seen in the log as well.',
    };
    const asker = new ScriptedAsker(answers);
    expect(await record(['t1.tolrate.json'], captureContext(dir), asker, { now: fixedClock() })).toBe(0);
    // An empty evidence answer is refused with what to type instead.
    expect(asker.refusals[0]!.message).toMatch(/Name at least one piece of evidence/);
    const wp = loadWorkpaper(file);
    const r1 = wp.results!.items.find((r) => r.seq === 1)!;
    const sha = createHash('sha256').update('Approved by J. Brandt on 2025-03-02\n').digest('hex');
    // The SHA-256 of the file as written (node:crypto), and the plain reference beside it.
    expect(r1.evidence).toEqual([{ ref: 'evidence/approval-1.txt', sha256: sha, bytes: 36 }, { ref: 'voucher in the paid file' }]);
    expect(r1.testedBy).toBe('R. Tester');
    expect(r1.testedOn).toBe('2026-01-15');
    expect(wp.results!.items.find((r) => r.seq === 2)!.note).toBe('Second approval seen in the log as well.');
    expect(wp.results!.items.filter((r) => r.evidence?.length)).toHaveLength(n);

    const rep = async () => {
      const ctx = captureContext(dir, false);
      const code = await runCli(['reperform', 't1.tolrate.json'], ctx);
      return { code, out: ctx.text().replace(/\s+/g, ' ') };
    };
    const clean = await rep();
    expect(clean.out).toMatch(/evidence agrees 2 evidence file\(s\) beside the workpaper read again/);
    expect(clean.code).toBe(0);

    writeFileSync(join(dir, 'evidence', 'approval-1.txt'), 'Approved by J. Brandt on 2025-03-09\n');
    const changed = await rep();
    expect(changed.code).toBe(1);
    expect(changed.out).toMatch(/evidence DIFFERS 1 of 2 evidence file\(s\) missing or changed/);
    expect(changed.out).toContain(`item 1 (${r1.key}): evidence file evidence/approval-1.txt has changed since it was recorded: SHA-256 recorded ${sha.slice(0, 16)}`);

    rmSync(join(dir, 'evidence', 'approval-2.txt'));
    const missing = await rep();
    expect(missing.out).toMatch(/evidence file evidence\/approval-2\.txt is missing/);
  });

  it('a filled sheet\'s evidence names files too, and the memo shows tester, date, evidence and note per item', async () => {
    const { dir, file } = await plannedTest();
    const wp0 = loadWorkpaper(file);
    writeFileSync(join(dir, 'scan-3.pdf'), 'not really a pdf');
    const sheet = join(dir, wp0.selection!.fieldworkSheet!);
    fillSheet(sheet, join(dir, 'filled.csv'), {
      3: { 'A1 result': 'C', 'A2 result': 'C', 'Tested by': 'S. Second', 'Date tested': '2026-01-18', Evidence: 'scan-3.pdf; PV ledger', Note: 'Checked against the bank statement' },
    }, { 'A1 result': 'C', 'A2 result': 'C' });
    const asker = new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'filled.csv' });
    expect(await record(['t1.tolrate.json'], captureContext(dir), asker, { now: fixedClock() })).toBe(0);
    const r3 = loadWorkpaper(file).results!.items.find((r) => r.seq === 3)!;
    expect(r3).toMatchObject({ testedBy: 'S. Second', testedOn: '2026-01-18', note: 'Checked against the bank statement' });
    expect(r3.evidence![0]!.sha256).toBe(createHash('sha256').update('not really a pdf').digest('hex'));
    expect(r3.evidence![1]).toEqual({ ref: 'PV ledger' });

    const ctx = captureContext(dir, false);
    expect(await runCli(['memo', 't1.tolrate.json', '--out', 'memo.docx'], ctx)).toBe(0);
    const { readDocx, findTable, rowByFirstCell } = await import('../memo/docx-text.js');
    const doc = await readDocx(readFileSync(join(dir, 'memo.docx')));
    const t = findTable(doc.xml, ['Seq', 'Item', 'Tested by', 'Date tested', 'Evidence inspected', 'Note']);
    const row = rowByFirstCell(t, '3');
    expect(row).toMatchObject({ 'Tested by': 'S. Second', 'Date tested': '2026-01-18', Note: 'Checked against the bank statement' });
    expect(row['Evidence inspected']).toMatch(/^scan-3\.pdf \(SHA-256 [0-9a-f]{12}…\); PV ledger$/);
  });

  it('a sheet written before the fieldwork columns is read all the same, and the items without them are listed', async () => {
    const { dir, file } = await plannedTest();
    const wp0 = loadWorkpaper(file);
    const sheet = join(dir, wp0.selection!.fieldworkSheet!);
    fillSheet(sheet, join(dir, 'full.csv'), {}, { 'A1 result': 'C', 'A2 result': 'C' });
    // The three columns removed, as in a sheet from an earlier version (Void reason, then Note).
    const lines = readFileSync(join(dir, 'full.csv'), 'utf8').split('\r\n');
    const head = lines[0]!.split(',');
    const drop = new Set(['Tested by', 'Date tested', 'Evidence'].map((c) => head.findIndex((h) => h.startsWith(c))));
    writeFileSync(join(dir, 'old.csv'), lines.map((l) => l.split(',').filter((_, i) => !drop.has(i)).join(',')).join('\r\n'));
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': 'old.csv' }), { now: fixedClock() })).toBe(0);
    const n = wp0.selection!.sampleSize;
    expect(ctx.text().replace(/\s+/g, ' ')).toContain(`${n} tested item(s) have no record of who tested them, when, or on what evidence`);
    expect(loadWorkpaper(file).results!.items.every((r) => r.testedBy === undefined)).toBe(true);
  });
});
