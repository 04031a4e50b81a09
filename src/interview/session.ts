/**
 * One sitting of the interview over one workpaper file: the workpaper as it stands, where it
 * lives, who answers, where output goes, and the save after each answered step.
 */
import { createHash } from 'node:crypto';
import { basename, dirname, extname, relative, resolve } from 'node:path';
import type { Output } from '../commands/types.js';
import { FileSystemError, TolrateInputError, WorkpaperChangedError } from '../errors.js';
import { fsOps } from '../io/fs.js';
import { visible } from '../io/text.js';
import { acquireLock, type HeldLock } from '../io/lock.js';
import { readRegularText } from '../io/read.js';
import { removeTempFiles, resolveTarget, staleTempFiles } from '../io/write.js';
import { loadWorkpaperText, newWorkpaper, saveWorkpaper, WORKPAPER_SUFFIX } from '../workpaper/file.js';
import { verifyLog } from '../workpaper/log.js';
import type { Amendment, Role, Workpaper } from '../workpaper/schema.js';

/** The workpaper as its change log says it is (what was signed), to name an outside edit's changes. */
function replayed(wp: Workpaper): Workpaper {
  return { ...(replay(wp.log) as unknown as Workpaper), log: wp.log };
}
import { isStop, type Asker } from './asker.js';
import { requiredText } from './parse.js';
import { afterOutsideEdit, recordChanges, signedRoles } from '../control-test/index.js';
import { replay } from '../workpaper/log.js';
import { RememberingAsker } from './remembering.js';

export interface SessionOptions {
  asker: Asker;
  out: Output;
  /** Absolute path of the workpaper file. */
  path: string;
  wp: Workpaper;
  /** The clock (tests fix it so that runs compare equal). */
  now?: () => Date;
  /** A firm's sampling policy file (`--policy FILE`), else the shipped one. */
  policyPath?: string;
  color?: boolean;
  toolVersion?: string;
  /** Where typed file names are resolved (the command's working folder); default: the workpaper's folder. */
  cwd?: string;
  /** The lock this session holds on its file (see src/io/lock.ts). */
  lock?: HeldLock;
  /**
   * The exact text of the file as it was loaded (undefined: a new file, none on disk yet). Each
   * save first checks that the file on disk is still this one.
   */
  loadedText?: string;
  /** When a save fails: ask what to do (retry, a copy elsewhere, stop), or throw at once (the demo). */
  onSaveFailure?: 'ask' | 'throw';
  /** How tolrate was started, for the commands the interview prints (default `tolrate`). */
  invocation?: string;
}

function sha256(data: string | Uint8Array): string {
  return createHash('sha256').update(data).digest('hex');
}

/** The save failed and the user chose to stop: says what is and is not on disk (exit 2). */
export class NotSavedError extends TolrateInputError {
  constructor(message: string, details: string[] = []) {
    super(message, 'NOT_SAVED', details);
    this.name = 'NotSavedError';
  }
}

export class Session {
  wp: Workpaper;
  path: string;
  readonly dir: string;
  readonly asker: Asker;
  readonly out: Output;
  readonly now: () => Date;
  readonly policyPath: string | undefined;
  readonly color: boolean;
  readonly cwd: string;
  readonly invocation: string;
  /** The step being asked, for keeping its answers if the user stops. */
  currentStep: string | undefined;
  /** The item a review note being answered is on: offered first when an item is to be changed. */
  focusItem: string | undefined;
  /** Who answers, in which role: the preparer (default) or, in a review, the reviewer. */
  actor: { name: string; role: Role } | undefined;
  /** A change after a sign-off: the record as signed, why, who, and the sign-offs it cleared. */
  private amendment: { base: Workpaper; why: string; cleared: Role[]; index: number | undefined } | undefined;
  /** The answerer, remembering the answers given since the last save (kept if the user stops). */
  private readonly remembering: RememberingAsker;
  private pendingReasons: string[] = [];
  private editReasonAsked = false;
  private lock: HeldLock | undefined;
  /** SHA-256 of the file as this session last read or wrote it; undefined: no file expected. */
  private diskHash: string | undefined;
  private readonly onSaveFailure: 'ask' | 'throw';

