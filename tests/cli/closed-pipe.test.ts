/**
 * Writing into a pipe whose reader has gone (EPIPE, POSIX write(2)) is dropped quietly, as
 * command-line tools commonly do when piped into `head` (common practice, no single source);
 * any other write error still surfaces.
 */
import { spawn } from 'node:child_process';
import { EventEmitter } from 'node:events';
import { describe, expect, it } from 'vitest';
import { dropOutputOnClosedPipe } from '../../src/cli/closed-pipe.js';

describe('output into a closed pipe', () => {
  it('a real pipe whose reader exited: the writes fail with EPIPE and nothing is thrown', async () => {
    // A reader that takes one byte and exits, as `head -c 1` does.
    const child = spawn(process.execPath, ['-e', 'require("fs").readSync(0, Buffer.alloc(1))'], { stdio: ['pipe', 'ignore', 'ignore'] });
    const seen: string[] = [];
    child.stdin.on('error', (e: NodeJS.ErrnoException) => seen.push(e.code ?? ''));
    dropOutputOnClosedPipe(child.stdin);
    const exited = new Promise((r) => child.on('exit', r));
    for (let i = 0; i < 50; i++) child.stdin.write('x'.repeat(65536));
    await exited;
    await new Promise((r) => setTimeout(r, 300));
    expect(seen.length).toBeGreaterThan(0);
    expect(seen.every((c) => c === 'EPIPE' || c === 'ERR_STREAM_DESTROYED')).toBe(true);
  });

  it('without the handler the same error would be unhandled; another error is not hidden', () => {
    const s = new EventEmitter() as unknown as NodeJS.WritableStream;
    dropOutputOnClosedPipe(s);
    expect(() => s.emit('error', Object.assign(new Error('write EPIPE'), { code: 'EPIPE' }))).not.toThrow();
    expect(() => s.emit('error', Object.assign(new Error('no space left'), { code: 'ENOSPC' }))).toThrow(/no space/);
  });
});
