/**
 * The interview commands' bodies: plan, record, conclude, and the start screen's "new test" and
 * "continue" runs. Each takes the answerer as an argument, so the same code runs on a terminal
 * and from a script.
 */
import { dirname, relative, resolve, sep } from 'node:path';
import type { CommandContext } from '../commands/types.js';
import { TolrateInputError } from '../errors.js';
import { loadWorkpaper } from '../workpaper/file.js';
import { int } from '../util/format.js';
import { InterviewStopped, isStop, type Asker } from './asker.js';
import { sessionFor, workpaperPath, type InterviewOptions } from './command.js';
import { chooseRevisit, firstOpen, isAnswered, PLAN_STEPS, runOpenSteps, runStep, STEP_LABELS, STEPS, statusLines, type StepName } from './flow.js';
import { hasStepMembers, partView, recordingComplete, ROLL_FORWARD_PLAN_STEPS, ROLL_FORWARD_STEPS, type Part } from '../control-test/index.js';
import { interimPlanOpen, rollForwardBlocked } from './rollforward.js';
import { loadPolicy } from './policy.js';
import { requiredText } from './parse.js';
import { progress } from './record.js';
import { answerOpenNotes, reviewSitting } from './review.js';
import { reviewStatus } from '../control-test/index.js';
import type { Session } from './session.js';
import { wrap } from './show.js';
import { followUpLines, startCarriedForward } from './carry-forward.js';
import { packageVersion } from '../util/version.js';

export interface StageOptions extends InterviewOptions {
  file?: string | undefined;
  policy?: string | undefined;
  /** Last year's workpaper to carry forward into a new file (`plan NEW --from LAST`). */
  from?: string | undefined;
  /** `record --part`: which part of a test done in parts to record. */
  part?: Part | undefined;
}

function shown(ctx: CommandContext, path: string): string {
  const r = relative(ctx.cwd, path);
  return r && !r.startsWith('..') ? r : path;
}

/**
 * Run an interview so that a stop (Ctrl-C) names the workpaper once it holds something, and
 * keeps the answers given in the step in progress (offered again when it is asked again).
 * However it ends, the session gives back the workpaper's lock.
 */
async function guarded(run: (hold: (s: Session) => Session) => Promise<number>): Promise<number> {
  let held: Session | undefined;
  try {
    return await run((s) => (held = s));
  } catch (e) {
    if (!isStop(e)) throw e;
    const stop = new InterviewStopped((e as Error).message);
    const note = (e as InterviewStopped).stopNote;
    if (note !== undefined) {
      // Stopped while a failed save was being handled: the last answer is not on disk, say so.
      stop.stopNote = note;
    } else if (held?.saved) {
      stop.keptUnfinished = held.currentStep !== undefined && held.keepUnfinished(held.currentStep);
      stop.workpaper = held.path;
    }
    throw stop;
  } finally {
    held?.release();
  }
}

async function open(ctx: CommandContext, asker: Asker, o: StageOptions, mustExist: boolean, hold: (s: Session) => Session): Promise<Session | number | undefined> {
  if (o.policy) loadPolicy(resolve(ctx.cwd, o.policy));
  let file = o.file;
  if (file === undefined) {
    file = await asker.text({
      id: 'start.file',
      message: 'Workpaper file for this test',
      help: 'A name such as supplier-invoices (saved as supplier-invoices.tolrate.json in this folder).',
      parse: (t) => {
        const v = requiredText('The file name')(t);
        workpaperPath(ctx.cwd, v);
        return v;
      },
    });
  }
  const path = workpaperPath(ctx.cwd, file);
  if (o.from) {
    // Recorded relative to the new file's folder (as population paths are), so the folders can move together.
    const fromPath = resolve(ctx.cwd, o.from);
    startCarriedForward(path, fromPath, relative(dirname(path), fromPath).split(sep).join('/'), packageVersion(), (o.now ?? (() => new Date()))());
  }
  const s = await sessionFor(ctx, asker, path, { ...o, ...(o.policy ? { policyPath: o.policy } : {}), mustExist, hold });
  if (s && 'readOnly' in s) {
    return showReadOnly(ctx, path);
  }
  if (!s) {
    ctx.stdout.write('Nothing was changed.\n');
    return undefined;
  }
  if (s.wp.log.length === 0) s.print(`Starting a new test in ${shown(ctx, path)}.`);
  else if (o.from && s.wp.carriedForward) {
    s.print(...wrap(`Starting ${shown(ctx, path)} from last year's ${s.wp.carriedForward.path} (its state ${s.wp.carriedForward.stateHash.slice(0, 12)}...).`));
    s.print(...wrap('The control, the attributes and the approach are offered as the answers to confirm; the population, selection, results and conclusion are not copied.', 92, '  '));
    s.print(...followUpLines(s.wp.carriedForward));
  }
  else {
    s.print(`${shown(ctx, path)}: ${s.wp.control?.id ?? 'a test'}${s.wp.engagement ? `, ${s.wp.engagement.entity}` : ''}`);
    s.print(...statusLines(s.wp));
  }
  // The reviewer's open notes come first.
  await answerOpenNotes(s, (st) => runStep(s, st));
  return s;
}

