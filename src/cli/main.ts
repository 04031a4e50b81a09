import { basename, relative } from 'node:path';
import { packageVersion } from '../util/version.js';
import { COMMANDS, findCommand } from '../commands/registry.js';
import type { CommandContext, CommandRun } from '../commands/types.js';
import { isInputError } from '../errors.js';
import { nearest } from '../util/text.js';
import { heldLocks, releaseAllLocks } from '../io/lock.js';
import { visible } from '../io/text.js';

export { packageVersion };


export function mainHelp(): string {
  const lines: string[] = [];
  lines.push('tolrate — document a test of controls by attribute sampling');
  lines.push('');
  lines.push('Usage: tolrate [COMMAND] [OPTIONS]');
  lines.push('       tolrate                     on a terminal: start a new test or continue a workpaper');
  lines.push('       tolrate FILE.tolrate.json   continue that workpaper where it stopped');
  const groups: Array<[string, string]> = [
    ['test', 'A test, from plan to memo (interviews need a terminal):'],
    ['calculators', 'Calculators (flags in, a table or --json out):'],
    ['other', 'Other:'],
  ];
  for (const [g, title] of groups) {
    lines.push('');
    lines.push(title);
    for (const c of COMMANDS.filter((x) => x.group === g)) lines.push(`  ${c.name.padEnd(13)}${c.summary}`);
  }
  lines.push('');
  lines.push('Options: --help (also after any command), --version');
  lines.push('');
  lines.push('Examples:');
  lines.push('  tolrate demo --out demo-output');
  lines.push('  tolrate size --confidence 95 --tolerable 6 --expected 1');
  lines.push('  tolrate limit --sample 78 --deviations 2 --confidence 95 --tolerable 6');
  lines.push('');
  lines.push('Exit codes: 0 done; 1 a check or re-performance found a difference; 2 bad input or usage,');
  lines.push('            or the disk refused (full, read-only, no permission), or the file is open in');
  lines.push('            another session; 130 stopped with Ctrl-C (every step saved before is kept).');
  lines.push('');
  lines.push('The tool computes. Whether a control can be relied on, and how severe a deficiency is, are');
  lines.push('the practitioner\'s judgements under the auditing standards that apply (e.g. AU-C 530,');
  lines.push('ISA 530, AS 2315) and the firm\'s methodology.');
  return lines.join('\n') + '\n';
}

/** Load a command module lazily: heavy libraries are imported only by the commands that use them. */
async function loadCommand(name: string): Promise<CommandRun> {
  const mod = (await import(/* @vite-ignore */ `../commands/${name}/index.js`)) as { run: CommandRun };
  return mod.run;
}

export function defaultContext(): CommandContext {
  const isTTY = Boolean(process.stdout.isTTY && process.stdin.isTTY);
  return {
    stdout: process.stdout,
    stderr: process.stderr,
    isTTY,
    color: Boolean(process.stdout.isTTY) && !('NO_COLOR' in process.env && process.env.NO_COLOR !== ''),
    cwd: process.cwd(),
    env: process.env,
    invocation: invocation(process.argv[1], process.cwd()),
  };
}

/**
 * How the user started tolrate, for the commands the tool prints ("Continue with: ..."): `tolrate`
 * when installed on the PATH, `npx tolrate` under npx, `node dist/cli.js` when run from a clone.
 */
export function invocation(script: string | undefined, cwd: string): string {
  if (!script) return 'tolrate';
  const parts = script.split(/[\\/]/);
  // The bin link: in a node_modules folder (npx, or a local install) it is run with npx; on the PATH as is.
  if (basename(script) === 'tolrate' || basename(script) === 'tolrate.cmd') return parts.includes('node_modules') ? 'npx tolrate' : 'tolrate';
  if (parts.includes('node_modules')) return 'npx tolrate';
  const r = relative(cwd, script);
  const shown = r && !r.startsWith('..') && !r.startsWith('/') ? r : script;
  return `node ${/\s/.test(shown) ? `"${shown}"` : shown}`;
}

