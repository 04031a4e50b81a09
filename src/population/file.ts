import { open, type FileHandle } from 'node:fs/promises';
import type { Stats } from 'node:fs';
import { FileInputError, TolrateInputError } from '../errors.js';
import { assertRegularFile } from '../io/read.js';

/** Open a population file for reading, turning system errors into messages a user can act on. */
export async function openFile(path: string, what = 'Population file'): Promise<{ fh: FileHandle; size: number; stats: Stats }> {
  let fh: FileHandle;
  try {
    // A named pipe, device or socket is refused before it is opened (opening a pipe blocks).
    assertRegularFile(path, what);
    fh = await open(path, 'r');
  } catch (e) {
    throw fileError(e, path, what);
  }
  try {
    const st = await fh.stat();
    if (st.isDirectory()) throw new FileInputError(path, `${what} ${path} is a folder, not a file.`);
    return { fh, size: st.size, stats: st };
  } catch (e) {
    await fh.close();
    throw fileError(e, path, what);
  }
}

export function fileError(e: unknown, path: string, what = 'Population file'): Error {
  if (e instanceof TolrateInputError) return e;
  const code = (e as { code?: string }).code;
  if (code === 'ENOENT') return new FileInputError(path, `${what} not found: ${path}`);
  if (code === 'EISDIR') return new FileInputError(path, `${what} ${path} is a folder, not a file.`);
  if (code === 'EACCES' || code === 'EPERM') return new FileInputError(path, `${what} ${path} cannot be read (permission denied).`);
  if (code) return new FileInputError(path, `${what} ${path} cannot be read (${code}).`);
  return e instanceof Error ? e : new Error(String(e));
}

export const CHUNK = 1 << 20;
/** Room kept before each chunk for the unfinished record of the previous one. */
export const HEADROOM = 1 << 18;

/**
 * Read a file from `from` to its end in chunks of `size` bytes, reading the next chunk while the
 * caller works on the current one. The caller gets the whole buffer with the chunk at
 * [start, end); the HEADROOM bytes before `start` are free for it to use. The buffer is only valid
 * until the next chunk is asked for. `onChunk` may return false to stop early.
 */
export async function forEachChunk(
  fh: FileHandle,
  onChunk: (buf: Buffer, start: number, end: number, bytesSoFar: number) => boolean | void,
  opts: { from?: number; size?: number } = {},
): Promise<number> {
  const size = opts.size ?? CHUNK;
  const bufs = [Buffer.allocUnsafe(HEADROOM + size), Buffer.allocUnsafe(HEADROOM + size)];
  let which = 0;
  let pos = opts.from ?? 0;
  let pending = fh.read(bufs[0]!, HEADROOM, size, pos);
  for (;;) {
    const { bytesRead } = await pending;
    if (bytesRead === 0) return pos;
    const cur = bufs[which]!;
    pos += bytesRead;
    which ^= 1;
    pending = fh.read(bufs[which]!, HEADROOM, size, pos);
    if (onChunk(cur, HEADROOM, HEADROOM + bytesRead, pos) === false) {
      await pending.catch(() => undefined);
      return pos;
    }
  }
}
