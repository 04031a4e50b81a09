/**
 * A named pipe (FIFO) as every kind of input file is refused at once with a message, never
 * opened (opening a FIFO for reading blocks until a writer comes: POSIX open(2)). The case found:
 * `select` (CSV and XLSX), `--keys-file`, `reperform --population` and `memo --template` waited
 * until killed, and the interview called a pipe "a folder".
 *
 * So that a reader that does open the pipe fails the test instead of hanging it, a guard process
 * opens each pipe for writing after a few seconds (the reader then reads an empty file).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawn, execFileSync, type ChildProcess } from 'node:child_process';
import { cpSync, mkdirSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { runCli } from '../../src/cli/main.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import { DEFAULT_TEMPLATE_DIR } from '../../src/memo/index.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { captureContext, fixedClock, planAnswers, plannedTest, tempDir, writePopulation } from '../fixtures/interview.js';

const guards: ChildProcess[] = [];
afterAll(() => {
  for (const g of guards) g.kill('SIGKILL');
});

function fifo(path: string): string {
  execFileSync('mkfifo', [path]);
  const g = spawn('sh', ['-c', 'sleep 4; : > "$1"', 'guard', path], { stdio: 'ignore', detached: true });
  g.unref();
  guards.push(g);
  return path;
}

const PIPE = /is a named pipe, not a regular file/;

describe('a named pipe as an input file', () => {
  it('select --population: a CSV and an XLSX name', async () => {
    const dir = tempDir();
    for (const name of ['pop.csv', 'pop.xlsx']) {
      fifo(join(dir, name));
      const ctx = captureContext(dir, false);
      expect(await runCli(['select', '--population', name, '--key', 'k', '--size', '2', '--out', 'sheet.csv'], ctx)).toBe(2);
      expect(ctx.err.join('')).toMatch(PIPE);
    }
  });

  it('select --keys-file', async () => {
    const dir = tempDir();
    fifo(join(dir, 'keys.txt'));
    const ctx = captureContext(dir, false);
    expect(await runCli(['select', '--ranges', '1-100', '--method', 'haphazard', '--keys-file', 'keys.txt', '--selected-by', 'T. Tester', '--how', 'by eye', '--out', 'sheet.csv'], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(/The keys file .*keys\.txt is a named pipe, not a regular file/);
  });

  it('reperform: the workpaper, and --population', async () => {
    const { dir } = await plannedTest();
    fifo(join(dir, 'moved.csv'));
    const ctx = captureContext(dir, false);
    expect(await runCli(['reperform', 't1.tolrate.json', '--population', 'moved.csv'], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(PIPE);
    fifo(join(dir, 'pipe.tolrate.json'));
    const ctx2 = captureContext(dir, false);
    expect(await runCli(['reperform', 'pipe.tolrate.json'], ctx2)).toBe(2);
    expect(ctx2.err.join('')).toMatch(/The workpaper .*pipe\.tolrate\.json is a named pipe, not a regular file/);
  });

  it('memo --template: a wording file and styles.docx', async () => {
    const { dir } = await plannedTest();
    for (const f of ['memo.json', 'styles.docx']) {
      const t = join(dir, `tpl-${f}`);
      cpSync(DEFAULT_TEMPLATE_DIR, t, { recursive: true });
      rmSync(join(t, f), { force: true });
      fifo(join(t, f));
      const ctx = captureContext(dir, false);
      expect(await runCli(['memo', 't1.tolrate.json', '--template', t], ctx)).toBe(2);
      expect(ctx.err.join('')).toMatch(PIPE);
    }
  });

  it('memo and record: the workpaper itself', async () => {
    const dir = tempDir();
    fifo(join(dir, 'p.tolrate.json'));
    const ctx = captureContext(dir, false);
    expect(await runCli(['memo', 'p.tolrate.json'], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(PIPE);
    const err = await record(['p.tolrate.json'], captureContext(dir), new ScriptedAsker({}), { now: fixedClock() }).catch((e: unknown) => e);
    expect((err as Error).message).toMatch(PIPE);
  });

  it('plan --policy', async () => {
    const dir = tempDir();
    fifo(join(dir, 'policy.json'));
    const err = await plan(['t1', '--policy', 'policy.json'], captureContext(dir), new ScriptedAsker({}), { now: fixedClock() }).catch((e: unknown) => e);
    expect((err as Error).message).toMatch(/The sampling policy .*policy\.json is a named pipe, not a regular file/);
  });

  it('the interview: a population file and a filled sheet typed as a pipe are refused as pipes, not "folders"', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    fifo(join(dir, 'pipe.csv'));
    const a = new ScriptedAsker({ ...planAnswers(total), 'plan.population.file': ['pipe.csv', 'vouchers.csv'] });
    expect(await plan(['t1'], captureContext(dir), a, { now: fixedClock() })).toBe(0);
    expect(a.refusals[0]!.message).toMatch(/The population file: .*pipe\.csv is a named pipe, not a regular file/);
    mkdirSync(join(dir, 'sheets'));
    fifo(join(dir, 'sheets', 'filled.csv'));
    const r = new ScriptedAsker({ 'record.source': 'sheet', 'record.sheet.path': ['sheets/filled.csv'] });
    await record(['t1.tolrate.json'], captureContext(dir), r, { now: fixedClock() }).catch(() => undefined);
    expect(r.refusals[0]!.message).toMatch(/The sheet: .*filled\.csv is a named pipe, not a regular file/);
  });
});
