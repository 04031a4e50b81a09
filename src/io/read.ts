/**
 * Only regular files are read. A named pipe (FIFO), a device or a socket is refused at once,
 * before it is opened (opening a FIFO for reading blocks until someone writes to it). Every
 * input file (populations, keys files, templates, styles.docx, policy files, workpapers, filled
 * fieldwork sheets) is checked with `assertRegularFile` or read with `readRegularFile`.
 */
import { constants, type Stats } from 'node:fs';
import { FileSystemError } from '../errors.js';
import { fsOps } from './fs.js';
import { readError } from './messages.js';

function kindOf(st: Stats): string | undefined {
  if (st.isFile()) return undefined;
  if (st.isDirectory()) return 'a folder';
  if (st.isFIFO()) return 'a named pipe';
  if (st.isSocket()) return 'a socket';
  if (st.isCharacterDevice() || st.isBlockDevice()) return 'a device';
  return 'not a regular file';
}

function refuse(path: string, what: string, kind: string): FileSystemError {
  return new FileSystemError(path, kind === 'a folder' ? 'EISDIR' : 'ENOTREG', `${what} ${path} is ${kind}, not a regular file. Give the path of a file saved on disk.`);
}

/** Throw a FileSystemError unless `path` (after links) is a regular file. Returns its stats. */
export function assertRegularFile(path: string, what = 'The file'): Stats {
  let st: Stats;
  try {
    st = fsOps.statSync(path);
  } catch (e) {
    throw readError(e, path, what);
  }
  const kind = kindOf(st);
  if (kind) throw refuse(path, what, kind);
  return st;
}

/**
 * Read a whole regular file. It is checked before it is opened, and opened without blocking
 * (so that a file swapped for a pipe in between cannot hang it), then checked again.
 */
export function readRegularFile(path: string, what = 'The file'): Buffer {
  assertRegularFile(path, what);
  let fd: number;
  try {
    fd = fsOps.openSync(path, constants.O_RDONLY | constants.O_NONBLOCK);
  } catch (e) {
    throw readError(e, path, what);
  }
  try {
    const kind = kindOf(fsOps.fstatSync(fd));
    if (kind) throw refuse(path, what, kind);
    return fsOps.readFileSync(fd);
  } catch (e) {
    throw readError(e, path, what);
  } finally {
    fsOps.closeSync(fd);
  }
}

/** A regular file's text (UTF-8, a leading byte order mark removed). */
export function readRegularText(path: string, what = 'The file'): string {
  return readRegularFile(path, what).toString('utf8').replace(/^\uFEFF/, '');
}