  constructor(o: SessionOptions) {
    this.wp = o.wp;
    this.path = o.path;
    this.dir = dirname(o.path);
    this.remembering = new RememberingAsker(o.asker, o.wp.unfinishedStep?.answers ?? {});
    this.asker = this.remembering;
    this.out = o.out;
    this.now = o.now ?? (() => new Date());
    this.policyPath = o.policyPath;
    this.color = o.color ?? false;
    this.cwd = o.cwd ?? this.dir;
    this.lock = o.lock;
    this.diskHash = o.loadedText !== undefined ? sha256(o.loadedText) : undefined;
    this.onSaveFailure = o.onSaveFailure ?? 'ask';
    this.invocation = o.invocation ?? 'tolrate';
  }

  /**
   * True once the workpaper file holds something (the first answered step is saved). A save
   * that fails leaves the log as it was, so this stays false until a save has reached the disk.
   */
  get saved(): boolean {
    return this.wp.log.length > 0;
  }

  /** `tolrate record FILE`, as the user started tolrate. */
  command(sub: string, file: string): string {
    return [this.invocation, sub, file ? (/\s/.test(file) ? `"${file}"` : file) : ''].filter((x) => x !== '').join(' ');
  }

  /**
   * The user stopped in the middle of a step: keep the answers given since the last save in the
   * workpaper, so that they are offered as defaults when the step is asked again. Returns true
   * when something was kept. Like every save it first checks the file on disk, and a failure
   * keeps nothing (the stop goes on).
   */
  keepUnfinished(step: string): boolean {
    const answers = this.remembering.given();
    if (!this.saved || Object.keys(answers).length === 0) return false;
    try {
      this.wp = saveWorkpaper(this.path, { ...this.wp, unfinishedStep: { step, answers } }, {
        by: this.by,
        step: `${step}.stopped`,
        at: this.now(),
        beforeWrite: () => this.checkDisk(this.path, this.diskHash),
        afterWrite: (text) => {
          this.diskHash = sha256(text);
        },
      });
      return true;
    } catch {
      return false;
    }
  }

  /** Give up the lock on the file (the end of the session). */
  release(): void {
    this.lock?.release();
    this.lock = undefined;
  }

  /** The file's name as shown to the user (relative to the working folder when inside it). */
  shown(path = this.path): string {
    const r = relative(this.cwd, path);
    return r && !r.startsWith('..') ? r : path;
  }

  /** Throw WorkpaperChangedError unless the file at `path` is the one this session loaded or wrote. */
  private checkDisk(path: string, expected: string | undefined): void {
    let now: string | undefined;
    try {
      // As the loader reads it (UTF-8, without a byte order mark), so the two compare.
      now = sha256(readRegularText(resolveTarget(path), 'The workpaper'));
    } catch (e) {
      if (!(e instanceof FileSystemError && e.errno === 'ENOENT')) throw e;
      now = undefined;
    }
    if (now === expected) return;
    const name = basename(path);
    throw new WorkpaperChangedError(
      path,
      expected === undefined
        ? `${name} was created by someone else (another tolrate session, or another program) while this session was open.`
        : now === undefined
          ? `${name} was removed or moved while this session was open.`
          : `${name} was changed on disk since this session opened it (by another tolrate session, or an edit outside tolrate).`,
      ['Nothing was written to it, so the other changes are kept.'],
    );
  }

  /** Write lines to the output. */
  print(...lines: string[]): void {
    // Lines may quote keys and values from files: control characters are shown, not sent.
    for (const l of lines) this.out.write(`${visible(l, { keepLines: true })}\n`);
  }

