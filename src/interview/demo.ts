/**
 * The demo: the real interview, end to end, answered by a script from samples/, on an invented
 * scenario. It asks nothing and needs no terminal. The files it writes (workpaper, fieldwork
 * sheet, memo) go to one folder, with copies of the scenario's population and filled sheet so
 * that the folder is complete on its own.
 */
import { existsSync, mkdirSync, readFileSync, rmSync, statSync } from 'node:fs';
import { acquireLock } from '../io/lock.js';
import { writeError } from '../io/messages.js';
import { readRegularFile } from '../io/read.js';
import { writeFileSafely } from '../io/write.js';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as z from 'zod';
import type { CommandContext, Output } from '../commands/types.js';
import { FileInputError, TolrateInputError } from '../errors.js';
import { packageVersion } from '../util/version.js';
import type { Workpaper } from '../workpaper/schema.js';
import { CAUSE_LABELS, SEVERITY_LABELS } from '../control-test/index.js';
import { int, pctPlain, pctUp } from '../util/format.js';
import { groupDigits } from '../population/index.js';
import { ScriptedAsker, ScriptError, type ScriptAnswers } from './scripted.js';
import { newSession, openSession, type Session } from './session.js';
import { firstOpen, runOpenSteps, runStep, STEPS } from './flow.js';
import { answerOpenNotes, reviewSitting } from './review.js';
import { evaluationLines } from './conclude.js';
import { defaultSheetName } from './plan-selection.js';
import { CAUTION, wrap } from './show.js';
import type { EngagementFolder } from '../engagement/folder.js';

export const SCENARIOS = ['main', 'small'] as const;
export type Scenario = (typeof SCENARIOS)[number];

const Answers = z.record(z.string(), z.union([z.string(), z.number(), z.boolean(), z.null(), z.array(z.union([z.string(), z.number(), z.boolean(), z.null()]))]));

const ScenarioFile = z.object({
  $comment: z.string().optional(),
  title: z.string().min(1),
  /**
   * The scenario's clock: the time the demo's scripted practitioner works at. It advances one
   * second each time it is read, so every run of the demo writes the same files.
   */
  clock: z.iso.datetime().optional(),
  workpaper: z.string().regex(/\.tolrate\.json$/, 'must end in .tolrate.json'),
  copy: z.array(z.string().min(1)),
  answers: Answers,
  /**
   * A scripted review after the preparer's sign-off: the reviewer's first sitting (notes raised),
   * the preparer's answers (one by changing the record, then concluding and signing again), and
   * the reviewer's second sitting (notes cleared, sign-off). Questions not in a script take
   * their default.
   */
  review: z.object({ reviewer: Answers, preparer: Answers, reviewerAgain: Answers }).optional(),
});
export type ScenarioFile = z.infer<typeof ScenarioFile>;

/** The samples folder shipped with tolrate. */
export function samplesDir(): string {
  return join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'samples');
}

export function scenarioDir(scenario: Scenario, samples = samplesDir()): string {
  return scenario === 'main' ? samples : join(samples, scenario);
}

