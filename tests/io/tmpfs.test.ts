/**
 * On a real small disk: a tmpfs of a few hundred KB (Linux tmpfs(5), `mount -t tmpfs -o size=`),
 * filled, then remounted read-only. Needs permission to mount (root, or a container that allows
 * it); otherwise every case is skipped and the reason printed.
 *
 * The case found: on a 460 KB tmpfs `tolrate demo --out` exited 0 and named a workpaper of 90,112
 * of 148,199 bytes that was no longer JSON; the memo the same ("Memo written", a file that is not
 * a zip); `record` on a full disk lost the plan.
 */
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import JSZip from 'jszip';
import { runCli } from '../../src/cli/main.js';
import { runWith as record } from '../../src/commands/record/index.js';
import { runWith as plan } from '../../src/commands/plan/index.js';
import type { Asker, ConfirmQuestion, SelectQuestion, TextQuestion } from '../../src/interview/asker.js';
import { ScriptedAsker } from '../../src/interview/scripted.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { captureContext, fixedClock, planAnswers, writePopulation, FIELDWORK_ANSWERS } from '../fixtures/interview.js';

const mnt = mkdtempSync(join(tmpdir(), 'tolrate-tmpfs-'));
let reason: string | undefined;
try {
  execFileSync('mount', ['-t', 'tmpfs', '-o', 'size=460k', 'tmpfs', mnt], { stdio: 'pipe' });
  execFileSync('umount', [mnt], { stdio: 'pipe' });
} catch (e) {
  reason = `cannot mount a tmpfs here (${String((e as { stderr?: Buffer }).stderr ?? (e as Error).message).trim() || 'mount failed'}): the real-disk cases are skipped`;
  // eslint-disable-next-line no-console
  console.log(`tests/io/tmpfs.test.ts: ${reason}`);
}

function mount(size: string): void {
  execFileSync('mount', ['-t', 'tmpfs', '-o', `size=${size}`, 'tmpfs', mnt]);
}
function umount(): void {
  try {
    execFileSync('umount', [mnt], { stdio: 'pipe' });
  } catch {
    // not mounted
  }
}
function avail(): number {
  return Number(execFileSync('df', ['-B1', '--output=avail', mnt]).toString().trim().split('\n')[1]);
}
/** Fill the disk so that about `leave` bytes stay free. */
function fill(leave: number): string {
  const p = join(mnt, 'filler.bin');
  const n = Math.max(0, avail() - leave);
  try {
    writeFileSync(p, Buffer.alloc(n));
  } catch {
    // full already
  }
  return p;
}
function leftovers(dir: string): string[] {
  return existsSync(dir) ? readdirSync(dir).filter((n) => /\.(tmp|lock)$/.test(n)) : [];
}

/** Runs `hook` when question `id` comes up (once), then answers from the script. */
class HookedAsker implements Asker {
  private done = false;
  constructor(private readonly inner: ScriptedAsker, private readonly id: string, private readonly hook: () => void) {}
  private maybe(id: string): void {
    if (!this.done && id === this.id) {
      this.done = true;
      this.hook();
    }
  }
  async text<T>(q: TextQuestion<T>): Promise<T> {
    this.maybe(q.id);
    return this.inner.text(q);
  }
  async select<T extends string>(q: SelectQuestion<T>): Promise<T> {
    this.maybe(q.id);
    return this.inner.select(q);
  }
  async confirm(q: ConfirmQuestion): Promise<boolean> {
    this.maybe(q.id);
    return this.inner.confirm(q);
  }
}

