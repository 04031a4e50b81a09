/**
 * Recording the results: per item and attribute conforms, deviation (what was found, cause,
 * intent, pattern) or void (replaced by the next unused spare). Typed here, or read from the
 * filled fieldwork sheet. Saved after every item, so recording can take several sittings and
 * resumes at the first unrecorded item.
 */
import { isAbsolute, relative, resolve } from 'node:path';
import { CAUSES, INTENT, PATTERNS, type AttributeResult, type ItemResult, type SelectedItem, type Workpaper } from '../workpaper/schema.js';
import { isComplete, twoStageOf, type StageState, type WorkItem } from '../control-test/index.js';
import { CAUSE_LABELS, INTENT_LABELS, PATTERN_LABELS, clearSteps, evidenceRefs, fieldworkGaps, sameFinding, fingerprintEvidence, isoDay, testedOnProblem, withFieldwork, type ItemFieldwork, countResults, isRecorded, progress, recordingComplete, voidResult, withResult, worklist } from '../control-test/index.js';
import { int } from '../util/format.js';
import type { Session } from './session.js';

export { worklist, isRecorded, progress, recordingComplete } from '../control-test/index.js';
import { AnswerError, existingFile, NONE_ANSWER, optionalText, requiredText } from './parse.js';
import { readResultsSheets, SHEET_CONVENTIONS, type SheetItem, type SheetOptions, type SheetProblem } from './sheet-results.js';
import { table, wrap } from './show.js';
import { canonicalJson } from '../workpaper/log.js';

function describe(item: SelectedItem, max = 6): string {
  const vals = Object.entries(item.values).filter(([k, v]) => k !== '' && v !== item.key).slice(0, max);
  return vals.map(([k, v]) => `${k} ${v}`).join(', ');
}

/**
 * Store one item's result (and save, unless `save` is false). An evaluation or conclusion made
 * from the old results no longer holds: they are cleared in the same save, and the conclusion's
 * answers are kept as the defaults for concluding again. A change to the item's tester, date,
 * evidence or note alone keeps them.
 */
export async function storeResult(s: Session, r: ItemResult, source: 'interview' | 'sheet', sheetPath?: string | readonly string[], save = true): Promise<void> {
  const before = s.wp.results?.items.find((x) => x.key === r.key);
  if (before && canonicalJson(before) === canonicalJson(r)) {
    s.print(`  ${r.key}: unchanged.`);
    return;
  }
  if ((s.wp.evaluation || s.wp.conclusion) && !sameFinding(before, r)) {
    s.wp = clearSteps(s.wp, ['conclude']);
    s.print(...wrap('The results changed: the evaluation and conclusion made from the old results are cleared; conclude again (your earlier answers are offered).', 92, '  '));
  }
  const stagesBefore = worklist(s.wp).stages;
  const secondKeys = new Set((stagesBefore?.secondItems ?? []).map((x) => x.key));
  const hadSecond = (s.wp.results?.items ?? []).some((x) => secondKeys.has(x.key) && (x.void !== undefined || Object.keys(x.attributes).length > 0));
  s.wp = withResult(s.wp, r, { source, ...(sheetPath ? { sheetPath } : {}), at: s.now() });
  const notice = stageNotice(s.wp, stagesBefore, before, hadSecond);
  if (notice.length) s.print('', ...notice);
  if (save) await s.save('record');
}

/**
 * Two-stage plan: what the practitioner needs to hear when a result changes where the stages
 * stand: the first stage is complete and decides every attribute (the second-stage items are not
 * tested), or it leaves some attributes to the second stage (which, and why), or a changed
 * first-stage result means second-stage results already recorded are no longer needed.
 */