function next(ctx: CommandContext, s: Session): void {
  const st = firstOpen(s.wp);
  const f = shown(ctx, s.path);
  if (st === undefined) {
    const rv = reviewStatus(s.wp);
    if (rv.stage === 'reviewed') s.print('', `The test is complete, reviewed and signed off. Write the memo with: ${s.command('memo', f)}`);
    else {
      s.print('', ...wrap(`The test is complete and signed off by the preparer; review: ${rv.label}.`));
      s.print(...wrap(`The reviewer reviews it with: ${s.command('review', f)} (until the review is signed off, the memo is a DRAFT: ${s.command('memo', f)}).`));
    }
  }
  else if ((ROLL_FORWARD_PLAN_STEPS as readonly string[]).includes(st)) {
    s.print('', `The interim part is recorded; the roll-forward part is not planned yet (next: ${STEP_LABELS[st]}).`, `Plan it with: ${s.command('rollforward', f)}`);
  } else if (st === 'rollforward.record') {
    const sheet = s.wp.rollForward?.selection?.fieldworkSheet;
    s.print(
      '',
      `The roll-forward part is planned.${sheet ? ` Its fieldwork sheet is ${sheet} (beside the workpaper).` : ''}`,
      `Test its items, then record the results with: ${s.command('record', f)} --part roll-forward`,
    );
  } else if (st === 'record') {
    const sheet = s.wp.selection?.fieldworkSheet;
    s.print(
      '',
      `Planning is complete.${sheet ? ` The fieldwork sheet is ${sheet} (beside the workpaper).` : ''}`,
      `Test the items, then record the results with: ${s.command('record', f)}`,
    );
  } else if (st === 'conclude' || st === 'signoff') {
    s.print('', `Next: ${s.command('conclude', f)}`);
    if (st === 'conclude' && !s.wp.rollForward) s.print(`(Tested to an interim date? Add the roll-forward part first: ${s.command('rollforward', f)})`);
  }
  else s.print('', `Next step: ${STEP_LABELS[st]}. Continue with: ${s.command('plan', f)}`);
}

/** Offer to change answered steps, one after another, until the user says no (each change runs the steps it reopens). */
async function revisits(s: Session, steps: readonly StepName[], idPrefix: string): Promise<void> {
  for (let i = 1; ; i++) {
    const st = await chooseRevisit(s, steps, `${idPrefix}.${i}`);
    if (!st) return;
    await runStep(s, st);
    await runOpenSteps(s, steps);
  }
}

/** `tolrate plan [FILE]`. */
export async function planInterview(ctx: CommandContext, asker: Asker, o: StageOptions): Promise<number> {
  return guarded(async (hold) => {
    const s = await open(ctx, asker, o, false, hold);
    if (typeof s === 'number') return s;
    if (!s) return 1;
    const wasComplete = PLAN_STEPS.every((st) => isAnswered(s.wp, st));
    const planned = await runOpenSteps(s, PLAN_STEPS);
    // A test with a roll-forward part: its planning steps follow when they are open.
    if (planned === 'done' && !firstOpen(s.wp, PLAN_STEPS) && firstOpen(s.wp, ROLL_FORWARD_PLAN_STEPS)) {
      const rf = s.wp.rollForward!;
      const over = s.now().toISOString().slice(0, 10) > rf.periodEnd;
      const now = await s.asker.confirm({
        id: 'plan.rollforward.now',
        message: `Plan the roll-forward part (${rf.periodStart} to ${rf.periodEnd}) now?`,
        help: over ? 'The period has ended: the roll-forward population can be complete.' : `The period runs to ${rf.periodEnd}: a population of the roll-forward's transactions is complete only after it (a periodic control's occurrences can be planned now).`,
        default: over,
      });
      if (now) await runOpenSteps(s, ROLL_FORWARD_PLAN_STEPS);
    } else if (wasComplete) {
      s.print('', 'Every planning step is answered.');
      await revisits(s, PLAN_STEPS, 'plan.revisit');
    }
    next(ctx, s);
    return 0;
  });
}

