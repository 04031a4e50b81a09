#!/usr/bin/env node
import { dropOutputOnClosedPipe } from './cli/closed-pipe.js';
import { runCli } from './cli/main.js';

dropOutputOnClosedPipe(process.stdout);
dropOutputOnClosedPipe(process.stderr);

runCli(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stderr.write(`tolrate: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exitCode = 70;
  },
);
