#!/usr/bin/env node
import { runCli } from './cli/main.js';

runCli(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stderr.write(`tolrate: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exitCode = 70;
  },
);
