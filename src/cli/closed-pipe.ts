/**
 * A reader that stops early (`tolrate memo FILE | head -1`) closes the pipe. What is still to be
 * printed is then dropped, and the command finishes its work (a memo or a workpaper is still
 * written whole) instead of failing with a stack trace. Other write errors are not hidden.
 */
export function dropOutputOnClosedPipe(stream: NodeJS.WritableStream): void {
  stream.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code !== 'EPIPE' && e.code !== 'ERR_STREAM_DESTROYED') throw e;
  });
}
