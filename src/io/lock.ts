/**
 * One writer at a time: a session that opens a workpaper to change it takes a lock, a file
 * `NAME.tolrate.json.lock` beside it, created exclusively (O_EXCL) and naming the host, the
 * process, the user and the start time. It is removed when the session ends, on a failure exit,
 * on Ctrl-C and on SIGTERM/SIGHUP (a `kill -9` or a power loss leaves it: the next session on the
 * same host sees that its process is gone and takes it over, with a note).
 */
import { readFileSync } from 'node:fs';
import { hostname, userInfo } from 'node:os';
import { basename } from 'node:path';
import { WorkpaperLockedError } from '../errors.js';
import { fsOps } from './fs.js';
import { writeError } from './messages.js';
import { resolveTarget } from './write.js';

export interface LockInfo {
  tool: 'tolrate';
  host: string;
  pid: number;
  user: string;
  startedAt: string;
  file: string;
}

export interface HeldLock {
  /** The lock file. */
  path: string;
  info: LockInfo;
  /** A note for the user when a stale lock was taken over. */
  tookOver?: string;
  release(): void;
}

export function lockPathFor(workpaper: string): string {
  return `${resolveTarget(workpaper)}.lock`;
}

function whoAmI(): string {
  try {
    return userInfo().username;
  } catch {
    return process.env.USER ?? process.env.LOGNAME ?? 'unknown';
  }
}

/**
 * Whether the process that wrote a lock still runs. After a crash its number may have been given
 * to another program: where the system says what a process runs (Linux's /proc/PID/cmdline), one
 * that is not Node (tolrate runs under node) is not the lock's holder.
 */
function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== 'EPERM') return false;
  }
  try {
    const cmd = readFileSync(`/proc/${pid}/cmdline`, 'utf8');
    return cmd === '' || /node/i.test(cmd);
  } catch {
    return true;
  }
}

function readLock(path: string): LockInfo | undefined {
  let fd: number;
  try {
    fd = fsOps.openSync(path, 'r');
  } catch {
    return undefined;
  }
  try {
    const data = JSON.parse(fsOps.readFileSync(fd).toString('utf8')) as Partial<LockInfo>;
    if (typeof data.pid === 'number' && typeof data.host === 'string') return data as LockInfo;
    return undefined;
  } catch {
    return undefined;
  } finally {
    fsOps.closeSync(fd);
  }
}

/** How a lock's holder is named in messages. */
export function holder(info: LockInfo): string {
  return `${info.user || 'someone'} on ${info.host} (process ${info.pid}, since ${info.startedAt})`;
}

const held = new Set<HeldLock>();
let handlersOn = false;

function releaseAll(): void {
  for (const l of [...held]) l.release();
}

function onSignal(signal: NodeJS.Signals): void {
  releaseAll();
  removeHandlers();
  // Then end as the signal would have ended the process.
  process.kill(process.pid, signal);
}

const SIGNALS: NodeJS.Signals[] = ['SIGINT', 'SIGTERM', 'SIGHUP'];

function addHandlers(): void {
  if (handlersOn) return;
  handlersOn = true;
  process.on('exit', releaseAll);
  for (const s of SIGNALS) process.on(s, onSignal);
}

function removeHandlers(): void {
  if (!handlersOn) return;
  handlersOn = false;
  process.off('exit', releaseAll);
  for (const s of SIGNALS) process.off(s, onSignal);
}

/** The locks this process holds now (to release, later, only those taken since). */
export function heldLocks(): ReadonlySet<HeldLock> {
  return new Set(held);
}

/**
 * Release every lock taken since `before` (all of them when not given). The CLI calls it when a
 * command ends, however it ends.
 */
export function releaseAllLocks(before: ReadonlySet<HeldLock> = new Set()): void {
  for (const l of [...held]) if (!before.has(l)) l.release();
}

/**
 * Take the lock of `workpaper`. A lock of a process that no longer runs on this host is taken
 * over (`tookOver` says so). A live one throws WorkpaperLockedError naming who holds it.
 */
export function acquireLock(workpaper: string, now: Date = new Date()): HeldLock {
  const path = lockPathFor(workpaper);
  const info: LockInfo = { tool: 'tolrate', host: hostname(), pid: process.pid, user: whoAmI(), startedAt: now.toISOString(), file: basename(workpaper) };
  let tookOver: string | undefined;
  for (let attempt = 0; ; attempt++) {
    let fd: number;
    try {
      fd = fsOps.openSync(path, 'wx', 0o644);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'EEXIST' || attempt > 2) throw writeError(e, path, 'the lock file');
      const other = readLock(path);
      if (!other) {
        throw new WorkpaperLockedError(workpaper, `${workpaper} is locked: the lock file ${path} exists but cannot be read (another session may be starting).`, [
          `If no one else has the workpaper open, delete ${path} and try again.`,
        ]);
      }
      if (other.host === info.host && !alive(other.pid)) {
        try {
          fsOps.unlinkSync(path);
        } catch (u) {
          if ((u as NodeJS.ErrnoException).code !== 'ENOENT') throw writeError(u, path, 'the stale lock file');
        }
        tookOver = `A lock left by ${holder(other)}, which is no longer running, was taken over.`;
        continue;
      }
      throw new WorkpaperLockedError(workpaper, `${basename(workpaper)} is open in another session: ${holder(other)}.`, [
        'Only one session at a time may change a workpaper. Wait until it is closed, or ask its holder to close it.',
        other.host === info.host
          ? `If that process is not tolrate, delete ${path}.`
          : `It was opened on another computer (${other.host}); if that session is certainly closed, delete ${path}.`,
      ]);
    }
    try {
      const buf = Buffer.from(`${JSON.stringify(info, null, 2)}\n`);
      let off = 0;
      while (off < buf.length) {
        const n = fsOps.writeSync(fd, buf, off, buf.length - off, off);
        if (!(n > 0)) throw Object.assign(new Error('ENOSPC'), { code: 'ENOSPC' });
        off += n;
      }
    } catch (e) {
      fsOps.closeSync(fd);
      try {
        fsOps.unlinkSync(path);
      } catch {
        // nothing to remove
      }
      throw writeError(e, path, 'the lock file');
    }
    fsOps.closeSync(fd);
    break;
  }
  const lock: HeldLock = {
    path,
    info,
    ...(tookOver ? { tookOver } : {}),
    release() {
      if (!held.has(lock)) return;
      held.delete(lock);
      if (held.size === 0) removeHandlers();
      const now = readLock(path);
      // Remove it only while it is still ours.
      if (now && now.pid === info.pid && now.host === info.host && now.startedAt === info.startedAt) {
        try {
          fsOps.unlinkSync(path);
        } catch {
          // already gone
        }
      }
    },
  };
  held.add(lock);
  addHandlers();
  return lock;
}
