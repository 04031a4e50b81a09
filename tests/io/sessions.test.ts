/**
 * The interview when saving fails or another session has the file: a failed save keeps the
 * answer and offers retry, a copy elsewhere, or stop; nothing on disk is touched; Ctrl-C names
 * what is and is not saved. One writer at a time: a lock file, read-only viewing, a stale lock
 * taken over, the file on disk checked before each save. Also a 0600 workpaper, a symbolically
 * linked workpaper, and the temporary files of a killed save.
 */
import { describe, expect, it } from 'vitest';
import { spawn } from 'node:child_process';
import { chmodSync, existsSync, lstatSync, readFileSync, readdirSync, renameSync, statSync, symlinkSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { runWith as record } from '../../src/commands/record/index.js';
import { withFsOps } from '../../src/io/fs.js';
import { lockPathFor } from '../../src/io/lock.js';
import type { Asker, ConfirmQuestion, SelectQuestion, TextQuestion } from '../../src/interview/asker.js';
import { InterviewStopped } from '../../src/interview/asker.js';
import { ScriptedAsker, type ScriptAnswers } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { captureContext, fixedClock, plannedTest, FIELDWORK_ANSWERS } from '../fixtures/interview.js';
import { tempFiles, tracing } from './faults.js';

const conforming: ScriptAnswers = {
  'record.source': 'type', ...FIELDWORK_ANSWERS,
  'record.item.*.A1.result': 'conforms',
  'record.item.*.A2.result': 'conforms',
};

/** An answerer that runs `hook` when question `id` comes up (once), then answers from the script. */
class HookedAsker implements Asker {
  private done = false;
  constructor(
    private readonly inner: ScriptedAsker,
    private readonly id: string,
    private readonly hook: () => Promise<void> | void,
  ) {}
  private async maybe(id: string): Promise<void> {
    if (!this.done && id === this.id) {
      this.done = true;
      await this.hook();
    }
  }
  async text<T>(q: TextQuestion<T>): Promise<T> {
    await this.maybe(q.id);
    return this.inner.text(q);
  }
  async select<T extends string>(q: SelectQuestion<T>): Promise<T> {
    await this.maybe(q.id);
    return this.inner.select(q);
  }
  async confirm(q: ConfirmQuestion): Promise<boolean> {
    await this.maybe(q.id);
    return this.inner.confirm(q);
  }
}

/** ENOSPC at the first `times` writes of the workpaper's temporary file. */
function diskFull(times: number) {
  let n = 0;
  return tracing((c) => (c.name === 'writeSync' && /\.t1\.tolrate\.json\.\d+\.[0-9a-f]{8}\.tmp$/.test(c.path) && n++ < times ? 'ENOSPC' : undefined));
}

describe('a save that fails in the interview', () => {
  it('keeps the typed answer, says why ("disk full"), and saves it when the user retries', async () => {
    // The case found: one item typed on a nearly full disk left invalid JSON and the screen went on.
    const { dir, file } = await plannedTest();
    const before = readFileSync(file);
    let onDiskAtRetry: Buffer | undefined;
    const inner = new ScriptedAsker({ ...conforming, 'save.failed': ['retry'] });
    const asker = new HookedAsker(inner, 'save.failed', () => {
      onDiskAtRetry = readFileSync(file);
    });
    const ctx = captureContext(dir);
    const f = diskFull(1);
    expect(await withFsOps(f.ops, () => record(['t1.tolrate.json'], ctx, asker, { now: fixedClock('2026-02-01T09:00:00Z') }))).toBe(0);
    // While the user was asked, the file on disk was still the planned one, whole.
    expect(onDiskAtRetry!.equals(before)).toBe(true);
    expect(ctx.text()).toMatch(/Not saved: Cannot write the workpaper .*t1\.tolrate\.json: disk full/);
    expect(ctx.text()).toContain('Your answer is kept in memory; nothing already on disk was changed.');
    const wp = loadWorkpaper(file);
    expect(wp.results!.items.length).toBe(wp.selection!.items.filter((i) => i.role === 'sample').length);
    expect(verifyLog(wp)).toEqual([]);
    expect(tempFiles(dir)).toEqual([]);
  });

  it('"stop" leaves the file as it was and says the last answer was not saved (exit 2)', async () => {
    const { dir, file } = await plannedTest();
    const before = readFileSync(file);
    const f = diskFull(100);
    const err = await withFsOps(f.ops, () =>
      record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ ...conforming, 'save.failed': 'stop' }), { now: fixedClock() }).catch((e: unknown) => e),
    );
    expect((err as Error).name).toBe('NotSavedError');
    expect((err as Error).message).toBe('Stopped: the last answer was not saved (disk full). t1.tolrate.json holds the steps saved before it.');
    expect(readFileSync(file).equals(before)).toBe(true);
    expect(tempFiles(dir)).toEqual([]);
    expect(existsSync(lockPathFor(file))).toBe(false);
  });

  it('Ctrl-C while a save has failed does not claim the file holds every step answered', async () => {
    const { dir, file } = await plannedTest();
    const inner = new ScriptedAsker(conforming);
    const asker = new HookedAsker(inner, 'save.failed', () => {
      throw new InterviewStopped();
    });
    const f = diskFull(100);
    const err = await withFsOps(f.ops, () => record(['t1.tolrate.json'], captureContext(dir), asker, { now: fixedClock() }).catch((e: unknown) => e));
    expect((err as Error).name).toBe('ExitPromptError');
    const note = (err as { stopNote?: string }).stopNote!;
    expect(note).toContain('The last answer was NOT saved (disk full). t1.tolrate.json holds the steps saved before it.');
    expect(note).not.toContain('holds every step answered');
    expect(existsSync(lockPathFor(file))).toBe(false);
  });

  it('"a copy elsewhere" writes the answers to a new file and goes on in it; the original is untouched', async () => {
    const { dir, file } = await plannedTest();
    const before = readFileSync(file);
    // EACCES on the original's temporary file only (a file the user may no longer write).
    const f = tracing((c) => (c.name === 'openSync' && /\.t1\.tolrate\.json\.\d+\.[0-9a-f]{8}\.tmp$/.test(c.path) ? 'EACCES' : undefined));
    const ctx = captureContext(dir);
    const a = new ScriptedAsker({ ...conforming, 'save.failed': ['copy'], 'save.copy.path': ['t1.tolrate.json', 't1-copy'] });
    expect(await withFsOps(f.ops, () => record(['t1.tolrate.json'], ctx, a, { now: fixedClock('2026-02-01T09:00:00Z') }))).toBe(0);
    expect(a.refusals[0]!.message).toMatch(/t1\.tolrate\.json exists; give the name of a new file\./);
    expect(ctx.text()).toMatch(/permission denied/);
    expect(ctx.text()).toContain('Saved to t1-copy.tolrate.json. This session goes on in it; t1.tolrate.json is left as it was.');
    expect(readFileSync(file).equals(before)).toBe(true);
    const copy = loadWorkpaper(join(dir, 't1-copy.tolrate.json'));
    expect(copy.results!.items.length).toBeGreaterThan(0);
    expect(verifyLog(copy)).toEqual([]);
    expect(readdirSync(dir).filter((n) => n.endsWith('.lock'))).toEqual([]);
  });
});

