/**
 * The one file writer: every file tolrate writes (the workpaper, the memo, the fieldwork sheet)
 * goes through `writeFileSafely`.
 *
 *  1. A symbolic link is followed to the file it names; that file is written, the link stays.
 *  2. The bytes go to a temporary file beside the target (`.NAME.PID.XXXXXXXX.tmp`), created
 *     exclusively, with the mode of the file it replaces (a 0600 file stays 0600).
 *  3. The write is repeated until every byte is written (a write may write fewer bytes than asked,
 *     with no error, on a nearly full disk); the temporary file's size is checked against the
 *     expected size, and it is flushed to the disk (fsync).
 *  4. It is renamed over the target, and the folder is flushed, so the rename survives a power
 *     loss. Until the rename the old file is untouched. (A folder that cannot be flushed does not
 *     undo the save: the new file is complete; `folderFlushed` says so.)
 *  5. On any failure the temporary file is removed and the error becomes a FileSystemError (exit 2)
 *     saying what to do ("disk full", "permission denied", ...).
 *
 * fsync is skipped only under TOLRATE_TEST_NO_FSYNC=1 (the test suite's setting, for speed).
 */
import { randomBytes } from 'node:crypto';
import { basename, dirname, isAbsolute, join, resolve } from 'node:path';
import { errnoError, fsOps, fsyncWanted } from './fs.js';
import { writeError } from './messages.js';

export interface WriteOptions {
  /** How the file is named in messages ("the workpaper", "the memo"...). */
  what?: string;
  /** Mode for a new file (default 0o666, less the umask). An existing file keeps its own. */
  mode?: number;
}

export interface Written {
  /** The file actually written (a symbolic link's target). */
  path: string;
  bytes: number;
  /** False when the folder could not be flushed after the rename (the file is complete and in place). */
  folderFlushed: boolean;
}

/** The temporary file name pattern of the writer, for `staleTempFiles`. */
export function tempName(target: string): string {
  return join(dirname(target), `.${basename(target)}.${process.pid}.${randomBytes(4).toString('hex')}.tmp`);
}

function tempPattern(name: string): RegExp {
  const esc = name.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  return new RegExp(`^\\.${esc}\\.(\\d+)\\.[0-9a-f]{8}\\.tmp$`);
}

/** Follow symbolic links from `path` to the file they name (which need not exist yet). */
export function resolveTarget(path: string): string {
  let p = resolve(path);
  for (let hops = 0; hops < 40; hops++) {
    let st;
    try {
      st = fsOps.lstatSync(p);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'ENOENT') return p;
      throw e;
    }
    if (!st.isSymbolicLink()) return p;
    const to = fsOps.readlinkSync(p);
    p = isAbsolute(to) ? to : resolve(dirname(p), to);
  }
  throw errnoError('ELOOP', 'readlink', path);
}

/**
 * Flush the folder so that the rename is on the disk. False when it could not be flushed: the
 * new file is complete and in place, but a power loss in the next moments could bring back the
 * old one (some file systems cannot flush a folder at all).
 */
function flushFolder(dir: string): boolean {
  if (!fsyncWanted()) return true;
  let fd: number | undefined;
  try {
    fd = fsOps.openSync(dir, 'r');
    fsOps.fsyncSync(fd);
    return true;
  } catch {
    return false;
  } finally {
    if (fd !== undefined) {
      try {
        fsOps.closeSync(fd);
      } catch {
        // nothing more to do
      }
    }
  }
}

/** Write `data` to `path` as described above. Throws FileSystemError; nothing is changed then. */
export function writeFileSafely(path: string, data: string | Uint8Array, o: WriteOptions = {}): Written {
  const what = o.what ?? 'the file';
  const buf = typeof data === 'string' ? Buffer.from(data, 'utf8') : data;
  let target = resolve(path);
  let tmp: string | undefined;
  let fd: number | undefined;
  try {
    target = resolveTarget(path);
    let mode: number | undefined;
    try {
      const st = fsOps.statSync(target);
      if (st.isDirectory()) throw errnoError('EISDIR', 'open', target);
      mode = st.mode & 0o7777;
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'ENOENT') throw e;
    }
    tmp = tempName(target);
    fd = fsOps.openSync(tmp, 'wx', mode ?? o.mode ?? 0o666);
    if (mode !== undefined) fsOps.fchmodSync(fd, mode);
    let off = 0;
    while (off < buf.length) {
      const n = fsOps.writeSync(fd, buf, off, buf.length - off, off);
      // A write that makes no progress and raises nothing: the disk has no room left.
      if (!(n > 0)) throw errnoError('ENOSPC', 'write', tmp);
      off += n;
    }
    if (fsyncWanted()) fsOps.fsyncSync(fd);
    const size = fsOps.fstatSync(fd).size;
    if (size !== buf.length) throw errnoError('ENOSPC', 'write', tmp);
    const closing = fd;
    fd = undefined;
    fsOps.closeSync(closing);
    fsOps.renameSync(tmp, target);
    tmp = undefined;
    return { path: target, bytes: buf.length, folderFlushed: flushFolder(dirname(target)) };
  } catch (e) {
    if (fd !== undefined) {
      try {
        fsOps.closeSync(fd);
      } catch {
        // closing a failed file: nothing more to do
      }
    }
    if (tmp !== undefined) {
      try {
        fsOps.unlinkSync(tmp);
      } catch {
        // the temporary file was never created, or is gone already
      }
    }
    throw writeError(e, target, what);
  }
}

/** A temporary file left beside a file by a save that did not finish. */
export interface StaleTemp {
  path: string;
  pid: number;
  bytes: number;
}

function alive(pid: number): boolean {
  if (pid === process.pid) return true;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === 'EPERM';
  }
}

/**
 * The writer's temporary files beside `path` whose process is no longer running: what a save
 * killed before its rename leaves. (Temp files of a running process are its save in progress.)
 */
export function staleTempFiles(path: string): StaleTemp[] {
  const target = resolveTarget(path);
  const re = tempPattern(basename(target));
  let names: string[];
  try {
    names = fsOps.readdirSync(dirname(target));
  } catch {
    return [];
  }
  const out: StaleTemp[] = [];
  for (const n of names) {
    const m = re.exec(n);
    if (!m) continue;
    const pid = Number(m[1]);
    if (alive(pid)) continue;
    const p = join(dirname(target), n);
    try {
      const st = fsOps.lstatSync(p);
      if (st.isFile()) out.push({ path: p, pid, bytes: st.size });
    } catch {
      // gone meanwhile
    }
  }
  return out.sort((a, b) => a.path.localeCompare(b.path));
}

/** Remove stale temporary files; returns those that could not be removed. */
export function removeTempFiles(files: readonly StaleTemp[]): StaleTemp[] {
  const left: StaleTemp[] = [];
  for (const f of files) {
    try {
      fsOps.unlinkSync(f.path);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code !== 'ENOENT') left.push(f);
    }
  }
  return left;
}
