/**
 * One sitting of the interview over one workpaper file: the workpaper as it stands, where it
 * lives, who answers, where output goes, and the save after each answered step.
 */
import { basename, dirname } from 'node:path';
import type { Output } from '../commands/types.js';
import { loadWorkpaper, newWorkpaper, saveWorkpaper } from '../workpaper/file.js';
import { verifyLog } from '../workpaper/log.js';
import type { Amendment, Role, Workpaper } from '../workpaper/schema.js';

/** The workpaper as its change log says it is (what was signed), to name an outside edit's changes. */
function replayed(wp: Workpaper): Workpaper {
  return { ...(replay(wp.log) as unknown as Workpaper), log: wp.log };
}
import type { Asker } from './asker.js';
import { requiredText } from './parse.js';
import { afterOutsideEdit, recordChanges, signedRoles } from '../control-test/index.js';
import { replay } from '../workpaper/log.js';
import { RememberingAsker } from './remembering.js';
import type { EngagementFolder } from '../engagement/folder.js';
import { carriedDefaults } from './carry-forward.js';

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
  /** How tolrate was started, for the commands the interview prints (default `tolrate`). */
  invocation?: string;
  /** The engagement folder file of the workpaper's folder, when there is one. */
  folder?: EngagementFolder;
}

export class Session {
  wp: Workpaper;
  readonly path: string;
  readonly dir: string;
  readonly asker: Asker;
  readonly out: Output;
  readonly now: () => Date;
  readonly policyPath: string | undefined;
  readonly color: boolean;
  readonly cwd: string;
  readonly invocation: string;
  /** The engagement folder file of the workpaper's folder: its answers are the defaults. */
  readonly folder: EngagementFolder | undefined;
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

  constructor(o: SessionOptions) {
    this.wp = o.wp;
    this.path = o.path;
    this.dir = dirname(o.path);
    this.remembering = new RememberingAsker(o.asker, { ...carriedDefaults(o.wp), ...(o.wp.unfinishedStep?.answers ?? {}) });
    this.asker = this.remembering;
    this.out = o.out;
    this.now = o.now ?? (() => new Date());
    this.policyPath = o.policyPath;
    this.color = o.color ?? false;
    this.cwd = o.cwd ?? this.dir;
    this.invocation = o.invocation ?? 'tolrate';
    this.folder = o.folder;
  }

  /** Offer answers as the defaults of questions still to be asked (a control picked from the firm library). */
  offerDefaults(answers: Record<string, string | boolean>): void {
    this.remembering.offer(answers);
  }

  /** True once the workpaper file holds something (the first answered step is saved). */
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
   * when something was kept.
   */
  keepUnfinished(step: string): boolean {
    const answers = this.remembering.given();
    if (!this.saved || Object.keys(answers).length === 0) return false;
    try {
      this.wp = saveWorkpaper(this.path, { ...this.wp, unfinishedStep: { step, answers } }, { by: this.by, step: `${step}.stopped`, at: this.now() });
      return true;
    } catch {
      return false;
    }
  }

  /** Write lines to the output. */
  print(...lines: string[]): void {
    for (const l of lines) this.out.write(`${l}\n`);
  }

  /** A heading for a stage of the interview. */
  heading(title: string): void {
    this.print('', this.color ? `\x1b[1m${title}\x1b[22m` : title, this.color ? '' : '-'.repeat(Math.min(72, title.length)));
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

  /** Save after a step. A save that changes nothing writes nothing (and keeps pending reasons). */
  save(step: string, by = this.by): void {
    const reason = this.pendingReasons.length > 0 ? this.pendingReasons.join(' ') : undefined;
    const before = this.wp.log.length;
    // What was asked until now is saved: answers of an earlier stopped step are no longer needed.
    const { unfinishedStep: _u, ...current } = this.wp;
    let next = current as Workpaper;
    if (this.amendment) {
      // The amendment of this sitting, with every change to the record since the sign-off.
      const a = this.amendment;
      const amendment: Amendment = { at: this.now().toISOString(), by: this.by, role: this.role, why: a.why, cleared: a.cleared, changes: recordChanges(a.base, next) };
      const list = [...(next.amendments ?? [])];
      if (a.index === undefined) a.index = list.length;
      list[a.index] = amendment;
      next = { ...next, amendments: list };
    }
    this.wp = saveWorkpaper(this.path, next, { by, step, at: this.now(), ...(reason ? { reason } : {}), ...(by !== 'tolrate' ? { role: this.role } : {}) });
    this.remembering.forget();
    if (this.wp.log.length > before) this.pendingReasons = [];
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
export async function openSession(o: Omit<SessionOptions, 'wp'> & { hold?: (s: Session) => Session }): Promise<Session | undefined> {
  const wp = loadWorkpaper(o.path);
  const s = new Session({ ...o, wp });
  o.hold?.(s);
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
  s.save('accept-outside-changes');
  return s;
}

/** A new workpaper at `path` (not yet written: the first answered step writes it). */
export function newSession(o: Omit<SessionOptions, 'wp'>): Session {
  return new Session({ ...o, wp: newWorkpaper(o.toolVersion ?? 'unknown', (o.now ?? (() => new Date()))()) });
}