/** `tolrate record FILE [--part interim|roll-forward]`. */
export async function recordInterview(ctx: CommandContext, asker: Asker, o: StageOptions): Promise<number> {
  return guarded(async (hold) => {
    const s = await open(ctx, asker, o, true, hold);
    if (typeof s === 'number') return s;
    if (!s) return 1;
    const open1 = firstOpen(s.wp, PLAN_STEPS);
    if (open1) {
      throw new TolrateInputError(`The plan is not finished (next: ${STEP_LABELS[open1]}), so there is nothing to record yet.`, 'PLAN_INCOMPLETE', [
        `Continue planning with: ${s.command('plan', shown(ctx, s.path))}`,
      ]);
    }
    const part = await whichPart(ctx, s, o.part);
    await runStep(s, part === 'roll-forward' ? 'rollforward.record' : 'record');
    next(ctx, s);
    return 0;
  });
}

/**
 * The part to record: the one asked for; else the interim part until it is complete, then the
 * roll-forward part until it is; when both are complete, the user chooses.
 */
async function whichPart(ctx: CommandContext, s: Session, asked: Part | undefined): Promise<Part> {
  const rf = s.wp.rollForward;
  const rfPlanned = rf !== undefined && firstOpen(s.wp, ROLL_FORWARD_PLAN_STEPS) === undefined;
  if (asked === 'roll-forward' && !rfPlanned) {
    const st = rf ? firstOpen(s.wp, ROLL_FORWARD_PLAN_STEPS) : undefined;
    throw new TolrateInputError(
      rf ? `The roll-forward part is not planned yet (next: ${STEP_LABELS[st!]}), so there is nothing to record in it.` : 'This test has no roll-forward part.',
      'PLAN_INCOMPLETE',
      [rf ? `Plan it with: ${s.command('rollforward', shown(ctx, s.path))}` : `To test the rest of the period after an interim date, add one with: ${s.command('rollforward', shown(ctx, s.path))}`],
    );
  }
  if (asked) return asked;
  if (!rf || !rfPlanned) return 'interim';
  if (!recordingComplete(s.wp)) {
    s.print('', 'Interim part (its results come first; the roll-forward part follows).');
    return 'interim';
  }
  if (!recordingComplete(partView(s.wp, 'roll-forward'))) {
    s.print('', 'The interim part is recorded: recording the roll-forward part.');
    return 'roll-forward';
  }
  return s.asker.select<Part>({
    id: 'record.part',
    message: 'Both parts are recorded. Which part do you want to change?',
    choices: [
      { value: 'interim', name: `Interim part (${s.wp.engagement!.periodStart} to ${rf.interimDate})` },
      { value: 'roll-forward', name: `Roll-forward part (${rf.periodStart} to ${rf.periodEnd})` },
    ],
    default: 'roll-forward',
  });
}

/** `tolrate rollforward FILE`: the interim date and the roll-forward part's plan. */
export async function rollForwardInterview(ctx: CommandContext, asker: Asker, o: StageOptions): Promise<number> {
  return guarded(async (hold) => {
    const s = await open(ctx, asker, o, true, hold);
    if (typeof s === 'number') return s;
    if (!s) return 1;
    const blocked = rollForwardBlocked(s.wp);
    if (blocked) {
      throw new TolrateInputError(`A roll-forward part cannot be added: ${blocked}.`, 'ROLL_FORWARD_REFUSED', [
        s.wp.engagement ? 'Test the whole period in one sample instead.' : `Start with: ${s.command('plan', shown(ctx, s.path))}`,
      ]);
    }
    const f = shown(ctx, s.path);
    if (!hasStepMembers(s.wp, 'rollforward.period')) {
      const got = await runStep(s, 'rollforward.period');
      if (got !== 'done') return 0;
    }
    const interimOpen = interimPlanOpen(s.wp);
    if (interimOpen) {
      s.print('', `The interim part is not planned yet (next: ${interimOpen}).`, `Plan it with: ${s.command('plan', f)} (the roll-forward part's planning follows it).`);
      return 0;
    }
    const wasPlanned = firstOpen(s.wp, ROLL_FORWARD_PLAN_STEPS) === undefined;
    await runOpenSteps(s, ROLL_FORWARD_PLAN_STEPS);
    if (wasPlanned) {
      s.print('', 'The roll-forward part is planned.');
      await revisits(s, ROLL_FORWARD_PLAN_STEPS, 'rollforward.revisit');
    }
    next(ctx, s);
    return 0;
  });
}

