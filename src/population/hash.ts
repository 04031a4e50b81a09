import { createHash } from 'node:crypto';
import { Worker } from 'node:worker_threads';
import { forEachChunk, openFile } from './file.js';

/**
 * SHA-256 of a whole file. For a big file the hash runs in a worker thread that reads the file
 * itself, so that on a machine with two or more cores it costs no time beside the main pass.
 * The worker's code is plain CommonJS passed as text, so it runs the same from the sources and
 * from the build. If a worker cannot be started, the file is hashed on this thread instead.
 */

const WORKER_CODE = `
const { parentPort, workerData } = require('node:worker_threads');
const { createHash } = require('node:crypto');
const fs = require('node:fs');
try {
  const h = createHash('sha256');
  const fd = fs.openSync(workerData.path, 'r');
  const b = Buffer.allocUnsafe(1 << 20);
  let n;
  let bytes = 0;
  try {
    while ((n = fs.readSync(fd, b, 0, b.length, null)) > 0) {
      h.update(b.subarray(0, n));
      bytes += n;
    }
  } finally {
    fs.closeSync(fd);
  }
  parentPort.postMessage({ sha256: h.digest('hex'), bytes });
} catch (e) {
  parentPort.postMessage({ error: String(e && e.message || e) });
}
`;

/** Files at least this big are hashed in a worker thread. */
export const WORKER_MIN_BYTES = 4 * 1024 * 1024;

export interface FileHash {
  sha256: string;
  bytes: number;
}

/** Hash on this thread. */
export async function hashFileHere(path: string): Promise<FileHash> {
  const { fh } = await openFile(path);
  const h = createHash('sha256');
  let bytes = 0;
  try {
    await forEachChunk(fh, (buf, start, end) => {
      h.update(buf.subarray(start, end));
      bytes += end - start;
    });
  } finally {
    await fh.close();
  }
  return { sha256: h.digest('hex'), bytes };
}

/** Start hashing in a worker thread; falls back to this thread if the worker fails. */
export function hashFileInWorker(path: string): Promise<FileHash> {
  return new Promise<FileHash>((resolve) => {
    let settled = false;
    const fallback = () => {
      if (settled) return;
      settled = true;
      resolve(hashFileHere(path));
    };
    let worker: Worker;
    try {
      worker = new Worker(WORKER_CODE, { eval: true, workerData: { path } });
    } catch {
      fallback();
      return;
    }
    worker.once('message', (m: { sha256?: string; bytes?: number; error?: string }) => {
      if (settled) return;
      if (m.sha256 !== undefined && m.bytes !== undefined) {
        settled = true;
        resolve({ sha256: m.sha256, bytes: m.bytes });
      } else fallback();
    });
    worker.once('error', fallback);
    worker.once('exit', fallback);
  });
}
