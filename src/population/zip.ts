import type { FileHandle } from 'node:fs/promises';
import { Readable } from 'node:stream';
import { createInflateRaw } from 'node:zlib';

/**
 * Just enough of a zip reader for a workbook: the central directory at the end of the file
 * (PKWARE APPNOTE.TXT 4.3.12-4.3.16, with the ZIP64 records of 4.3.14-4.3.15 and the ZIP64
 * extra field of 4.5.3), and one member streamed through node's zlib raw inflate (which runs in
 * libuv's thread pool, beside the caller's parsing). Nothing is written to disk, members are
 * found by name wherever they lie in the file, and every size is checked against the file and
 * against a cap before any byte is inflated, so a damaged or hostile zip ends with a ZipError
 * instead of a hang or an exhausted heap.
 */

export class ZipError extends Error {
  constructor(
    message: string,
    readonly kind: 'not-zip' | 'damaged' | 'cap' | 'unsupported',
  ) {
    super(message);
    this.name = 'ZipError';
  }
}

export interface ZipEntry {
  name: string;
  method: number;
  flags: number;
  compressedSize: number;
  size: number;
  localOffset: number;
}

const EOCD = 0x06054b50;
const EOCD64 = 0x06064b50;
const EOCD64_LOCATOR = 0x07064b50;
const CENTRAL = 0x02014b50;
const LOCAL = 0x04034b50;
/** A directory bigger than this is not a workbook's. */
const MAX_DIRECTORY_BYTES = 64 * 1024 * 1024;

async function readAt(fh: FileHandle, pos: number, len: number): Promise<Buffer> {
  const b = Buffer.alloc(len);
  let got = 0;
  while (got < len) {
    const { bytesRead } = await fh.read(b, got, len - got, pos + got);
    if (bytesRead === 0) break;
    got += bytesRead;
  }
  return got === len ? b : b.subarray(0, got);
}

const u64 = (b: Buffer, at: number) => Number(b.readBigUInt64LE(at));

/** The members of the zip, by name. */
export async function readZipDirectory(fh: FileHandle, size: number): Promise<Map<string, ZipEntry>> {
  const head = await readAt(fh, 0, Math.min(size, 8));
  const tailLen = Math.min(size, 22 + 65535);
  const tail = await readAt(fh, size - tailLen, tailLen);
  let at = -1;
  for (let i = tail.length - 22; i >= 0; i--) {
    if (tail.readUInt32LE(i) === EOCD) {
      at = i;
      break;
    }
  }
  if (at < 0) {
    if (head.length >= 4 && head.readUInt32LE(0) === LOCAL) {
      throw new ZipError('the zip is cut short or damaged: its directory at the end of the file is missing', 'damaged');
    }
    throw new ZipError('not-zip', 'not-zip');
  }
  const eocdPos = size - tailLen + at;
  let count = tail.readUInt16LE(at + 10);
  let dirSize = tail.readUInt32LE(at + 12);
  let dirOffset = tail.readUInt32LE(at + 16);
  if (count === 0xffff || dirSize === 0xffffffff || dirOffset === 0xffffffff) {
    const loc = at >= 20 ? tail.subarray(at - 20, at) : await readAt(fh, eocdPos - 20, 20);
    if (loc.length === 20 && loc.readUInt32LE(0) === EOCD64_LOCATOR) {
      const pos = u64(loc, 8);
      const rec = pos + 56 <= size ? await readAt(fh, pos, 56) : Buffer.alloc(0);
      if (rec.length < 56 || rec.readUInt32LE(0) !== EOCD64) throw new ZipError('the zip is damaged: its ZIP64 directory record is missing', 'damaged');
      count = u64(rec, 32);
      dirSize = u64(rec, 40);
      dirOffset = u64(rec, 48);
    }
  }
  if (dirOffset + dirSize > eocdPos) throw new ZipError('the zip is cut short or damaged: its directory points past the end of the file', 'damaged');
  if (dirSize > MAX_DIRECTORY_BYTES) throw new ZipError(`the zip's directory is larger than ${MAX_DIRECTORY_BYTES / 1048576} MiB`, 'cap');
  const dir = await readAt(fh, dirOffset, dirSize);
  const out = new Map<string, ZipEntry>();
  let p = 0;
  for (let i = 0; i < count; i++) {
    if (p + 46 > dir.length || dir.readUInt32LE(p) !== CENTRAL) throw new ZipError('the zip is damaged: its directory is unreadable', 'damaged');
    const flags = dir.readUInt16LE(p + 8);
    const method = dir.readUInt16LE(p + 10);
    let compressedSize = dir.readUInt32LE(p + 20);
    let usize = dir.readUInt32LE(p + 24);
    const nameLen = dir.readUInt16LE(p + 28);
    const extraLen = dir.readUInt16LE(p + 30);
    const commentLen = dir.readUInt16LE(p + 32);
    let localOffset = dir.readUInt32LE(p + 42);
    if (p + 46 + nameLen + extraLen > dir.length) throw new ZipError('the zip is damaged: its directory is unreadable', 'damaged');
    const name = dir.toString('utf8', p + 46, p + 46 + nameLen);
    // ZIP64 extra field: the 64-bit values of the fields that hold 0xFFFFFFFF, in this order.
    let e = p + 46 + nameLen;
    const eEnd = e + extraLen;
    while (e + 4 <= eEnd) {
      const id = dir.readUInt16LE(e);
      const len = dir.readUInt16LE(e + 2);
      if (id === 0x0001) {
        let q = e + 4;
        if (usize === 0xffffffff && q + 8 <= e + 4 + len) (usize = u64(dir, q)), (q += 8);
        if (compressedSize === 0xffffffff && q + 8 <= e + 4 + len) (compressedSize = u64(dir, q)), (q += 8);
        if (localOffset === 0xffffffff && q + 8 <= e + 4 + len) localOffset = u64(dir, q);
      }
      e += 4 + len;
    }
    if (!out.has(name)) out.set(name, { name, method, flags, compressedSize, size: usize, localOffset });
    p += 46 + nameLen + extraLen + commentLen;
  }
  return out;
}