/** Run the CLI with the given arguments; resolves to the exit code. */
export async function runCli(argv: string[], ctx: CommandContext = defaultContext()): Promise<number> {
  const [first, ...rest] = argv;
  const locksBefore = heldLocks();
  try {
    if (first === undefined) {
      return await (await loadCommand('start'))([], ctx);
    }
    if (first === '--help' || first === '-h' || first === 'help') {
      if (first === 'help' && rest[0] && findCommand(rest[0])) {
        return await (await loadCommand(rest[0]))(['--help'], ctx);
      }
      ctx.stdout.write(mainHelp());
      return 0;
    }
    if (first === '--version' || first === '-V' || first === 'version') {
      ctx.stdout.write(`tolrate ${packageVersion()}\n`);
      return 0;
    }
    if (first.endsWith('.tolrate.json') || (first === '--policy' && rest.length > 0)) {
      // `tolrate FILE.tolrate.json`: continue that workpaper at its first unanswered step.
      return await (await loadCommand('start'))([first, ...rest], ctx);
    }
    if (first.startsWith('-')) {
      const guess = nearest(first.replace(/^-+/, ''), ['help', 'version']);
      ctx.stderr.write(
        `tolrate: unknown option ${first}.${guess ? ` Did you mean --${guess}?` : ''}\nSee: tolrate --help\n`,
      );
      return 2;
    }
    const info = findCommand(first);
    if (!info) {
      const guess = nearest(first, COMMANDS.map((c) => c.name));
      ctx.stderr.write(
        `tolrate: unknown command "${first}".${guess ? ` Did you mean "${guess}"?` : ''}\nSee: tolrate --help\n`,
      );
      return 2;
    }
    return await (await loadCommand(info.name))(rest, ctx);
  } catch (e) {
    if (isInputError(e)) {
      // A message may quote a key or a value from a file: its control characters are shown, not sent.
      ctx.stderr.write(`${visible(e.message, { keepLines: true })}\n`);
      for (const d of e.details) ctx.stderr.write(`  ${visible(d, { keepLines: true })}\n`);
      return 2;
    }
    if (e instanceof Error && e.name === 'ExitPromptError') {
      // Stopped while a failed save was being handled: the session says what is not on disk.
      const note = (e as { stopNote?: unknown }).stopNote;
      if (typeof note === 'string') {
        ctx.stderr.write(note);
        return 130;
      }
      const { stoppedMessage } = await import('./stopped.js');
      const info = e as { workpaper?: string; keptUnfinished?: boolean };
      ctx.stderr.write(stoppedMessage(ctx.cwd, relative, { workpaper: info.workpaper, keptUnfinished: info.keptUnfinished }, ctx.invocation));
      return 130;
    }
    const sys = e as { code?: unknown; syscall?: unknown; path?: unknown };
    if (e instanceof Error && typeof sys.code === 'string' && /^E[A-Z]+$/.test(sys.code) && typeof sys.syscall === 'string') {
      // A system error that no reader or writer turned into a message: still the environment's, not a bug.
      const { readError, writeError } = await import('../io/messages.js');
      const where = typeof sys.path === 'string' ? sys.path : '(a file)';
      const m = /^(read|stat|lstat|scandir|access|readlink)$/.test(sys.syscall) ? readError(e, where, 'The file') : writeError(e, where, 'the file');
      ctx.stderr.write(`${visible(m.message, { keepLines: true })}\n`);
      for (const d of m.details) ctx.stderr.write(`  ${d}\n`);
      return 2;
    }
    const msg = e instanceof Error ? e.message : String(e);
    ctx.stderr.write(`tolrate: internal error: ${msg}\n`);
    if (ctx.env.TOLRATE_DEBUG && e instanceof Error && e.stack) ctx.stderr.write(`${e.stack}\n`);
    else ctx.stderr.write('This is a bug in tolrate. Run again with TOLRATE_DEBUG=1 for details.\n');
    return 70;
  } finally {
    // Whatever way the command ended, the locks it took are given back.
    releaseAllLocks(locksBefore);
  }
}
