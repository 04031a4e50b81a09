/**
 * What the interview commands (start, plan, record, conclude) share: the terminal check, the
 * answerer for a terminal, resolving a workpaper path, opening or creating the session.
 */
import { existsSync } from 'node:fs';
import { dirname, extname, resolve } from 'node:path';
import type { CommandContext } from '../commands/types.js';
import { UsageError } from '../errors.js';
import { packageVersion } from '../util/version.js';
import { WORKPAPER_SUFFIX } from '../workpaper/file.js';
import type { Asker } from './asker.js';
import { newSession, openSession, type Session } from './session.js';
import { TerminalAsker } from './terminal.js';
import { folderPath, loadFolder } from '../engagement/folder.js';

/** Options an interview run takes besides the answerer (tests fix the clock). */
export interface InterviewOptions {
  now?: () => Date;
}

/** Without a terminal an interview cannot ask: say how to run it instead (exit 2). */
export function needsTerminal(ctx: CommandContext, command: string): number {
  const t = ctx.invocation ?? 'tolrate';
  const how = command === 'start' ? t : `${t} ${command} ${command === 'plan' ? '[FILE]' : 'FILE'}`;
  ctx.stderr.write(
    `${command === 'start' ? 'tolrate' : `tolrate ${command}`} is an interview and needs a terminal (stdin and stdout); this is not one.\n` +
      `  Run it in a terminal:  ${how}\n` +
      `  For a complete scripted run that asks nothing:  ${t} demo\n` +
      `  The calculators work without a terminal:  ${t} size, limit, table, select (see ${t} --help)\n`,
  );
  return 2;
}

export function terminalAsker(ctx: CommandContext): Asker {
  return new TerminalAsker({ out: ctx.stdout, color: ctx.color });
}

/** `x` -> `x.tolrate.json`; a name with an extension is kept. Resolved against the cwd. */
export function workpaperPath(cwd: string, file: string): string {
  const f = file.trim();
  if (f === '') throw new UsageError('The workpaper file name is empty.');
  return resolve(cwd, extname(f) === '' ? `${f}${WORKPAPER_SUFFIX}` : f);
}

/** Open an existing workpaper (with the outside-change check) or start a new one at `path`. */
export async function sessionFor(
  ctx: CommandContext,
  asker: Asker,
  path: string,
  o: InterviewOptions & { policyPath?: string; mustExist?: boolean; hold?: (s: Session) => Session },
): Promise<Session | undefined> {
  // The folder's engagement file: its answers are the defaults, its policy the default policy.
  const folder = loadFolder(dirname(path));
  const policyPath = o.policyPath ?? (folder?.defaults.policy ? folderPath(dirname(path), folder.defaults.policy) : undefined);
  const base = {
    asker,
    ...(folder ? { folder } : {}),
    out: ctx.stdout,
    path,
    color: ctx.color,
    cwd: ctx.cwd,
    toolVersion: packageVersion(),
    invocation: ctx.invocation ?? 'tolrate',
    ...(o.now ? { now: o.now } : {}),
    ...(policyPath ? { policyPath: resolve(ctx.cwd, policyPath) } : {}),
  };
  const hold = o.hold ?? ((s: Session) => s);
  if (existsSync(path)) return openSession({ ...base, hold });
  if (o.mustExist) throw new UsageError(`No workpaper file at ${path}.`, [`Start a test with: ${ctx.invocation ?? 'tolrate'} plan FILE`]);
  return hold(newSession(base));
}