async function* rawBytes(fh: FileHandle, start: number, length: number, name: string): AsyncGenerator<Buffer> {
  let pos = start;
  let left = length;
  while (left > 0) {
    const n = Math.min(left, 1 << 20);
    const b = Buffer.allocUnsafe(n);
    const { bytesRead } = await fh.read(b, 0, n, pos);
    if (bytesRead === 0) throw new ZipError(`the zip is cut short: ${name} runs past the end of the file`, 'damaged');
    pos += bytesRead;
    left -= bytesRead;
    yield bytesRead === n ? b : b.subarray(0, bytesRead);
  }
}

export interface InflateLimits {
  /** Stop with a ZipError of kind 'cap' once more than this many bytes come out. */
  maxBytes: number;
  /** The message for that error. */
  capMessage: string;
}

/**
 * The bytes of one member, inflated as they are read. Stops (ZipError) when the member would
 * come out larger than the cap, or larger than the directory says it is.
 */
export async function* entryChunks(fh: FileHandle, fileSize: number, entry: ZipEntry, limits: InflateLimits): AsyncGenerator<Buffer> {
  if (entry.flags & 1) throw new ZipError(`${entry.name} is encrypted`, 'unsupported');
  if (entry.method !== 0 && entry.method !== 8) throw new ZipError(`${entry.name} is compressed with method ${entry.method}, which is not read`, 'unsupported');
  if (entry.size > limits.maxBytes) throw new ZipError(limits.capMessage, 'cap');
  const local = await readAt(fh, entry.localOffset, 30);
  if (local.length < 30 || local.readUInt32LE(0) !== LOCAL) throw new ZipError(`the zip is damaged: ${entry.name} is not where its directory says`, 'damaged');
  const start = entry.localOffset + 30 + local.readUInt16LE(26) + local.readUInt16LE(28);
  if (start + entry.compressedSize > fileSize) throw new ZipError(`the zip is cut short: ${entry.name} runs past the end of the file`, 'damaged');
  if (entry.compressedSize === 0) {
    if (entry.size !== 0) throw new ZipError(`the zip is damaged: ${entry.name} is empty`, 'damaged');
    return;
  }
  // Not fh.createReadStream: destroying that stream closes the handle, and the handle is shared.
  const src = Readable.from(rawBytes(fh, start, entry.compressedSize, entry.name), { objectMode: false, highWaterMark: 1 << 20 });
  let total = 0;
  const check = (n: number) => {
    total += n;
    if (total > limits.maxBytes) throw new ZipError(limits.capMessage, 'cap');
    if (total > entry.size) throw new ZipError(`the zip is damaged: ${entry.name} holds more than the ${entry.size} bytes its directory gives`, 'damaged');
  };
  try {
    if (entry.method === 0) {
      for await (const c of src) {
        check((c as Buffer).length);
        yield c as Buffer;
      }
    } else {
      const inflate = createInflateRaw({ chunkSize: 1 << 18 });
      src.on('error', (e) => inflate.destroy(e));
      src.pipe(inflate);
      try {
        for await (const c of inflate) {
          check((c as Buffer).length);
          yield c as Buffer;
        }
      } catch (e) {
        if (e instanceof ZipError) throw e;
        const code = (e as { code?: string }).code;
        if (code && code.startsWith('Z_')) throw new ZipError(`the zip is damaged: ${entry.name} cannot be unpacked (${(e as Error).message})`, 'damaged');
        throw e;
      } finally {
        src.unpipe(inflate);
        inflate.destroy();
      }
    }
  } finally {
    src.destroy();
  }
  if (total !== entry.size) throw new ZipError(`the zip is damaged: ${entry.name} holds ${total} bytes, its directory says ${entry.size}`, 'damaged');
}

/** A whole (small) member as one buffer. */
export async function readEntry(fh: FileHandle, fileSize: number, entry: ZipEntry, limits: InflateLimits): Promise<Buffer> {
  const parts: Buffer[] = [];
  for await (const c of entryChunks(fh, fileSize, entry, limits)) parts.push(c);
  return Buffer.concat(parts);
}
