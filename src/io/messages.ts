/**
 * System errors (ENOSPC, EACCES, ...) turned into messages that say what happened and what to
 * do, as FileSystemError (exit 2). Nothing here echoes a file's contents.
 */
import { dirname } from 'node:path';
import { FileSystemError, TolrateInputError } from '../errors.js';

/** What a user can do about each system error, for a write. */
function writeAdvice(code: string, path: string): string {
  const dir = dirname(path);
  switch (code) {
    case 'ENOSPC':
      return `disk full (no space left on the disk that holds ${dir}). Free some space, or write to another disk.`;
    case 'EDQUOT':
      return `disk quota exceeded: your share of the disk that holds ${dir} is used up (disk full for you). Free some of your files, or write to another disk.`;
    case 'EACCES':
    case 'EPERM':
      return `permission denied: you may not write ${path} or create files in ${dir}. Ask for write access, or choose a folder you can write in.`;
    case 'EROFS':
      return `the disk that holds ${dir} is read-only. Choose a folder on a disk you can write to.`;
    case 'EISDIR':
      return `${path} is a folder. Give a file name.`;
    case 'ENOTDIR':
      return `a part of the folder path ${dir} is a file, not a folder. Check the path.`;
    case 'ENOENT':
      return `the folder ${dir} does not exist. Create it first, or choose another folder.`;
    case 'EMFILE':
    case 'ENFILE':
      return 'too many files are open at once. Close other programs and try again.';
    case 'EIO':
      return 'the disk reported an input/output error. Check the disk, or write to another one.';
    case 'ELOOP':
      return `${path} is a chain of symbolic links that does not end (a loop). Fix the link.`;
    case 'ENAMETOOLONG':
      return `the name ${path} is too long for the file system. Choose a shorter one.`;
    case 'EXDEV':
      return 'the file and its temporary copy ended up on different disks. Write to a regular folder.';
    case 'EBUSY':
      return `${path} is busy (held by another program). Close it there and try again.`;
    default:
      return `the system refused it (${code}). Check the disk and the folder, or write elsewhere.`;
  }
}

/** The FileSystemError for a failed write of `path` (`what`: "the workpaper", "the memo", ...). */
export function writeError(e: unknown, path: string, what: string): TolrateInputError {
  if (e instanceof TolrateInputError) return e;
  const code = (e as { code?: unknown }).code;
  if (typeof code !== 'string') throw e;
  return new FileSystemError(path, code, `Cannot write ${what} ${path}: ${writeAdvice(code, path)}`, [
    `Nothing was changed in ${path}${code === 'ENOSPC' || code === 'EDQUOT' ? '; no partial file was left' : ''}.`,
  ]);
}

/** The FileSystemError for a failed read of `path`. */
export function readError(e: unknown, path: string, what: string): TolrateInputError {
  if (e instanceof TolrateInputError) return e;
  const code = (e as { code?: unknown }).code;
  if (typeof code !== 'string') throw e;
  const why: Record<string, string> = {
    ENOENT: `${what} not found: ${path}`,
    EACCES: `${what} ${path} cannot be read (permission denied). Ask for read access.`,
    EPERM: `${what} ${path} cannot be read (permission denied). Ask for read access.`,
    EISDIR: `${what} ${path} is a folder, not a file.`,
    ENOTDIR: `${what} ${path}: a part of the folder path is a file, not a folder.`,
    EMFILE: `${what} ${path} cannot be opened: too many files are open at once. Close other programs and try again.`,
    ENFILE: `${what} ${path} cannot be opened: too many files are open at once. Close other programs and try again.`,
    ELOOP: `${what} ${path} is a loop of symbolic links.`,
    EIO: `${what} ${path} cannot be read: the disk reported an input/output error.`,
  };
  return new FileSystemError(path, code, why[code] ?? `${what} ${path} cannot be read (${code}).`);
}

/**
 * A parser's message (CSV, XML) without the pieces of the file it quotes: quoted runs become
 * "…", and it is kept short. The line and column the parser names stay.
 */
export function withoutQuotes(message: string): string {
  const m = message.replace(/"[^"\n]{0,200}"|'[^'\n]{0,200}'/g, '"…"').replace(/\s+/g, ' ').trim();
  return m.length > 160 ? `${m.slice(0, 157)}...` : m;
}

/**
 * Where a JSON text stops being valid, without quoting any of it (Node's own message quotes a
 * snippet of the text, which may be anything: a file that is not what was asked for).
 */
export function jsonErrorWhere(e: unknown, text: string): string {
  const msg = e instanceof Error ? e.message : '';
  if (/Unexpected end of JSON input/i.test(msg)) return 'it ends before the JSON is complete (cut short?)';
  const m = /at position (\d+)/.exec(msg);
  let pos = m ? Number(m[1]) : -1;
  if (pos < 0) {
    // "Unexpected token 'x', "..." is not valid JSON": no position given; the first character
    // that cannot start JSON is the usual cause.
    const first = text.search(/\S/);
    if (first >= 0 && !/[{["\-0-9tfn]/.test(text[first]!)) pos = first;
  }
  if (pos < 0) return 'it is not valid JSON';
  const before = text.slice(0, pos);
  const line = before.split('\n').length;
  const col = pos - before.lastIndexOf('\n');
  return `it is not valid JSON at line ${line}, column ${col}`;
}
