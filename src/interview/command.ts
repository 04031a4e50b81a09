/**
 * What the interview commands (start, plan, record, conclude) share: the terminal check, the
 * answerer for a terminal, resolving a workpaper path, opening or creating the session.
 */
import { existsSync } from 'node:fs';
import { extname, resolve } from 'node:path';
import type { CommandContext } from '../commands/types.js';
import { FileSystemError, UsageError, WorkpaperLockedError } from '../errors.js';
import { acquireLock, type HeldLock } from '../io/lock.js';
import { packageVersion } from '../util/version.js';
import { WORKPAPER_SUFFIX } from '../workpaper/file.js';
import type { Asker } from './asker.js';
import { newSession, offerTempCleanup, openSession, type Session } from './session.js';
import { TerminalAsker } from './terminal.js';

/** Options an interview run takes besides the answerer (tests fix the clock). */
export interface InterviewOptions {
  now?: () => Date;
}

/** Without a terminal an interview cannot ask: say how to run it instead (exit 2). */
export function needsTerminal(ctx: CommandContext, command: string): number {
  const t = ctx.invocation ?? 'tolrate';
  const how = command === 'start' ? t : `${t} ${command} ${command === 'plan' ? '[FILE]' : 'FILE'}`;
  ctx.stderr.write(
    `${command === 'start' ? 'tolrate' : `tolrate ${command}`} is an interview and needs a terminal (stdin and stdout); this is not one.\n` +
      `  Run it in a terminal:  ${how}\n` +
      `  For a complete scripted run that asks nothing:  ${t} demo\n` +
      `  The calculators work without a terminal:  ${t} size, limit, table, select (see ${t} --help)\n`,
  );
  return 2;
}

export function terminalAsker(ctx: CommandContext): Asker {
  return new TerminalAsker({ out: ctx.stdout, color: ctx.color });
}

/** `x` -> `x.tolrate.json`; a name with an extension is kept. Resolved against the cwd. */
export function workpaperPath(cwd: string, file: string): string {
  const f = file.trim();
  if (f === '') throw new UsageError('The workpaper file name is empty.');
  return resolve(cwd, extname(f) === '' ? `${f}${WORKPAPER_SUFFIX}` : f);
}

/** The workpaper is open in another session and the user chose to look at it read-only. */
export interface ReadOnlyView {
  readOnly: true;
  path: string;
}

/**
 * Open an existing workpaper (with the outside-change check) or start a new one at `path`. The
 * session takes the file's lock first (src/io/lock.ts); when another session holds it, the user
 * may open the file read-only instead (a ReadOnlyView: nothing is saved), else it is refused.
 */
export async function sessionFor(
  ctx: CommandContext,
  asker: Asker,
  path: string,
  o: InterviewOptions & { policyPath?: string; mustExist?: boolean; hold?: (s: Session) => Session },
): Promise<Session | ReadOnlyView | undefined> {
  if (!existsSync(path) && o.mustExist) throw new UsageError(`No workpaper file at ${path}.`, [`Start a test with: ${ctx.invocation ?? 'tolrate'} plan FILE`]);
  let lock: HeldLock;
  try {
    lock = acquireLock(path, (o.now ?? (() => new Date()))());
  } catch (e) {
    // Held by another session, or the folder takes no lock file (read-only): the file can still be looked at.
    if (!(e instanceof WorkpaperLockedError || e instanceof FileSystemError) || !existsSync(path)) throw e;
    ctx.stdout.write(`${e.message}\n${e.details.map((d) => `  ${d}\n`).join('')}`);
    const look = await asker.confirm({
      id: 'open.locked.readOnly',
      message: 'Open it read-only (see where the test stands; nothing is saved)?',
      default: true,
    });
    if (!look) throw e;
    return { readOnly: true, path };
  }
  if (lock.tookOver) ctx.stdout.write(`Note: ${lock.tookOver}\n`);
  const base = {
    asker,
    out: ctx.stdout,
    path,
    color: ctx.color,
    cwd: ctx.cwd,
    toolVersion: packageVersion(),
    invocation: ctx.invocation ?? 'tolrate',
    lock,
    ...(o.now ? { now: o.now } : {}),
    ...(o.policyPath ? { policyPath: resolve(ctx.cwd, o.policyPath) } : {}),
  };
  const hold = o.hold ?? ((s: Session) => s);
  try {
    if (existsSync(path)) {
      const s = await openSession({ ...base, hold });
      if (!s) lock.release();
      return s;
    }
    const s = hold(newSession(base));
    await offerTempCleanup(s);
    return s;
  } catch (e) {
    lock.release();
    throw e;
  }
}