describe.skipIf(reason !== undefined)('on a real small tmpfs', () => {
  // A real disk: fsync on, as in use.
  let saved: string | undefined;
  beforeAll(() => {
    saved = process.env.TOLRATE_TEST_NO_FSYNC;
    delete process.env.TOLRATE_TEST_NO_FSYNC;
  });
  afterAll(() => {
    if (saved !== undefined) process.env.TOLRATE_TEST_NO_FSYNC = saved;
    umount();
    rmSync(mnt, { recursive: true, force: true });
  });
  beforeEach(() => umount());

  it('demo --out on a 460 KB tmpfs: exit 2, "disk full", and no partial file', async () => {
    mount('460k');
    const ctx = captureContext(mnt, false);
    expect(await runCli(['demo', '--out', 'o'], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(/disk full/);
    const out = join(mnt, 'o');
    expect(leftovers(out)).toEqual([]);
    // Whatever is there is whole: the workpaper (an earlier step's save) parses and its log is intact.
    const wp = join(out, 'supplier-invoice-approval.tolrate.json');
    if (existsSync(wp)) expect(verifyLog(loadWorkpaper(wp))).toEqual([]);
    expect(existsSync(join(out, 'supplier-invoice-approval.memo.docx'))).toBe(false);
  });

  it('memo on a full disk: exit 2, "disk full", no memo file; with room, a memo that is a zip', async () => {
    mount('1m');
    const dir = mnt;
    const { total } = writePopulation(dir);
    expect(await plan(['t1'], captureContext(dir), new ScriptedAsker(planAnswers(total)), { now: fixedClock() })).toBe(0);
    const filler = fill(4096);
    const ctx = captureContext(dir, false);
    expect(await runCli(['memo', 't1.tolrate.json'], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(/Cannot write the memo .*: disk full/);
    expect(existsSync(join(dir, 't1.memo.docx'))).toBe(false);
    expect(leftovers(dir)).toEqual([]);
    rmSync(filler);
    expect(await runCli(['memo', 't1.tolrate.json'], captureContext(dir, false))).toBe(0);
    await JSZip.loadAsync(readFileSync(join(dir, 't1.memo.docx')));
  });

  it('record on a full disk: the typed item is kept, the plan on disk is untouched, and a retry after freeing space saves it', async () => {
    mount('1m');
    const dir = mnt;
    const { total } = writePopulation(dir);
    expect(await plan(['t1'], captureContext(dir), new ScriptedAsker(planAnswers(total)), { now: fixedClock() })).toBe(0);
    const file = join(dir, 't1.tolrate.json');
    const planned = readFileSync(file);
    const filler = fill(8192);
    let atRetry: Buffer | undefined;
    const inner = new ScriptedAsker({ 'record.source': 'type', ...FIELDWORK_ANSWERS, 'record.item.*.A1.result': 'conforms', 'record.item.*.A2.result': 'conforms', 'save.failed': ['retry'] });
    const asker = new HookedAsker(inner, 'save.failed', () => {
      atRetry = readFileSync(file);
      rmSync(filler);
    });
    const ctx = captureContext(dir);
    expect(await record(['t1.tolrate.json'], ctx, asker, { now: fixedClock('2026-02-01T09:00:00Z') })).toBe(0);
    expect(ctx.text()).toMatch(/Not saved: Cannot write the workpaper .*: disk full/);
    expect(atRetry!.equals(planned)).toBe(true);
    const wp = loadWorkpaper(file);
    expect(verifyLog(wp)).toEqual([]);
    expect(wp.results!.items.length).toBeGreaterThan(0);
    expect(leftovers(dir)).toEqual([]);
  });

  it('select on a full disk: exit 2, "disk full", no sheet', async () => {
    mount('1m');
    writePopulation(mnt);
    fill(2048);
    const ctx = captureContext(mnt, false);
    expect(await runCli(['select', '--population', 'vouchers.csv', '--key', 'voucher', '--size', '200', '--seed', 'x', '--out', 'sheet.csv'], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(/disk full/);
    expect(existsSync(join(mnt, 'sheet.csv'))).toBe(false);
    expect(leftovers(mnt)).toEqual([]);
  });

  it('a read-only file system: demo --out and record exit 2 with "read-only", nothing changed', async () => {
    mount('1m');
    const { total } = writePopulation(mnt);
    expect(await plan(['t1'], captureContext(mnt), new ScriptedAsker(planAnswers(total)), { now: fixedClock() })).toBe(0);
    mkdtempSync(join(mnt, 'o-'));
    execFileSync('mount', ['-o', 'remount,ro', mnt]);
    const before = readFileSync(join(mnt, 't1.tolrate.json'));
    const d = captureContext(mnt, false);
    const outDir = readdirSync(mnt).find((n) => n.startsWith('o-'))!;
    expect(await runCli(['demo', '--out', outDir], d)).toBe(2);
    expect(d.err.join('')).toMatch(/read-only/);
    const err = await record(['t1.tolrate.json'], captureContext(mnt), new ScriptedAsker({ 'open.locked.readOnly': false }), { now: fixedClock() }).catch((e: unknown) => e);
    expect((err as Error).message).toMatch(/read-only/);
    expect(readFileSync(join(mnt, 't1.tolrate.json')).equals(before)).toBe(true);
  });
});