export function stageNotice(wp: Workpaper, before: StageState | undefined, previousResult?: ItemResult, hadSecondResults = false): string[] {
  const two = twoStageOf(wp);
  const after = worklist(wp).stages;
  if (!two || !after || !after.firstComplete) return [];
  const changed = !before?.firstComplete || before.secondNeeded.join() !== after.secondNeeded.join() || previousResult !== undefined;
  if (!changed) return [];
  const ks = Object.entries(after.firstDeviations).map(([id, k]) => `${id} ${k}`).join(', ');
  const lines: string[] = [];
  if (after.secondNeeded.length === 0) {
    if (!before?.firstComplete || (before.secondNeeded.length ?? 0) > 0) {
      lines.push(
        ...wrap(
          `The first stage is complete (deviations: ${ks}). It decides every attribute (at most ${two.firstAcceptanceNumber} deviation(s) relies on the control, ${two.firstRejectionNumber} or more does not), ` +
            `so the second stage is not needed: the ${int(two.secondSampleSize)} stage-2 items are not tested.`,
          92,
          '  ',
        ),
      );
    }
  } else if (!before?.firstComplete || before.secondNeeded.join() !== after.secondNeeded.join()) {
    lines.push(
      ...wrap(
        `The first stage is complete (deviations: ${ks}). ${after.secondNeeded.join(', ')} found more than ${two.firstAcceptanceNumber} and fewer than ${two.firstRejectionNumber} deviation(s), ` +
          `so the first stage is inconclusive there: test the ${int(two.secondSampleSize)} stage-2 items for ${after.secondNeeded.join(', ')} ` +
          `(the control is relied on only with at most ${two.secondAcceptanceNumber} deviation(s) in all ${int(two.firstSampleSize + two.secondSampleSize)} items).`,
          92,
          '  ',
        ),
      );
  }
  if (hadSecondResults && after.secondNeeded.length === 0) lines.push(...wrap('Results already recorded for stage-2 items are no longer part of the test; the change log keeps them.', 92, '  '));
  return lines;
}

/** Record a void: the item is replaced by the next unused spare (or the sample is one short). */
function voidItem(s: Session, item: SelectedItem, replaces: string | undefined, reason: string): ItemResult {
  const { result, spare } = voidResult(s.wp, item, replaces, reason);
  if (spare) s.print(`  ${item.key} is void; it is replaced by spare ${spare.key} (item ${spare.seq}).`);
  else s.print(`  ${item.key} is void and no spare is left: the sample will be one item short unless more items are selected.`);
  return result;
}

export const RESULT_HELP =
  'Conforms: the attribute is met. Deviation: it is not met; a document that cannot be found is a deviation, not a void.\n' +
  'Void: only a document properly cancelled (e.g. a cancelled invoice); it is not tested and the next spare replaces it.';

/** Sessions that have shown the result help once (it is not repeated for every item). */
const helped = new WeakSet<Session>();

/** Ask one item's results. A result recorded before is preselected, and its finding offered to keep or edit. */
export async function askItem(s: Session, item: SelectedItem, replaces: string | undefined, position: string, previous?: ItemResult): Promise<ItemResult> {
  const a = s.asker;
  // The attributes this item is tested for (at the second stage, only those that need it).
  const work = worklist(s.wp).items.find((x) => x.item.key === item.key);
  const attrs = s.wp.attributes!.filter((x) => !work || work.attributes.includes(x.id));
  const stageWords = work?.stage === 2 ? `, stage 2 (for ${attrs.map((x) => x.id).join(', ')})` : work?.stage === 1 ? ', stage 1' : '';
  s.print('', `Item ${position}: ${item.key} (row ${int(item.row)})${replaces ? `, spare replacing ${replaces}` : ''}${stageWords}`);
  const details = describe(item);
  if (details) s.print(`  ${details}`);
  const out: ItemResult = { key: item.key, seq: item.seq, ...(replaces ? { replaces } : {}), attributes: {} };
  for (const [i, attr] of attrs.entries()) {
    const id = `record.item.${item.seq}.${attr.id}`;
    const result = await a.select({
      id: `${id}.result`,
      message: `${attr.id} ${attr.description}`,
      help: i === 0 && !helped.has(s) ? RESULT_HELP : undefined,
      choices: [
        { value: 'conforms', name: 'Conforms' },
        { value: 'deviation', name: `Deviation (${attr.deviationDefinition})` },
        ...(i === 0 ? [{ value: 'void' as const, name: 'Void: properly cancelled document, replace with the next spare' }] : []),
      ],
      default: i === 0 && previous?.void ? 'void' : (previous?.attributes[attr.id]?.result ?? 'conforms'),
    });
    helped.add(s);
    if (result === 'void') {
      const reason = await a.text({
        id: `record.item.${item.seq}.void`,
        message: 'Why is the document void?',
        ...(previous?.void ? { default: previous.void.reason, editable: true } : {}),
        parse: requiredText('The reason'),
      });
      return voidItem(s, item, replaces, reason);
    }
    if (result === 'conforms') {
      out.attributes[attr.id] = { result: 'conforms' };
      continue;
    }
    const before = previous?.attributes[attr.id];
    out.attributes[attr.id] = await askDeviation(s, id, before?.result === 'deviation' ? before : undefined);
  }
  return withFieldwork(out, await askFieldwork(s, item, previous));
}