/** `tolrate conclude FILE`. */
export async function concludeInterview(ctx: CommandContext, asker: Asker, o: StageOptions): Promise<number> {
  return guarded(async (hold) => {
    const s = await open(ctx, asker, o, true, hold);
    if (typeof s === 'number') return s;
    if (!s) return 1;
    const open1 = firstOpen(s.wp, [...PLAN_STEPS, 'record', ...ROLL_FORWARD_STEPS]);
    if (open1) {
      const f = shown(ctx, s.path);
      const counted = (wp: typeof s.wp, what: string) => {
        const p = progress(wp);
        return `${int(p.total - p.recorded)} of ${int(p.total)} ${what}items have no result yet`;
      };
      const detail =
        open1 === 'record' && s.wp.selection
          ? counted(s.wp, s.wp.rollForward ? 'interim ' : '')
          : open1 === 'rollforward.record'
            ? counted(partView(s.wp, 'roll-forward'), 'roll-forward ')
            : `next: ${STEP_LABELS[open1]}`;
      const how =
        open1 === 'record'
          ? `Record the results with: ${s.command('record', f)}`
          : open1 === 'rollforward.record'
            ? `Record the roll-forward results with: ${s.command('record', f)} --part roll-forward`
            : (ROLL_FORWARD_STEPS as readonly string[]).includes(open1)
              ? `Plan the roll-forward part with: ${s.command('rollforward', f)}`
              : `Continue planning with: ${s.command('plan', f)}`;
      throw new TolrateInputError(`The test cannot be concluded yet (${detail}).`, 'NOT_READY', [how]);
    }
    if (s.wp.conclusion) {
      const again = await asker.confirm({
        id: 'conclude.again',
        message: `The test is concluded${s.wp.signoffs?.preparer ? ` and signed off by ${s.wp.signoffs.preparer.name}` : ''}. Conclude it again?`,
        default: false,
      });
      if (again) await runStep(s, 'conclude');
    }
    await runOpenSteps(s, ['conclude', 'signoff']);
    next(ctx, s);
    return 0;
  });
}

/** The start screen's "new test" and "continue": the whole test from the first open step. */
export async function wholeInterview(ctx: CommandContext, asker: Asker, o: StageOptions): Promise<number> {
  return guarded(async (hold) => {
    const s = await open(ctx, asker, o, false, hold);
    if (typeof s === 'number') return s;
    if (!s) return 1;
    const wasDone = firstOpen(s.wp) === undefined;
    await runOpenSteps(s, STEPS);
    if (wasDone) await revisits(s, STEPS, 'start.revisit');
    next(ctx, s);
    return 0;
  });
}

/** Another session has the workpaper open: show where the test stands, save nothing. */
function showReadOnly(ctx: CommandContext, path: string): number {
  const wp = loadWorkpaper(path);
  ctx.stdout.write(`\n${shown(ctx, path)} (read-only): ${wp.control?.id ?? 'a test'}${wp.engagement ? `, ${wp.engagement.entity}` : ''}\n`);
  ctx.stdout.write(`${statusLines(wp).join('\n')}\n\nNothing was saved (read-only).\n`);
  return 0;
}

/** `tolrate review FILE`: the reviewer's sitting. */
export async function reviewInterview(ctx: CommandContext, asker: Asker, o: StageOptions): Promise<number> {
  return guarded(async (hold) => {
    const path = workpaperPath(ctx.cwd, o.file ?? '');
    const s = await sessionFor(ctx, asker, path, { ...o, mustExist: true, hold });
    if (s && 'readOnly' in s) {
      return showReadOnly(ctx, path);
    }
    if (!s) {
      ctx.stdout.write('Nothing was changed.\n');
      return 1;
    }
    s.print(`${shown(ctx, path)}: ${s.wp.control?.id ?? 'a test'}${s.wp.engagement ? `, ${s.wp.engagement.entity}` : ''}`);
    s.print(...statusLines(s.wp));
    await reviewSitting(s);
    return 0;
  });
}
