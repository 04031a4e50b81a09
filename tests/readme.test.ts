/**
 * The README quotes the calculators' output. This keeps those quotes true: each ```text block of
 * the README that starts with "$ tolrate size|limit|table ..." is run and must print exactly the
 * text that follows it.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { runCli } from '../src/cli/main.js';
import type { CommandContext } from '../src/commands/types.js';

const readme = readFileSync(new URL('../README.md', import.meta.url), 'utf8');
const blocks = [...readme.matchAll(/```text\n\$ tolrate (size|limit|table)([^\n]*)\n([\s\S]*?)```/g)].map((m) => ({
  command: `${m[1]}${m[2]}`,
  expected: m[3]!.replace(/\s+$/, ''),
}));

describe('README calculator examples', () => {
  it('the README quotes at least the three calculators', () => {
    expect(blocks.map((b) => b.command.split(' ')[0])).toEqual(expect.arrayContaining(['size', 'limit', 'table']));
  });
  for (const b of blocks) {
    it(`tolrate ${b.command}`, async () => {
      const out: string[] = [];
      const ctx: CommandContext = { stdout: { write: (t: string) => out.push(t) }, stderr: { write: () => undefined }, isTTY: false, color: false, cwd: process.cwd(), env: {} };
      expect(await runCli(b.command.split(/\s+/), ctx)).toBe(0);
      expect(out.join('').replace(/\s+$/, '')).toBe(b.expected);
    });
  }
});