export const EVIDENCE_HELP =
  'The evidence inspected: document numbers, report names or file names, separated by ";". ' +
  'A file in the workpaper\'s folder (e.g. evidence/PI-253098.pdf) is fingerprinted (SHA-256) so re-performance can check it is unchanged.';

/** Who tested the item, when, the evidence inspected and a note (defaults: the preparer, today). */
async function askFieldwork(s: Session, item: SelectedItem, previous?: ItemResult): Promise<ItemFieldwork> {
  const a = s.asker;
  const id = `record.item.${item.seq}`;
  const today = isoDay(s.now());
  const periodStart = s.wp.engagement?.periodStart;
  const testedBy = await a.text({
    id: `${id}.testedBy`,
    message: 'Tested by',
    default: previous?.testedBy ?? s.wp.engagement?.preparer ?? s.by,
    parse: requiredText('Who tested the item'),
  });
  const testedOn = await a.text({
    id: `${id}.testedOn`,
    message: 'Date tested (YYYY-MM-DD)',
    default: previous?.testedOn ?? today,
    parse: (t) => {
      const why = testedOnProblem(t, { today, ...(periodStart ? { periodStart } : {}) });
      if (why) throw new AnswerError(`The date tested: ${why}.`);
      return t.trim();
    },
  });
  const prevRefs = (previous?.evidence ?? []).map((e) => e.ref).join('; ');
  const refs = await a.text({
    id: `${id}.evidence`,
    message: 'Evidence inspected (references separated by ";")',
    help: EVIDENCE_HELP,
    ...(prevRefs ? { default: prevRefs, editable: true } : {}),
    parse: (t) => {
      const list = evidenceRefs(t);
      if (list.length === 0) throw new AnswerError('Name at least one piece of evidence inspected: a document number, a report or a file name.');
      return list;
    },
  });
  const note = await a.text({
    id: `${id}.note`,
    message: `Note (optional${previous?.note ? `; ${NONE_ANSWER} for none` : ''})`,
    default: previous?.note ?? '',
    ...(previous?.note ? { editable: true } : {}),
    parse: (t) => (t.trim() === NONE_ANSWER ? undefined : optionalText(t)),
  });
  const evidence = fingerprintEvidence(s.dir, refs);
  const files = evidence.filter((e) => e.sha256);
  if (files.length > 0) s.print(`  Fingerprinted: ${files.map((e) => `${e.ref} (SHA-256 ${e.sha256!.slice(0, 12)}…)`).join(', ')}`);
  return { testedBy, testedOn, evidence, ...(note ? { note } : {}) };
}

async function askDeviation(s: Session, id: string, before?: Extract<AttributeResult, { result: 'deviation' }>): Promise<AttributeResult> {
  const a = s.asker;
  const found = await a.text({
    id: `${id}.found`,
    message: 'What was found?',
    ...(before ? { default: before.found, editable: true } : {}),
    parse: requiredText('What was found'),
  });
  const cause = await a.select({
    id: `${id}.cause`,
    message: 'Cause',
    choices: CAUSES.map((c) => ({ value: c, name: CAUSE_LABELS[c] })),
    ...(before ? { default: before.cause } : {}),
  });
  const causeDetail =
    cause === 'other'
      ? await a.text({
          id: `${id}.causeDetail`,
          message: 'Describe the cause',
          ...(before?.causeDetail ? { default: before.causeDetail, editable: true } : {}),
          parse: requiredText('The cause'),
        })
      : undefined;
  const intentional = await a.select({
    id: `${id}.intent`,
    message: 'Does it look intentional?',
    choices: INTENT.map((v) => ({ value: v, name: INTENT_LABELS[v] })),
    default: before?.intentional ?? 'no',
  });
  const pattern = await a.select({
    id: `${id}.pattern`,
    message: 'Isolated or systemic?',
    choices: PATTERNS.map((v) => ({ value: v, name: v === 'systemic' ? 'Systemic (likely to recur)' : PATTERN_LABELS[v] })),
    ...(before ? { default: before.pattern } : {}),
  });
  return { result: 'deviation', found, cause, ...(causeDetail ? { causeDetail } : {}), intentional, pattern };
}