describe('one writer at a time', () => {
  it('a second session on the same file is refused with who holds it, or shows it read-only', async () => {
    // The case found: two record sessions typing in turn overwrote each other's items.
    const { dir, file } = await plannedTest();
    let second: unknown;
    let readOnlyOut = '';
    let lockText = '';
    const inner = new ScriptedAsker(conforming);
    const asker = new HookedAsker(inner, 'record.item.3.A1.result', async () => {
      lockText = readFileSync(lockPathFor(file), 'utf8');
      second = await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ ...conforming, 'open.locked.readOnly': false }), { now: fixedClock() }).catch((e: unknown) => e);
      const ctx = captureContext(dir);
      expect(await record(['t1.tolrate.json'], ctx, new ScriptedAsker({ 'open.locked.readOnly': true }), { now: fixedClock() })).toBe(0);
      readOnlyOut = ctx.text();
    });
    expect(await record(['t1.tolrate.json'], captureContext(dir), asker, { now: fixedClock('2026-02-01T09:00:00Z') })).toBe(0);
    const info = JSON.parse(lockText) as Record<string, unknown>;
    expect(info).toMatchObject({ tool: 'tolrate', host: hostname(), pid: process.pid, file: 't1.tolrate.json' });
    expect(typeof info.user).toBe('string');
    expect(typeof info.startedAt).toBe('string');
    expect((second as Error).name).toBe('WorkpaperLockedError');
    expect((second as Error).message).toContain(`t1.tolrate.json is open in another session: ${String(info.user)} on ${hostname()} (process ${process.pid}`);
    expect(readOnlyOut).toContain('t1.tolrate.json (read-only)');
    expect(readOnlyOut).toContain('Nothing was saved (read-only).');
    // The first session's items are all there, and the lock is gone after it.
    const wp = loadWorkpaper(file);
    expect(wp.results!.items.length).toBe(wp.selection!.items.filter((i) => i.role === 'sample').length);
    expect(existsSync(lockPathFor(file))).toBe(false);
  });

  it('a file changed on disk since it was opened is not overwritten; the user is told and may save a copy', async () => {
    const { dir, file } = await plannedTest();
    let theirs = '';
    const inner = new ScriptedAsker({ ...conforming, 'save.failed': ['copy'], 'save.copy.path': 'mine' });
    const asker = new HookedAsker(inner, 'record.item.1.A1.result', () => {
      // Someone else (an editor, or a session that ignored the lock) saves the file meanwhile.
      const wp = JSON.parse(readFileSync(file, 'utf8')) as { control: { owner: string } };
      wp.control.owner = 'Changed elsewhere';
      theirs = `${JSON.stringify(wp, null, 2)}\n`;
      writeFileSync(file, theirs);
    });
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, asker, { now: fixedClock('2026-02-01T09:00:00Z') })).toBe(0);
    expect(ctx.text()).toContain('Not saved: t1.tolrate.json was changed on disk since this session opened it');
    expect(ctx.text()).toContain('Nothing was written to it, so the other changes are kept.');
    expect(readFileSync(file, 'utf8')).toBe(theirs);
    expect(inner.asked.find((q) => q.id === 'save.failed')).toBeDefined();
    // Retrying would overwrite the other changes, so it is not offered.
    expect(loadWorkpaper(join(dir, 'mine.tolrate.json')).results).toBeDefined();
  });

  it('a stale lock of a process that no longer runs on this host is taken over, with a note', async () => {
    const { dir, file } = await plannedTest();
    // A process id above Linux's largest pid_max (4,194,304) is never running.
    writeFileSync(lockPathFor(file), JSON.stringify({ tool: 'tolrate', host: hostname(), pid: 99999999, user: 'someone', startedAt: '2026-01-01T00:00:00.000Z', file: 't1.tolrate.json' }));
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, new ScriptedAsker(conforming), { now: fixedClock() })).toBe(0);
    expect(ctx.text()).toContain('Note: A lock left by someone on');
    expect(ctx.text()).toContain('(process 99999999, since 2026-01-01T00:00:00.000Z), which is no longer running, was taken over.');
    expect(existsSync(lockPathFor(file))).toBe(false);
  });

  it('a lock whose process number now belongs to another program (not node) is stale too', async () => {
    const { dir, file } = await plannedTest();
    const other = spawn('sleep', ['30'], { stdio: 'ignore' });
    try {
      writeFileSync(lockPathFor(file), JSON.stringify({ tool: 'tolrate', host: hostname(), pid: other.pid, user: 'someone', startedAt: '2026-01-01T00:00:00.000Z', file: 't1.tolrate.json' }));
      const ctx = captureContext(dir);
      expect(await record(['t1.tolrate.json'], ctx, new ScriptedAsker(conforming), { now: fixedClock() })).toBe(0);
      expect(ctx.text()).toContain(`(process ${other.pid}, since 2026-01-01T00:00:00.000Z), which is no longer running, was taken over.`);
    } finally {
      other.kill('SIGKILL');
    }
  });

  it('a lock from another computer is not taken over (its process cannot be checked from here)', async () => {
    const { dir, file } = await plannedTest();
    writeFileSync(lockPathFor(file), JSON.stringify({ tool: 'tolrate', host: 'another-host.invalid', pid: 99999999, user: 'r.other', startedAt: '2026-01-01T00:00:00.000Z', file: 't1.tolrate.json' }));
    const err = await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({ 'open.locked.readOnly': false }), { now: fixedClock() }).catch((e: unknown) => e);
    expect((err as Error).message).toContain('open in another session: r.other on another-host.invalid (process 99999999');
    expect(existsSync(lockPathFor(file))).toBe(true);
  });

  it('the lock is removed when the session fails, as well as when it ends', async () => {
    const { dir, file } = await plannedTest();
    const err = await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker({}), { now: fixedClock() }).catch((e: unknown) => e);
    expect((err as Error).name).toBe('ScriptError');
    expect(existsSync(lockPathFor(file))).toBe(false);
  });
});

