#!/usr/bin/env node
// Makes the filled fieldwork sheet of the main demo scenario from the real selection, so that its
// keys match what `tolrate demo` selects (run once after a change to the scenario; the result is
// committed):
//   npm run build && node samples/make-filled-sheet.mjs
// It runs the demo's planning steps (the same scripted answers) in a temporary folder, reads the
// fieldwork sheet written there, and fills it as the (invented) tester did: every sample item
// conforms except one void invoice (replaced by the first spare) and three deviations.
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parse } from 'csv-parse/sync';

const here = dirname(fileURLToPath(import.meta.url));
const { runDemoInterview } = await import(join(here, '..', 'dist', 'interview', 'demo.js'));
const { restoreCell } = await import(join(here, '..', 'dist', 'selection', 'index.js'));

const out = mkdtempSync(join(tmpdir(), 'tolrate-filled-'));
const ctx = { stdout: process.stdout, stderr: process.stderr, isTTY: false, color: false, cwd: out, env: {} };
const got = await runDemoInterview(ctx, { out, scenario: 'main', planOnly: true });
const sheet = join(out, got.workpaper.selection.fieldworkSheet);
const rows = parse(readFileSync(sheet, 'utf8').replace(/^\uFEFF/, ''), { relax_column_count: true });
const header = rows[0];
const col = (name) => {
  const i = header.findIndex((h) => h === name || h.startsWith(`${name} [`));
  if (i < 0) throw new Error(`no column ${name}`);
  return i;
};
const bySeq = new Map(rows.slice(1).map((r) => [Number(r[0]), r]));
const value = (r, c) => restoreCell(r[col(c)]);
const addDays = (iso, d) => new Date(Date.parse(`${iso}T00:00:00Z`) + d * 86_400_000).toISOString().slice(0, 10);
const sampleSize = got.workpaper.selection.sampleSize;

const set = (seq, cells) => {
  const r = bySeq.get(seq);
  for (const [c, v] of Object.entries(cells)) r[col(c)] = v;
};
for (const [seq, r] of bySeq) if (r[1] === 'sample') set(seq, { 'A1 result': 'C', 'A2 result': 'C' });

// Item 9: cancelled by the supplier's credit note before approval; voided, never paid.
const v = bySeq.get(9);
set(9, {
  'A1 result': 'V',
  'A2 result': 'V',
  'Void reason': `Invoice cancelled by the supplier's credit note before approval and voided in the system; never paid; credit note posted ${addDays(value(v, 'posted_on'), 6)} seen`,
});
// The first spare replaces it and conforms.
set(sampleSize + 1, { 'A1 result': 'C', 'A2 result': 'C' });

// Item 23: approved after the payment run.
const late = bySeq.get(23);
set(23, {
  'A1 result': 'D',
  'A1 found': `Approved in the system on ${addDays(value(late, 'posted_on'), 16)}, two days after it was paid in the payment run of ${addDays(value(late, 'posted_on'), 14)}`,
  'A1 cause': 'performed-late',
  'A1 intent': 'no',
  'A1 pattern': 'isolated',
});

// Item 38: no goods received note.
set(38, {
  'A2 result': 'D',
  'A2 found': 'No goods received note for the delivery; the warehouse could not find one and the system shows none',
  'A2 cause': 'evidence-missing',
  'A2 intent': 'no',
  'A2 pattern': 'isolated',
});

// The first sample item from 51 on above 10,000: approved by a buyer over her limit.
let over;
for (let s = 51; s <= sampleSize; s++) {
  const r = bySeq.get(s);
  if (Number(value(r, 'amount')) > 10000) {
    over = s;
    break;
  }
}
const o = bySeq.get(over);
set(over, {
  'A1 result': 'D',
  'A1 found': `Invoice of ${value(o, 'amount')} approved by a buyer whose approval limit is 5,000.00 under the authority matrix`,
  'A1 cause': 'wrong-performer',
  'A1 intent': 'no',
  'A1 pattern': 'unclear',
});

// Who tested each item, when, and the evidence inspected: the items were split between the
// preparer (odd items) and a second tester (even items), tested between 19 and 23 January 2026.
const testers = ['N. Oduya', 'P. Haverkamp'];
for (const [seq, r] of bySeq) {
  const result = value(r, 'A1 result');
  if (result !== 'C' && result !== 'D') continue;
  const key = r[3];
  const evidence = [`invoice ${key}`, `approval trail ${key} (purchasing system)`];
  if (value(r, 'A2 result') === 'C') evidence.push(`goods received note for ${value(r, 'supplier_ref')}`);
  set(seq, {
    'Tested by': testers[(seq + 1) % 2],
    'Date tested': `2026-01-${String(19 + (seq % 5)).padStart(2, '0')}`,
    Evidence: evidence.join('; '),
  });
}
set(23, { Note: 'Payment run report of the day seen; the approver confirmed the late approval by e-mail.' });
// The authority matrix is kept beside the workpaper: it is fingerprinted when the sheet is read.
set(over, {
  Evidence: `${value(o, 'Evidence')}; evidence-authority-matrix-2025.txt`,
  Note: 'Authority matrix 2025, version approved by the board in December 2024, seen.',
});

const field = (t) => (/[",\r\n]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t);
const target = join(here, 'supplier-invoice-approval.filled.csv');
writeFileSync(target, '\uFEFF' + rows.map((r) => r.map(field).join(',')).join('\r\n') + '\r\n');
process.stdout.write(`Wrote ${target}: void item 9 (${v[3]}), deviations at items 23 (${late[3]}), 38 (${bySeq.get(38)[3]}), ${over} (${o[3]}).\n`);