function sheetRecord(s: Session, sheet: SheetItem, work: WorkItem): ItemResult | 'void' | undefined {
  const { item, replaces } = work;
  if (sheet.blank || sheet.problems.length > 0) return undefined;
  if (sheet.void) return 'void';
  // Only the attributes the item is tested for (at the second stage, those that need it).
  const attributes = Object.fromEntries(Object.entries(sheet.attributes).filter(([id]) => work.attributes.includes(id)));
  const r = withFieldwork(
    { key: item.key, seq: item.seq, ...(replaces ? { replaces } : {}), attributes },
    { ...sheet.fieldwork, evidence: fingerprintEvidence(s.dir, sheet.fieldwork.evidence) },
  );
  return isComplete(r, work) ? r : undefined;
}

export function problemLines(problems: readonly SheetProblem[], max = 40): string[] {
  // "Sheet row" as the spreadsheet numbers it (header = 1), not the population row in the sheet's own Row column.
  // The sheet is named when there are several, or when it is a workbook's sheet.
  const sheets = new Set(problems.map((p) => p.sheet).filter((x): x is string => x !== undefined));
  const named = sheets.size > 1 || [...sheets].some((x) => x.includes(', sheet '));
  const cells = (p: SheetProblem) => [String(p.row), p.column, p.value === '' ? '(blank)' : p.value, p.why];
  const lines = named
    ? table(['Sheet', 'Sheet row', 'Column', 'Value', 'Why'], problems.slice(0, max).map((p) => [p.sheet ?? '', ...cells(p)]))
    : table(['Sheet row', 'Column', 'Value', 'Why'], problems.slice(0, max).map(cells));
  if (problems.length > max) lines.push(`  ... and ${problems.length - max} more`);
  return lines;
}

function sheetOptions(s: Session): SheetOptions {
  const start = s.wp.engagement?.periodStart;
  return { today: isoDay(s.now()), ...(start ? { periodStart: start } : {}) };
}

/**
 * Apply the sheet from the next unrecorded item on, item by item, until one has no readable
 * result. Returns the problems that stop it (empty when everything is recorded).
 */
async function applySheet(s: Session, sheetsAbs: readonly string[], sheetsRel: readonly string[]): Promise<SheetProblem[]> {
  const sel = s.wp.selection!;
  const two = twoStageOf(s.wp) !== undefined;
  const partial = new Set(sel.items.filter((x) => x.role === 'spare' || x.stage === 2).map((x) => x.seq));
  const read = await readResultsSheets(sheetsAbs, sel.items, s.wp.attributes!, { ...sheetOptions(s), ...(two ? { blankAllowed: (seq: number) => partial.has(seq) } : {}) });
  const sheetRel = sheetsRel.join('; ');
  let applied = 0;
  for (;;) {
    const wl = worklist(s.wp);
    if (!wl.next) break;
    const { item, replaces } = wl.next;
    const row = read.items.get(item.seq);
    const rec = row ? sheetRecord(s, row, wl.next) : undefined;
    if (rec === undefined) break;
    const result = rec === 'void' ? voidItem(s, item, replaces, row!.void!.reason) : rec;
    await storeResult(s, result, 'sheet', sheetsRel, false);
    applied++;
  }
  if (applied > 0) await s.save('record');
  const wl = worklist(s.wp);
  s.print(
    ...wrap(
      `Read ${applied} item(s) from ${sheetRel}.` +
        (wl.next ? ` Items are read in order; reading stopped at item ${wl.next.item.seq} (${wl.next.item.key}), which has no readable result.` : ''),
      92,
      '  ',
    ),
  );
  if (!wl.next) return [];
  // Report every problem of the items still to record (and of the sheet as a whole).
  const pending = new Set(wl.items.filter((x) => !isRecorded(s.wp, x.item.key)).map((x) => x.item.seq));
  if (wl.nextSpare) pending.add(wl.nextSpare.seq);
  const problems = [...read.problems];
  for (const [seq, it] of read.items) {
    if (!pending.has(seq)) continue;
    const w = wl.items.find((x) => x.item.seq === seq);
    if (it.problems.length > 0) problems.push(...it.problems);
    else if (w && !it.blank && !it.void) {
      for (const id of w.attributes.filter((x) => it.attributes[x] === undefined)) {
        problems.push({ row: it.row, column: `${id} result`, value: '', why: `blank: item ${seq} is tested for ${id}${w.stage === 2 ? ' at the second stage' : ''}` });
      }
    }
    else if (it.blank && wl.items.some((x) => x.item.seq === seq)) {
      problems.push({ row: it.row, column: '(results)', value: '', why: `item ${seq} (${it.key}) has no result yet` });
    }
  }
  for (const x of wl.items) {
    if (pending.has(x.item.seq) && !read.items.has(x.item.seq) && read.problems.every((p) => p.row !== 1)) {
      problems.push({ row: 0, column: '(row)', value: x.item.key, why: `item ${x.item.seq} (${x.item.key}) is not in the sheet` });
    }
  }
  problems.sort((p, q) => p.row - q.row);
  if (problems.length === 0) {
    problems.push({ row: 0, column: '(results)', value: wl.next.item.key, why: `item ${wl.next.item.seq} has no readable result` });
  }
  return problems;
}

