/**
 * Every command's `--help`: exit 0, its usage line, and no text left unfilled from the source
 * (a `${...}` that was escaped instead of substituted, or a value printed as undefined). The memo's
 * help may show a template placeholder such as {{entity}}: it documents the template syntax.
 * Common practice, no single source: a help text shows values, never the names behind them.
 */
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { COMMANDS } from '../../src/commands/registry.js';
import { captureContext } from '../fixtures/interview.js';

async function help(name: string): Promise<{ code: number; out: string }> {
  const ctx = captureContext(process.cwd(), false);
  const code = await runCli([name, '--help'], ctx);
  return { code, out: ctx.text() + ctx.err.join('') };
}

describe('--help of every command', () => {
  for (const c of COMMANDS) {
    it(`${c.name} --help is complete text`, async () => {
      const r = await help(c.name);
      expect(r.code).toBe(0);
      expect(r.out).toContain(`tolrate ${c.name}`);
      expect(r.out).not.toMatch(/\$\{|undefined/);
    });
  }
  it('demo --help gives the date the engagement demo is shown as of', async () => {
    const r = await help('demo');
    expect(r.out).toMatch(/as of \d{4}-\d{2}-\d{2}/);
  });
});