export function loadScenario(scenario: Scenario, samples = samplesDir()): ScenarioFile {
  const path = join(scenarioDir(scenario, samples), 'demo-answers.json');
  let data: unknown;
  try {
    data = JSON.parse(readFileSync(path, 'utf8'));
  } catch (e) {
    throw new FileInputError(path, `Cannot read the demo scenario ${path}: ${(e as Error).message}`);
  }
  const r = ScenarioFile.safeParse(data);
  if (!r.success) throw new FileInputError(path, `The demo scenario ${path} is not valid:`, r.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`));
  return r.data;
}

export interface DemoOptions {
  out: string;
  scenario: Scenario;
  /** Echo the whole interview (questions, answers and what it showed). */
  verbose?: boolean;
  now?: () => Date;
  /** Stop after the planning steps (used to make the filled sheet from the real selection). */
  planOnly?: boolean;
  samples?: string;
  /** The engagement folder file the demo's folder has (its answers replace the script's engagement). */
  folder?: EngagementFolder;
}

/** A clock that starts at `start` and advances one second each time it is read. */
export function scenarioClock(start: string): () => Date {
  let t = Date.parse(start);
  return () => new Date((t += 1000));
}

export interface DemoResult {
  /** The clock the run used (continue with it, e.g. for the memo). */
  now: () => Date;
  workpaper: Workpaper;
  workpaperPath: string;
  files: Array<{ what: string; path: string }>;
  asker: ScriptedAsker;
  /** Every question asked with its scripted answer, and what the interview showed. */
  echoed: string;
}

/** Run the scenario's interview into `out`. Files from an earlier demo run there are replaced. */
export async function runDemoInterview(ctx: CommandContext, o: DemoOptions): Promise<DemoResult> {
  const samples = o.samples ?? samplesDir();
  const sc = loadScenario(o.scenario, samples);
  const from = scenarioDir(o.scenario, samples);
  const out = resolve(ctx.cwd, o.out);
  if (existsSync(out) && !statSync(out).isDirectory()) throw new TolrateInputError(`--out ${out} is a file, not a folder.`, 'USAGE');
  try {
    mkdirSync(out, { recursive: true });
  } catch (e) {
    throw writeError(e, out, 'the demo folder');
  }
  // The demo's workpaper is locked like any other while the interview writes it.
  const lock = acquireLock(join(out, sc.workpaper));
  try {
    return await runLocked(ctx, o, sc, from, out);
  } finally {
    lock.release();
  }
}

async function runLocked(ctx: CommandContext, o: DemoOptions, sc: ScenarioFile, from: string, out: string): Promise<DemoResult> {
  const files: DemoResult['files'] = [];
  for (const f of sc.copy) {
    const src = join(from, f);
    if (!existsSync(src)) {
      if (o.planOnly) continue;
      throw new FileInputError(src, `The demo scenario needs ${src}, which is missing.`);
    }
    writeFileSafely(join(out, f), readRegularFile(src, 'The demo file'), { what: 'the demo copy' });
    const what = f.includes('filled') ? 'filled fieldwork sheet (the tester\'s results)' : f.startsWith('evidence') ? 'evidence file (fingerprinted when recorded)' : 'population';
    files.push({ what, path: join(out, f) });
  }
  const wpPath = join(out, sc.workpaper);
  const sheetPath = join(out, defaultSheetName(wpPath));
  for (const p of [wpPath, sheetPath]) {
    try {
      rmSync(p, { force: true });
    } catch (e) {
      throw writeError(e, p, 'the earlier demo file');
    }
  }
  let echoed = '';
  const sink: Output = {
    write: (t: string) => {
      echoed += t;
      if (o.verbose) ctx.stdout.write(t);
    },
  };
  const asker = new ScriptedAsker(sc.answers as ScriptAnswers, {
    onAsk: (r) => sink.write(`? ${r.message} ${r.answer === '' ? '(Enter)' : r.answer}${r.refused ? `\n  > ${r.refused}` : ''}\n`),
  });
  const now = o.now ?? (sc.clock ? scenarioClock(sc.clock) : () => new Date());
  const s: Session = newSession({
    asker,
    out: sink,
    path: wpPath,
    cwd: out,
    toolVersion: packageVersion(),
    now,
    ...(o.folder ? { folder: o.folder } : {}),
    // Nobody to ask: a failed save ends the demo with the reason (exit 2).
    onSaveFailure: 'throw',
  });
  const steps = o.planOnly ? STEPS.slice(0, 6) : STEPS;
  const got = await runOpenSteps(s, steps);
  const left = firstOpen(s.wp, steps);
  if (got !== 'done' || left) throw new ScriptError(`The demo script stopped before the end (at ${left ?? 'an unknown step'}).`);
  let wp = s.wp;
  if (sc.review && !o.planOnly) {
    const sitting = async (answers: Record<string, unknown>): Promise<Session> => {
      const a = new ScriptedAsker(answers as ScriptAnswers, { defaults: true, onAsk: (r) => sink.write(`? ${r.message} ${r.answer === '' ? '(Enter)' : r.answer}${r.refused ? `\n  > ${r.refused}` : ''}\n`) });
      const opened = await openSession({ asker: a, out: sink, path: wpPath, cwd: out, toolVersion: packageVersion(), now, ...(o.folder ? { folder: o.folder } : {}) });
      if (!opened) throw new ScriptError('The demo could not open its own workpaper.');
      return opened;
    };
    const r1 = await sitting(sc.review.reviewer);
    await reviewSitting(r1);
    const p = await sitting(sc.review.preparer);
    await answerOpenNotes(p, (st) => runStep(p, st));
    await runOpenSteps(p, STEPS);
    const r2 = await sitting(sc.review.reviewerAgain);
    await reviewSitting(r2);
    wp = r2.wp;
    if (!wp.signoffs?.reviewer) throw new ScriptError('The demo review did not end with the reviewer\'s sign-off.');
  }
  files.unshift({ what: 'workpaper', path: wpPath });
  if (s.wp.selection?.fieldworkSheet) files.splice(1, 0, { what: 'fieldwork sheet (as written at selection)', path: join(out, s.wp.selection.fieldworkSheet) });
  return { workpaper: wp, workpaperPath: wpPath, files, asker, echoed, now };
}

/** The short account of the demo run. */
export function narrative(wp: Workpaper, title: string): string[] {
  const L: string[] = [];
  const e = wp.engagement!;
  const c = wp.control!;
  const p = wp.population!;
  const ap = wp.approach!;
  const sel = wp.selection!;
  const N = p.fingerprint.rowCount;
  L.push(title, '='.repeat(Math.min(92, title.length)), '');
  L.push(...wrap(`${e.entity}, period ${e.periodStart} to ${e.periodEnd}, workpaper ${e.reference}. Control ${c.id}: ${c.description}`));
  for (const a of wp.attributes ?? []) L.push(...wrap(`${a.id}: ${a.description} (deviation: ${a.deviationDefinition})${a.tolerableRate !== undefined ? `; own tolerable rate ${pctPlain(a.tolerableRate)}` : ''}.`, 92, '  '));
  L.push('');
  const tie = p.tieOut;
  const agreedAll = tie.countDifference === 0 && (tie.totalDifference === undefined || /^-?0*(\.0*)?$/.test(tie.totalDifference));
  const agreed =
    tie.ledgerCount === undefined
      ? `not agreed to a ledger count: ${tie.explanation ?? ''}`
      : agreedAll
        ? `agreed to the ledger count${tie.ledgerTotal !== undefined ? ' and total' : ''}`
        : `against the ledger's ${int(tie.ledgerCount)} items${tie.ledgerTotal !== undefined ? ` and ${groupDigits(tie.ledgerTotal)}` : ''} (difference ${tie.countDifference}${tie.totalDifference !== undefined ? `, ${groupDigits(tie.totalDifference)}` : ''}), explained: ${tie.explanation ?? ''}`;
  L.push(...wrap(`Population: ${int(N)} items (${p.samplingUnit.toLowerCase()}), total ${p.fingerprint.amountTotal !== undefined ? groupDigits(p.fingerprint.amountTotal) : '-'}, ${agreed.replace(/\.$/, '')}.`));
  L.push('');
  if (ap.kind === 'statistical') {
    const top = ap.sizes.reduce((m, x) => (x.sampleSize > m.sampleSize ? x : m), ap.sizes[0]!);
    L.push(
      ...wrap(
        `Sample size ${int(ap.sampleSize)}: ${pctPlain(ap.confidence)} confidence, tolerable rate ${pctPlain(top.tolerableRate)} (${top.attributeId}), expected rate ${pctPlain(ap.expectedRate)}, ${ap.model} model with N = ${int(N)}. ` +
          `It is the smallest sample in which k_e = ${top.expectedDeviations} deviation(s) still leave the risk of overreliance at ${pctUp(top.achievedRisk)} (rounded up), within the ${pctPlain(1 - ap.confidence)} allowed.` +
          (ap.sizes.length > 1 ? ` Sizes per attribute: ${ap.sizes.map((x) => `${x.attributeId} ${x.sampleSize}`).join(', ')}; the largest is used.` : '') +
          (ap.finitePopulationCorrection
            ? ` The binomial model would need ${ap.finitePopulationCorrection.binomialSampleSize}` +
              (ap.model === 'hypergeometric' && ap.finitePopulationCorrection.binomialSampleSize > ap.sampleSize
                ? ` (${ap.finitePopulationCorrection.binomialSampleSize - ap.sampleSize} more than the exact size for this population)`
                : '') +
              `; the textbook finite population correction of it gives ${ap.finitePopulationCorrection.correctedSampleSize} (shown for comparison, not used).`
            : ''),
      ),
    );
  } else L.push(...wrap(`Sample size ${int(ap.sampleSize)} from the firm's policy: ${ap.rationale}`));
  L.push('');
  const sample = sel.items.filter((i) => i.role === 'sample');
  L.push(
    ...wrap(
      `Selection: ${sel.method}${sel.seed ? `, seed ${sel.seed}` : ''}${sel.starts ? `, ${sel.starts.length} random start(s), interval ${sel.interval?.toFixed(2)}` : ''}; ${int(sample.length)} items and ${int(sel.spares)} spares. ` +
        `First items: ${sample.slice(0, 8).map((i) => i.key).join(', ')}, ...`,
    ),
  );
  L.push('');
  const res = wp.results!;
  const voids = res.items.filter((r) => r.void);
  const devs = res.items.flatMap((r) => Object.entries(r.attributes).filter(([, x]) => x.result === 'deviation').map(([id, x]) => ({ key: r.key, id, x })));
  L.push(`Results ${res.source === 'sheet' ? `read from the filled fieldwork sheet ${res.sheetPath ?? ''}` : 'entered item by item'}:`);
  for (const v of voids) L.push(...wrap(`${v.key} void: ${v.void!.reason.replace(/\.$/, '')}. Replaced by spare ${v.void!.replacedBy ?? '(none left)'}.`, 92, '  '));
  if (devs.length === 0) L.push('  No deviations.');
  for (const d of devs) {
    if (d.x.result !== 'deviation') continue;
    L.push(...wrap(`${d.id} ${d.key}: ${d.x.found.replace(/\.$/, '')} (${CAUSE_LABELS[d.x.cause].toLowerCase()}; intentional: ${d.x.intentional}; ${d.x.pattern}).`, 92, '  '));
  }
  L.push('', 'Evaluation:');
  L.push(...evaluationLines(wp, wp.evaluation!));
  const con = wp.conclusion!;
  L.push('', 'Conclusion:');
  L.push(...wrap(con.control.text, 92, '  '));
  if (con.severity) L.push(...wrap(`Severity, as classified by the (scripted) practitioner: ${SEVERITY_LABELS[con.severity.classification]}. ${con.severity.rationale}`, 92, '  '));
  if (con.followUps.length) {
    L.push('  Follow-up actions:');
    for (const f of con.followUps) L.push(...wrap(`- ${f.description}${f.owner ? ` Owner: ${f.owner}.` : ''}${f.due ? ` Due ${f.due}.` : ''}`, 92, '    '));
  }
  const so = wp.signoffs?.preparer;
  if (so) L.push(`  Prepared by ${so.name} on ${so.date}.`);
  const notes = wp.review?.notes ?? [];
  if (notes.length > 0 || wp.signoffs?.reviewer) {
    L.push('', 'Review:');
    for (const n of notes) {
      const raised = n.thread[0]!;
      const answer = n.thread.find((e) => e.kind === 'answered');
      L.push(...wrap(`${n.id} (${n.section}${n.item ? `, ${n.item}` : ''}), raised by ${raised.by}: ${raised.text ?? ''}`, 92, '  '));
      if (answer) L.push(...wrap(`Answered by ${answer.by}${answer.changedRecord ? ', with a change to the record' : ''}: ${answer.text ?? ''}`, 92, '    '));
      L.push(`    ${n.thread[n.thread.length - 1]!.kind === 'cleared' ? 'Cleared.' : 'Not cleared.'}`);
    }
    for (const a of wp.amendments ?? []) {
      // The changes made, then how many follow from them (the evaluation and conclusion made again).
      const made = a.changes.filter((c) => !/^(evaluation|conclusion)\b/.test(c.path));
      const follow = a.changes.length - made.length;
      L.push(...wrap(`Amendment after sign-off by ${a.by} (${a.role}): ${a.why}; ${made.map((c) => `${c.path}: ${JSON.stringify(c.old)} -> ${JSON.stringify(c.new)}`).join('; ')}${follow ? ` (and ${follow} change(s) to the evaluation and conclusion that follow from it)` : ''}; sign-offs cleared: ${a.cleared.join(', ') || 'none'}.`, 92, '  '));
    }
    const rv = wp.signoffs?.reviewer;
    if (rv) L.push(`  Reviewed and signed off by ${rv.name} on ${rv.date}.`);
  }
  return L;
}

export function fileLines(cwd: string, files: DemoResult['files']): string[] {
  const shown = (p: string) => {
    const r = relative(cwd, p);
    return r && !r.startsWith('..') ? r : p;
  };
  return ['', 'Files:', ...files.map((f) => `  ${f.what.padEnd(46)} ${shown(f.path)}`), '', ...wrap(CAUTION)];
}