describe('the workpaper file itself', () => {
  it('a 0600 workpaper stays 0600 after a save', async () => {
    const { dir, file } = await plannedTest();
    chmodSync(file, 0o600);
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(conforming), { now: fixedClock() })).toBe(0);
    expect(statSync(file).mode & 0o777).toBe(0o600);
  });

  it('a symbolically linked workpaper stays a link, and its target is the file saved', async () => {
    const { dir, file } = await plannedTest();
    const real = join(dir, 'kept', 'real.tolrate.json');
    await import('node:fs').then((fs) => fs.mkdirSync(join(dir, 'kept')));
    renameSync(file, real);
    symlinkSync(join('kept', 'real.tolrate.json'), file);
    expect(await record(['t1.tolrate.json'], captureContext(dir), new ScriptedAsker(conforming), { now: fixedClock() })).toBe(0);
    expect(lstatSync(file).isSymbolicLink()).toBe(true);
    expect(loadWorkpaper(real).results).toBeDefined();
    expect(readdirSync(dir).filter((n) => n.endsWith('.tmp') || n.endsWith('.lock'))).toEqual([]);
  });

  it('temporary files of a killed save are reported when the workpaper is opened, and removed on request', async () => {
    // The case found: killed saves left hidden temporary files with the whole workpaper that nothing removed.
    const { dir, file } = await plannedTest();
    const stale = join(dir, '.t1.tolrate.json.99999999.0badc0de.tmp');
    writeFileSync(stale, readFileSync(file).subarray(0, 2000));
    const ctx = captureContext(dir);
    const a = new ScriptedAsker({ ...conforming, 'open.staleTemp.remove': true });
    expect(await record(['t1.tolrate.json'], ctx, a, { now: fixedClock() })).toBe(0);
    expect(ctx.text()).toContain('1 temporary file(s) of an earlier save that did not finish (the process was stopped) lie beside t1.tolrate.json:');
    expect(ctx.text()).toContain('.t1.tolrate.json.99999999.0badc0de.tmp (2000 bytes)');
    expect(existsSync(stale)).toBe(false);
  });
});