  /** A heading for a stage of the interview. */
  heading(title: string): void {
    const t = visible(title);
    this.out.write(`\n${this.color ? `\x1b[1m${t}\x1b[22m` : t}\n${this.color ? '' : '-'.repeat(Math.min(72, t.length))}\n`);
  }

  /** A reason to be recorded with the next save (outside edits accepted, a signed-off workpaper edited). */
  addReason(reason: string): void {
    this.pendingReasons.push(reason);
  }

  /** Who is answering: the preparer once the engagement is known (or the reviewer in a review). */
  get by(): string {
    return this.actor?.name ?? this.wp.engagement?.preparer ?? 'tolrate';
  }

  /** The role of who is answering. */
  get role(): Role {
    return this.actor?.role ?? 'preparer';
  }

  /**
   * The workpaper as the next save writes it: without the answers of an earlier stopped step
   * (what was asked until now is saved), and with the amendment of this sitting, holding every
   * change to the record since the sign-off.
   */
  private toSave(): Workpaper {
    const { unfinishedStep: _u, ...current } = this.wp;
    let next = current as Workpaper;
    if (this.amendment) {
      const a = this.amendment;
      const amendment: Amendment = { at: this.now().toISOString(), by: this.by, role: this.role, why: a.why, cleared: a.cleared, changes: recordChanges(a.base, next) };
      const list = [...(next.amendments ?? [])];
      if (a.index === undefined) a.index = list.length;
      list[a.index] = amendment;
      next = { ...next, amendments: list };
    }
    return next;
  }

  /**
   * Save after a step. A save that changes nothing writes nothing (and keeps pending reasons).
   * Before writing, the file on disk is checked to be the one this session loaded. When the save
   * fails (disk full, no permission, the file changed on disk...) the answer stays in memory and
   * the user is asked what to do: retry, save a copy elsewhere, or stop; nothing on disk is
   * touched.
   */
  async save(step: string, by = this.by): Promise<void> {
    for (;;) {
      const reason = this.pendingReasons.length > 0 ? this.pendingReasons.join(' ') : undefined;
      const before = this.wp.log.length;
      try {
        this.wp = saveWorkpaper(this.path, this.toSave(), {
          by,
          step,
          at: this.now(),
          ...(reason ? { reason } : {}),
          ...(by !== 'tolrate' ? { role: this.role } : {}),
          beforeWrite: () => this.checkDisk(this.path, this.diskHash),
          afterWrite: (text) => {
            this.diskHash = sha256(text);
          },
        });
      } catch (e) {
        if (!(e instanceof FileSystemError || e instanceof WorkpaperChangedError) || this.onSaveFailure === 'throw') throw e;
        if (await this.afterFailedSave(e, step, by)) return;
        continue;
      }
      this.remembering.forget();
      if (this.wp.log.length > before) this.pendingReasons = [];
      return;
    }
  }

  /** What Ctrl-C says while a save has failed: the last answer is not on disk. */
  private stopNote(why: string): string {
    const f = this.shown();
    const q = /\s/.test(f) ? `"${f}"` : f;
    return this.saved
      ? `\nStopped. The last answer was NOT saved (${why}). ${f} holds the steps saved before it.\nContinue with: ${this.invocation} ${q}\n`
      : `\nStopped. Nothing was saved (${why}): ${f} was never written.\n`;
  }

  /** Ask what to do after a failed save. True: saved (to a copy); false: try again. */
  private async afterFailedSave(e: FileSystemError | WorkpaperChangedError, step: string, by: string): Promise<boolean> {
    const why = e instanceof WorkpaperChangedError ? 'the file changed on disk' : e.errno === 'ENOSPC' || e.errno === 'EDQUOT' ? 'disk full' : e.errno;
    this.print('', `Not saved: ${e.message}`, ...e.details.map((d) => `  ${d}`), 'Your answer is kept in memory; nothing already on disk was changed.');
    try {
      const choices = [
        ...(e instanceof WorkpaperChangedError ? [] : [{ value: 'retry' as const, name: 'Try again (after freeing space or fixing the permission)' }]),
        { value: 'copy' as const, name: 'Save a copy elsewhere (a new file; this one is left as it is)' },
        { value: 'stop' as const, name: 'Stop without saving this answer' },
      ];
      const what = await this.asker.select({ id: 'save.failed', message: 'The answer could not be saved. What now?', choices, default: choices[0]!.value });
      if (what === 'retry') return false;
      if (what === 'copy') return await this.saveCopy(step, by);
    } catch (x) {
      if (isStop(x)) (x as { stopNote?: string }).stopNote = this.stopNote(why);
      throw x;
    }
    const f = this.shown();
    throw new NotSavedError(
      this.saved ? `Stopped: the last answer was not saved (${why}). ${f} holds the steps saved before it.` : `Stopped: nothing was saved (${why}); ${f} was never written.`,
      this.saved ? [`Continue with: ${this.invocation} ${f}`] : [],
    );
  }

  /**
   * Save the workpaper as it is in memory to a new file chosen by the user. In the same folder
   * the session goes on in the copy; elsewhere it stops after saving it (the paths inside a
   * workpaper are relative to its folder).
   */
  private async saveCopy(step: string, by: string): Promise<boolean> {
    const to = await this.asker.text({
      id: 'save.copy.path',
      message: 'Save a copy as (a new file name)',
      help: 'A file that does not exist yet, for example on another disk. The workpaper as it is now, with your last answer, is written to it.',
      parse: (t) => {
        const v = t.trim();
        if (v === '') throw new Error('Type a file name.');
        const abs = resolve(this.cwd, extname(v) === '' ? `${v}${WORKPAPER_SUFFIX}` : v);
        let exists = true;
        try {
          fsOps.lstatSync(abs);
        } catch {
          exists = false;
        }
        if (exists) throw new Error(`${abs} exists; give the name of a new file.`);
        return abs;
      },
    });
    let lock: HeldLock | undefined;
    try {
      lock = acquireLock(to, this.now());
      const reason = this.pendingReasons.length > 0 ? this.pendingReasons.join(' ') : undefined;
      let text = '';
      const wp = saveWorkpaper(to, this.toSave(), {
        by,
        step,
        at: this.now(),
        ...(reason ? { reason } : {}),
        ...(by !== 'tolrate' ? { role: this.role } : {}),
        beforeWrite: () => this.checkDisk(to, undefined),
        afterWrite: (t) => {
          text = t;
        },
      });
      this.pendingReasons = [];
      const old = this.shown();
      if (dirname(to) === this.dir) {
        this.release();
        this.lock = lock;
        this.wp = wp;
        this.path = to;
        this.diskHash = sha256(text);
        this.remembering.forget();
        this.print(`Saved to ${this.shown(to)}. This session goes on in it; ${old} is left as it was.`);
        return true;
      }
      lock.release();
      throw new NotSavedError(`A copy with every answer so far is saved as ${to}; ${old} is left as it was.`, [
        `Move the copy beside ${old} (the paths inside it are relative to the workpaper's folder), then continue with: ${this.invocation} ${basename(to)}`,
      ]);
    } catch (x) {
      if (x instanceof NotSavedError) throw x;
      lock?.release();
      if (!(x instanceof TolrateInputError)) throw x;
      this.print(`The copy could not be saved either: ${x.message}`);
      return false;
    }
  }

  /**
   * Call before changing a workpaper that may be signed off. If it is, ask why it is being
   * changed (recorded in the next save) and clear the sign-offs: the changed test must be
   * signed off again. Asked at most once per sitting.
   */
  async beforeEdit(what: string): Promise<void> {
    const s = this.wp.signoffs;
    if (!s?.preparer || this.editReasonAsked) return;
    this.editReasonAsked = true;
    this.print(
      `This workpaper was signed off by ${s.preparer.name} on ${s.preparer.date}${s.reviewer ? ` and reviewed by ${s.reviewer.name} on ${s.reviewer.date}` : ''}.`,
      `Changing ${what} clears the sign-offs; the test must be signed off again.`,
    );
    const reason = await this.asker.text({
      id: 'edit.reason',
      message: 'Why is the signed-off workpaper being changed?',
      help: 'Recorded in the change log with the change.',
      parse: requiredText('The reason'),
    });
    this.addReason(`Edited after sign-off: ${reason}`);
    this.amendment = { base: this.wp, why: reason, cleared: signedRoles(this.wp), index: undefined };
    const { signoffs: _s, ...rest } = this.wp;
    this.wp = rest as Workpaper;
  }
}

/**
 * Open a workpaper to continue it: load and validate it, check its change log, and when the
 * file was changed outside tolrate show what changed and ask why (the reason is saved at once,
 * with those changes, in a log entry of its own). Returns undefined when the user does not go on.
 */
export async function openSession(o: Omit<SessionOptions, 'wp' | 'loadedText'> & { hold?: (s: Session) => Session }): Promise<Session | undefined> {
  const { wp, text } = loadWorkpaperText(o.path);
  const s = new Session({ ...o, wp, loadedText: text });
  o.hold?.(s);
  await offerTempCleanup(s);
  const problems = verifyLog(wp);
  if (problems.length === 0) return s;
  s.print('', `${basename(o.path)} was changed outside tolrate since it was last saved:`);
  for (const p of problems.slice(0, 30)) s.print(`  ${p.where}: ${p.message}`);
  if (problems.length > 30) s.print(`  ... and ${problems.length - 30} more`);
  const go = await s.asker.confirm({
    id: 'open.outsideChanges.continue',
    message: 'Continue with the file as it is now?',
    help: 'If you go on, the changes are kept and your reason is recorded in the change log.',
    default: false,
  });
  if (!go) return undefined;
  const reason = await s.asker.text({
    id: 'open.outsideChanges.reason',
    message: 'Why was the file changed outside tolrate?',
    parse: requiredText('The reason'),
  });
  s.addReason(`Changes made outside tolrate accepted: ${reason}`);
  // The record as it now is decides: evaluate again, clear the sign-offs, keep a conclusion only
  // while the new figures bear it out.
  const cleared = signedRoles(s.wp);
  const after = afterOutsideEdit(s.wp, s.now());
  if (cleared.length > 0) {
    const amendments = [...(after.wp.amendments ?? []), { at: s.now().toISOString(), by: s.by, role: s.role, why: `Changes made outside tolrate accepted: ${reason}`, cleared, changes: recordChanges(replayed(wp), after.wp) }];
    s.wp = { ...after.wp, amendments };
  } else s.wp = after.wp;
  if (after.notes.length > 0) {
    s.print(...after.notes.map((n) => `  Because of the change: ${n}.`));
    s.addReason(`Because of the change: ${after.notes.join('; ')}.`);
  }
  await s.save('accept-outside-changes');
  return s;
}

/**
 * Temporary files of a save that was killed before it finished (the writer's own naming, of a
 * process that no longer runs): report them and offer to remove them. They are never the
 * workpaper: a save renames its temporary file over the workpaper only once it is complete.
 */
export async function offerTempCleanup(s: Session): Promise<void> {
  const stale = staleTempFiles(s.path);
  if (stale.length === 0) return;
  s.print('', `${stale.length} temporary file(s) of an earlier save that did not finish (the process was stopped) lie beside ${basename(s.path)}:`);
  for (const t of stale.slice(0, 10)) s.print(`  ${basename(t.path)} (${t.bytes} bytes)`);
  if (stale.length > 10) s.print(`  ... and ${stale.length - 10} more`);
  s.print(`  ${basename(s.path)} itself is complete: a save replaces it only once the new file is fully written.`);
  const remove = await s.asker.confirm({ id: 'open.staleTemp.remove', message: 'Remove these temporary files?', default: true });
  if (!remove) return;
  const left = removeTempFiles(stale);
  s.print(left.length === 0 ? 'Removed.' : `${left.length} could not be removed (no permission?): ${left.map((t) => basename(t.path)).join(', ')}`);
}

/** A new workpaper at `path` (not yet written: the first answered step writes it). */
export function newSession(o: Omit<SessionOptions, 'wp' | 'loadedText'>): Session {
  return new Session({ ...o, wp: newWorkpaper(o.toolVersion ?? 'unknown', (o.now ?? (() => new Date()))()) });
}
