/** `tolrate demo --engagement`, `tolrate status --help` and `tolrate summary --help` through the CLI. */
import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { loadWorkpaper } from '../../src/workpaper/file.js';
import { stateHash } from '../../src/workpaper/log.js';
import { captureContext, tempDir } from '../fixtures/interview.js';

describe('tolrate demo --engagement', () => {
  it('builds the folder, prints its status and writes its summary; the carried-forward test names its prior-year file', async () => {
    const dir = tempDir();
    const ctx = captureContext(dir, false);
    expect(await runCli(['demo', '--engagement', '--out', 'eng'], ctx)).toBe(0);
    const out = ctx.text();
    expect(out).toContain('$ tolrate status eng --as-of 2026-02-15');
    expect(out).toContain('3 workpaper(s), 1 complete, 2 unfinished, 0 cannot be read');
    expect(out).toContain('Summary of 3 workpaper(s): 2 concluded, 1 in progress');
    for (const f of ['tolrate-engagement.json', 'engagement-summary.docx', 'engagement-summary.xlsx', 'supplier-invoice-approval.memo.docx']) expect(existsSync(join(dir, 'eng', f))).toBe(true);
    const cf = loadWorkpaper(join(dir, 'eng', 'manual-journal-support.tolrate.json'));
    const prior = loadWorkpaper(join(dir, 'eng', cf.carriedForward!.path));
    expect(cf.carriedForward!.stateHash).toBe(stateHash(prior));
    expect(cf.control).toEqual(prior.control);
    expect(cf.engagement!.periodEnd).toBe('2025-12-31');
    expect(prior.engagement!.periodEnd).toBe('2024-12-31');
    // Both scenarios take the engagement from the folder file.
    for (const f of ['supplier-invoice-approval', 'manual-journal-approval']) expect(loadWorkpaper(join(dir, 'eng', `${f}.tolrate.json`)).engagement!.entity).toBe('Brackenmoor Kilnworks Ltd');
  }, 120_000);

  it('refuses --engagement with --scenario (exit 2)', async () => {
    const ctx = captureContext(tempDir(), false);
    expect(await runCli(['demo', '--engagement', '--scenario', 'small'], ctx)).toBe(2);
  });

  it('status and summary have help texts and are in the command list', async () => {
    for (const c of ['status', 'summary']) {
      const ctx = captureContext(tempDir(), false);
      expect(await runCli([c, '--help'], ctx)).toBe(0);
      expect(ctx.text()).toContain(`Usage: tolrate ${c} [DIR]`);
    }
    const ctx = captureContext(tempDir(), false);
    expect(await runCli(['--help'], ctx)).toBe(0);
    expect(ctx.text()).toMatch(/status\s+Where every test of an engagement folder stands/);
    expect(ctx.text()).toMatch(/summary\s+Write the engagement summary/);
  });

  it('a folder that is not there is bad input (exit 2)', async () => {
    const ctx = captureContext(tempDir(), false);
    expect(await runCli(['status', 'no-such-folder'], ctx)).toBe(2);
    expect(await runCli(['summary', 'no-such-folder'], ctx)).toBe(2);
    expect(await runCli(['status', '.', '--as-of', '15/02/2026'], ctx)).toBe(2);
  });
});
