/**
 * One sitting of the interview over one workpaper file: the workpaper as it stands, where it
 * lives, who answers, where output goes, and the save after each answered step.
 */
import { basename, dirname } from 'node:path';
import type { Output } from '../commands/types.js';
import { loadWorkpaper, newWorkpaper, saveWorkpaper } from '../workpaper/file.js';
import { verifyLog } from '../workpaper/log.js';
import type { Workpaper } from '../workpaper/schema.js';
import type { Asker } from './asker.js';
import { requiredText } from './parse.js';
import { setOpenWorkpaper } from '../cli/stopped.js';

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
  private pendingReasons: string[] = [];
  private editReasonAsked = false;

  constructor(o: SessionOptions) {
    this.wp = o.wp;
    this.path = o.path;
    this.dir = dirname(o.path);
    this.asker = o.asker;
    this.out = o.out;
    this.now = o.now ?? (() => new Date());
    this.policyPath = o.policyPath;
    this.color = o.color ?? false;
    this.cwd = o.cwd ?? this.dir;
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

  /** Who is answering: the preparer once the engagement is known. */
  get by(): string {
    return this.wp.engagement?.preparer ?? 'tolrate';
  }

  /** Save after a step. A save that changes nothing writes nothing (and keeps pending reasons). */
  save(step: string, by = this.by): void {
    const reason = this.pendingReasons.length > 0 ? this.pendingReasons.join(' ') : undefined;
    const before = this.wp.log.length;
    this.wp = saveWorkpaper(this.path, this.wp, { by, step, at: this.now(), ...(reason ? { reason } : {}) });
    setOpenWorkpaper(this.path);
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
    const { signoffs: _s, ...rest } = this.wp;
    this.wp = rest as Workpaper;
  }
}

/**
 * Open a workpaper to continue it: load and validate it, check its change log, and when the
 * file was changed outside tolrate show what changed and ask why (the reason is saved at once,
 * with those changes, in a log entry of its own). Returns undefined when the user does not go on.
 */
export async function openSession(o: Omit<SessionOptions, 'wp'>): Promise<Session | undefined> {
  const wp = loadWorkpaper(o.path);
  const s = new Session({ ...o, wp });
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
  s.save('accept-outside-changes');
  return s;
}

/** A new workpaper at `path` (not yet written: the first answered step writes it). */
export function newSession(o: Omit<SessionOptions, 'wp'>): Session {
  return new Session({ ...o, wp: newWorkpaper(o.toolVersion ?? 'unknown', (o.now ?? (() => new Date()))()) });
}
