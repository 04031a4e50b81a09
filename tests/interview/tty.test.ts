/**
 * One run in a real pseudo-terminal: the CLI's `plan` inside tmux, answered with keys, including
 * a wrong answer, then stopped with Ctrl-C at the approach step. The test compiles the sources it
 * runs into a temporary folder first (TypeScript's own compiler, without type checking, which
 * `npm test` does anyway), so it never runs a stale dist/. Needs tmux; skipped, with the reason
 * in the test's name, when it is missing.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, symlinkSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { verifyLog } from '../../src/workpaper/log.js';
import { tempDir, writePopulation } from '../fixtures/interview.js';

const ROOT = resolve(__dirname, '..', '..');
const hasTmux = spawnSync('tmux', ['-V']).status === 0;
const reason = !hasTmux ? 'tmux is not installed' : '';
let built = '';
let CLI = '';

/** Compile src/ into a fresh folder laid out like the package (dist/ beside templates/ and samples/). */
function buildSources(): void {
  built = mkdtempSync(join(tmpdir(), 'tolrate-tty-build-'));
  const tsc = join(ROOT, 'node_modules', 'typescript', 'bin', 'tsc');
  const r = spawnSync(process.execPath, [tsc, '-p', join(ROOT, 'tsconfig.build.json'), '--outDir', join(built, 'dist'), '--noCheck', '--declaration', 'false'], {
    encoding: 'utf8',
  });
  if (r.status !== 0) throw new Error(`compiling the sources failed:\n${r.stdout}${r.stderr}`);
  for (const name of ['templates', 'samples', 'node_modules', 'package.json']) symlinkSync(join(ROOT, name), join(built, name));
  CLI = join(built, 'dist', 'cli.js');
}
const session = `tolrate-test-${process.pid}`;

function tmux(...args: string[]): string {
  return execFileSync('tmux', args, { encoding: 'utf8' });
}
const screen = () => tmux('capture-pane', '-t', session, '-p', '-S', '-200');
async function waitFor(text: string | RegExp, ms = 10_000): Promise<string> {
  const end = Date.now() + ms;
  for (;;) {
    const s = screen();
    if (typeof text === 'string' ? s.includes(text) : text.test(s)) return s;
    if (Date.now() > end) throw new Error(`timed out waiting for ${String(text)}; the screen shows:\n${s}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}
async function answer(prompt: string | RegExp, ...keys: string[]): Promise<void> {
  await waitFor(prompt);
  for (const k of keys) tmux('send-keys', '-t', session, ...(k === 'Enter' || k === 'Down' || k === 'C-c' || k === 'C-u' ? [k] : ['-l', k]));
}

describe.skipIf(reason !== '')(`a real terminal (tmux)${reason ? `: skipped, ${reason}` : ''}`, () => {
  beforeAll(buildSources, 120_000);
  afterAll(() => {
    spawnSync('tmux', ['kill-session', '-t', session]);
    if (built) rmSync(built, { recursive: true, force: true });
  });

  it('plan in a pseudo-terminal: typed answers, a refusal shown, Ctrl-C keeps the answered steps', async () => {
    const dir = tempDir();
    const { total } = writePopulation(dir);
    tmux('new-session', '-d', '-s', session, '-x', '150', '-y', '50', `cd '${dir}' && node '${CLI}' plan t1; echo "EXIT=$?" > exit.txt; sleep 60`);
    await answer('? Entity', 'Corrow Fittings Ltd', 'Enter');
    await answer('? Period start', '2025-01-01', 'Enter');
    await answer('? Period end', '2024-12-31', 'Enter');
    await waitFor('Period end: 2024-12-31 is before the period start (2025-01-01).');
    await answer('before the period start', 'C-u', '2025-12-31', 'Enter');
    await answer('? Workpaper reference', 'C-3.1', 'Enter');
    await answer('? Preparer', 'T. Preparer', 'Enter');
    await answer('? Reviewer', 'R. Reviewer', 'Enter');
    await answer('? Control identifier', 'PAY-02', 'Enter');
    await answer('? What the control does', 'Second signatory approves each voucher', 'Enter');
    await answer('? Control objective', 'Only authorised payments', 'Enter');
    await answer('? Control owner', 'Finance manager', 'Enter');
    await answer('? How often the control operates', 'Down', 'Down', 'Down', 'Down', 'Down', 'Enter');
    await answer('? Nature of the control', 'Enter');
    await answer('? Is it a key control?', 'Enter');
    await answer('? A1: what is checked', 'Second signature', 'Enter');
    await answer('? A1: what counts as a deviation', 'No second signature', 'Enter');
    await answer('? A1: its own tolerable', 'Enter');
    await answer('? Add another attribute?', 'n', 'Enter');
    await answer('? Where is the population?', 'Enter');
    await answer('? Population file', 'vouchers.csv', 'Enter');
    await answer('? Key column', 'Enter');
    await answer('? Amount column', 'Enter');
    await answer('? Date column', 'Enter');
    await waitFor('Validation: no problems found.');
    await answer('? Sampling unit', 'One payment voucher', 'Enter');
    await answer('? Description of the population', 'Vouchers released in 2025', 'Enter');
    await answer('? Ledger count', '240', 'Enter');
    await answer('? Ledger total', total, 'Enter');
    await answer('The population agrees to the ledger.');
    await answer('? Where the ledger figures come from', 'Payments register', 'Enter');
    await answer('? Approach', 'C-c');
    for (let i = 0; i < 50 && !existsSync(join(dir, 'exit.txt')); i++) await new Promise((r) => setTimeout(r, 100));
    expect(readFileSync(join(dir, 'exit.txt'), 'utf8').trim()).toBe('EXIT=130');
    expect(screen()).toContain('Stopped. t1.tolrate.json holds every step answered before this question.');
    // Started as `node .../dist/cli.js`, so the command to continue is given the same way.
    expect(screen()).toMatch(/Continue with: node \S*dist\/cli\.js t1\.tolrate\.json/);
    const wp = loadWorkpaper(join(dir, 't1.tolrate.json'));
    expect(verifyLog(wp)).toEqual([]);
    expect(wp.engagement).toMatchObject({ entity: 'Corrow Fittings Ltd', periodEnd: '2025-12-31' });
    expect(wp.control!.frequency).toBe('many-times-daily');
    expect(wp.population!.tieOut).toMatchObject({ ledgerCount: 240, countDifference: 0, totalDifference: '0.00' });
    expect(wp.approach).toBeUndefined();
  }, 60_000);
});
