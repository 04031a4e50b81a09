/**
 * The low-level file-system calls that the writer, the reader check and the lock make, gathered in
 * one object so that tests can make any of them fail (a short write, ENOSPC, EACCES, EROFS) at a
 * chosen call without root. Production code uses `fsOps` as it is; tests use `withFsOps`.
 */
import * as fs from 'node:fs';

export interface FsOps {
  openSync(path: string, flags: string | number, mode?: number): number;
  writeSync(fd: number, buf: Uint8Array, offset: number, length: number, position: number | null): number;
  fsyncSync(fd: number): void;
  fchmodSync(fd: number, mode: number): void;
  fstatSync(fd: number): fs.Stats;
  closeSync(fd: number): void;
  renameSync(from: string, to: string): void;
  unlinkSync(path: string): void;
  statSync(path: string): fs.Stats;
  lstatSync(path: string): fs.Stats;
  readlinkSync(path: string): string;
  readdirSync(path: string): string[];
  readFileSync(fd: number): Buffer;
}

const real: FsOps = {
  openSync: (p, f, m) => fs.openSync(p, f, m),
  writeSync: (fd, b, o, l, p) => fs.writeSync(fd, b, o, l, p),
  fsyncSync: (fd) => fs.fsyncSync(fd),
  fchmodSync: (fd, m) => fs.fchmodSync(fd, m),
  fstatSync: (fd) => fs.fstatSync(fd),
  closeSync: (fd) => fs.closeSync(fd),
  renameSync: (a, b) => fs.renameSync(a, b),
  unlinkSync: (p) => fs.unlinkSync(p),
  statSync: (p) => fs.statSync(p),
  lstatSync: (p) => fs.lstatSync(p),
  readlinkSync: (p) => fs.readlinkSync(p, 'utf8'),
  readdirSync: (p) => fs.readdirSync(p),
  readFileSync: (fd) => fs.readFileSync(fd),
};

/** The calls in use. Replaced only through `withFsOps` (tests). */
export const fsOps: FsOps = { ...real };

/**
 * Run `fn` with some calls replaced (each replacement gets the real call as its last argument's
 * fallback through `realFsOps`), and put the real ones back afterwards, also when `fn` throws.
 */
export async function withFsOps<T>(replace: Partial<FsOps>, fn: () => T | Promise<T>): Promise<T> {
  const saved = { ...fsOps };
  Object.assign(fsOps, replace);
  try {
    return await fn();
  } finally {
    Object.assign(fsOps, saved);
  }
}

/** The unreplaced calls (for a test's replacement to fall back on). */
export const realFsOps: Readonly<FsOps> = real;

/** A system error as Node raises it (for tests and for a short write that raised none). */
export function errnoError(code: string, syscall: string, path?: string): NodeJS.ErrnoException {
  const e = new Error(`${code}: ${syscall}${path ? ` '${path}'` : ''}`) as NodeJS.ErrnoException;
  e.code = code;
  e.syscall = syscall;
  if (path) e.path = path;
  return e;
}

/** fsync is skipped only when the test suite asks for it (TOLRATE_TEST_NO_FSYNC=1, vitest.config.ts). */
export function fsyncWanted(): boolean {
  return process.env.TOLRATE_TEST_NO_FSYNC !== '1';
}