async function recordFromSheet(s: Session): Promise<'done' | 'stopped'> {
  const a = s.asker;
  // Stored relative to the workpaper's folder; typed (and suggested) relative to the working folder.
  const r = s.wp.results;
  const stored = r?.sheetPaths ?? (r?.sheetPath ? [r.sheetPath] : s.wp.selection!.fieldworkSheet ? [s.wp.selection!.fieldworkSheet] : []);
  const suggested = stored.length ? stored.map((p) => relative(s.cwd, resolve(s.dir, p)) || p).join('; ') : undefined;
  const abs = await a.text({
    id: 'record.sheet.path',
    message: 'Filled fieldwork sheet (CSV or XLSX; several, one per tester, separated by ";")',
    help: SHEET_CONVENTIONS.join('\n'),
    ...(suggested ? { default: suggested } : {}),
    parse: (t) => {
      const list = t.split(';').map((x) => x.trim()).filter((x) => x !== '');
      if (list.length === 0) throw new AnswerError('Name the filled sheet (or several, separated by ";").');
      const files = list.map((x) => existingFile('The sheet', s.cwd, ['.csv', '.xlsx'])(x));
      const twice = files.find((f, i) => files.indexOf(f) !== i);
      if (twice) throw new AnswerError(`${relative(s.cwd, twice) || twice} is named twice.`);
      return files;
    },
  });
  const rel = abs.map((p) => (isAbsolute(p) ? relative(s.dir, p) || p : p).split('\\').join('/'));
  for (let round = 1; ; round++) {
    const problems = await applySheet(s, abs, rel);
    if (problems.length === 0) return 'done';
    const wl = worklist(s.wp);
    s.print('', `  The sheet cannot be read for the items still to record (${problems.length} problem(s)); nothing was guessed:`);
    s.print(...problemLines(problems));
    const next = wl.next!;
    const what = await a.select({
      id: `record.sheet.problems.${round}`,
      message: 'What now?',
      choices: [
        { value: 'reread', name: 'I have fixed the sheet: read it again' },
        { value: 'type', name: `Type the result of item ${next.item.seq} (${next.item.key}) here, then go on with the sheet` },
        { value: 'stop', name: 'Stop for now (everything read so far is saved)' },
      ],
    });
    if (what === 'stop') return 'stopped';
    if (what === 'type') {
      const r = await askItem(s, next.item, next.replaces, `${wl.items.indexOf(next) + 1} of ${wl.items.length}`);
      await storeResult(s, r, 'interview');
    }
  }
}

async function recordTyped(s: Session): Promise<'done'> {
  for (;;) {
    const wl = worklist(s.wp);
    if (!wl.next) return 'done';
    const r = await askItem(s, wl.next.item, wl.next.replaces, `${wl.items.indexOf(wl.next) + 1} of ${wl.items.length}`);
    await storeResult(s, r, 'interview');
  }
}

/** Summary of what is recorded (per attribute: tested, deviations; voids). */
export function recordSummary(wp: Workpaper): string[] {
  const results = wp.results?.items ?? [];
  const rows = countResults(wp).map((c) => [c.attributeId, int(c.sampleSize), int(c.deviations)]);
  const voids = results.filter((r) => r.void);
  return [
    ...table(['Attribute', 'Tested', 'Deviations'], rows),
    ...(voids.length > 0 ? [`  Void: ${voids.map((v) => `${v.key} (${v.void!.replacedBy ? `replaced by ${v.void!.replacedBy}` : 'no spare left'})`).join(', ')}`] : []),
  ];
}

/** The record step. Returns 'stopped' when the user chose to stop before every item was recorded. */
export async function runRecordStep(s: Session, title = 'Record the results'): Promise<'done' | 'stopped'> {
  const a = s.asker;
  s.heading(title);
  const wl = worklist(s.wp);
  const recorded = progress(s.wp).recorded;
  s.print(`  ${int(wl.items.length)} item(s) to test${recorded > 0 ? `; ${recorded} recorded so far, continuing at item ${wl.next ? wl.next.item.key : '-'}` : ''}.`);
  const two = twoStageOf(s.wp);
  if (two && wl.stages) {
    s.print(
      ...wrap(
        wl.stages.secondNeeded.length > 0
          ? `Two-stage plan: the first stage is complete and the second is needed for ${wl.stages.secondNeeded.join(', ')}: its ${int(two.secondSampleSize)} items are on the worklist for those attributes.`
          : wl.stages.firstComplete
            ? 'Two-stage plan: the first stage is complete and decided every attribute; the stage-2 items are not tested.'
            : `Two-stage plan: record the ${int(two.firstSampleSize)} stage-1 items first; the interview then says whether the ${int(two.secondSampleSize)} stage-2 items are needed, and for which attributes.`,
        92,
        '  ',
      ),
    );
  }
  const how = await a.select({
    id: 'record.source',
    message: 'How do you want to enter the results?',
    choices: [
      { value: 'sheet', name: 'Read them from the filled fieldwork sheet' },
      { value: 'type', name: 'Type them here, item by item (saved after each item)' },
      { value: 'later', name: 'Later: the items are not tested yet' },
    ],
    default: s.wp.selection?.fieldworkSheet ? 'sheet' : 'type',
  });
  if (how === 'later') return 'stopped';
  const got = how === 'sheet' ? await recordFromSheet(s) : await recordTyped(s);
  if (got === 'done') {
    s.print('', '  All items are recorded:');
    s.print(...recordSummary(s.wp));
    const short = worklist(s.wp).shortBy;
    if (short > 0) s.print(`  The sample is ${short} item(s) short: voided items without a spare left.`);
    const gaps = fieldworkGaps(s.wp);
    if (gaps.length > 0) {
      const shown = gaps.slice(0, 5).map((g) => `${g.key} (${g.missing.join(', ')})`).join('; ');
      s.print(...wrap(`${gaps.length} tested item(s) have no record of who tested them, when, or on what evidence (a sheet without those columns): ${shown}${gaps.length > 5 ? '; ...' : ''}. Change the item's result to add them.`, 92, '  '));
    }
  }
  return got;
}

/** Every item has a result: offer to change one item's result (then record any spare it brings in). */
export async function changeResults(s: Session): Promise<'done' | 'stopped'> {
  const a = s.asker;
  s.print('', '  Every item has a result.');
  for (let i = 1; ; i++) {
    const tested = (s.wp.results?.items ?? []).filter((r) => !r.void && isRecorded(s.wp, r.key));
    const pick = await a.select({
      id: `record.change.${i}`,
      message: "Change an item's result?",
      choices: [
        { value: '', name: 'No' },
        ...tested.map((r) => ({
          value: r.key,
          name: `${r.key}: ${Object.entries(r.attributes).map(([id, x]) => `${id} ${x.result}`).join(', ')}`,
        })),
      ],
      // Answering a review note on one item: that item is offered first.
      default: i === 1 && s.focusItem && tested.some((r) => r.key === s.focusItem) ? s.focusItem : '',
    });
    if (pick === '') return 'done';
    const wl = worklist(s.wp);
    const entry = wl.items.find((x) => x.item.key === pick)!;
    const previous = s.wp.results?.items.find((x) => x.key === pick);
    const r = await askItem(s, entry.item, entry.replaces, `${wl.items.indexOf(entry) + 1} of ${wl.items.length}`, previous);
    await storeResult(s, r, 'interview');
    if (!recordingComplete(s.wp)) {
      const got = await runRecordStep(s);
      if (got === 'stopped') return got;
    }
  }
}
