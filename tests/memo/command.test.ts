/** `tolrate memo FILE [--out MEMO.docx] [--template DIR]` through the CLI, with captured output. */
import { cpSync, existsSync, mkdtempSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import type { CommandContext } from '../../src/commands/types.js';
import { DEFAULT_TEMPLATE_DIR, defaultMemoPath, writeMemo } from '../../src/memo/index.js';
import { readDocx } from './docx-text.js';
import { buildFixture } from './fixtures.js';

function ctx(cwd: string) {
  let out = '';
  let err = '';
  const c: CommandContext = {
    stdout: { write: (t: string) => (out += t) },
    stderr: { write: (t: string) => (err += t) },
    isTTY: false,
    color: false,
    cwd,
    env: {},
  };
  return { c, out: () => out, err: () => err };
}

describe('tolrate memo', () => {
  it('--help shows the usage, the flags and an example', async () => {
    const k = ctx(tmpdir());
    const code = await runCli(['memo', '--help'], k.c);
    expect(k.err()).toBe('');
    expect(code).toBe(0);
    expect(k.out()).toContain('Usage: tolrate memo FILE [--out MEMO.docx] [--template DIR]');
    expect(k.out()).toContain('--out MEMO.docx');
    expect(k.out()).toContain('--template DIR');
    expect(k.out()).toContain('Examples:');
    expect(k.out()).toContain('tolrate memo C-310.tolrate.json');
  });

  it('writes NAME.memo.docx beside the workpaper by default', async () => {
    const f = buildFixture({ variant: 'supported' });
    const k = ctx(f.dir);
    expect(await runCli(['memo', 'C-310.tolrate.json'], k.c)).toBe(0);
    const out = join(f.dir, 'C-310.memo.docx');
    expect(defaultMemoPath(f.path)).toBe(out);
    expect(k.out()).toContain(`Memo written: ${out}`);
    // Signed by the preparer only: a DRAFT until the reviewer signs off.
    expect(k.out()).toContain('- the reviewer has not signed off');
    const doc = await readDocx(readFileSync(out));
    expect(doc.text).toContain('The results support the planned reliance on control AP-03');
    expect(k.err()).toBe('');
  });

  it('--out writes where asked; --template uses the firm copy', async () => {
    const f = buildFixture({ variant: 'not-supported' });
    const tpl = join(f.dir, 'firm-memo');
    cpSync(DEFAULT_TEMPLATE_DIR, tpl, { recursive: true });
    const memo = JSON.parse(readFileSync(join(tpl, 'memo.json'), 'utf8')) as { title: string };
    memo.title = 'Controls testing memorandum ({{reference}})';
    writeFileSync(join(tpl, 'memo.json'), JSON.stringify(memo));
    const k = ctx(f.dir);
    expect(await runCli(['memo', f.path, '--out', 'review.docx', '--template', 'firm-memo'], k.c)).toBe(0);
    const doc = await readDocx(readFileSync(join(f.dir, 'review.docx')));
    expect(doc.paragraphs[0]).toBe('Controls testing memorandum (C-310)');
  });

  it('a workpaper without results gives a DRAFT memo and says what to do next', async () => {
    const f = buildFixture({ variant: 'supported', stage: 'selected' });
    const k = ctx(f.dir);
    expect(await runCli(['memo', 'C-310.tolrate.json'], k.c)).toBe(0);
    expect(k.out()).toContain('DRAFT: the memo is marked DRAFT on every page, because:');
    expect(k.out()).toContain('steps still open: Results, Evaluation and conclusion, Sign-off');
    expect(k.out()).toContain('Continue with: tolrate record C-310.tolrate.json');
    const doc = await readDocx(readFileSync(join(f.dir, 'C-310.memo.docx')));
    expect(doc.headerFooter).toContain('DRAFT');
  });

  it('bad input: exit 2 with a clear message, never a stack trace', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tolrate-memo-bad-'));
    const cases: Array<[string[], RegExp]> = [
      [['memo'], /name the workpaper file/],
      [['memo', 'missing.tolrate.json'], /No workpaper file at .*missing\.tolrate\.json/],
      [['memo', 'bad.tolrate.json'], /is not valid JSON/],
      [['memo', 'invalid.tolrate.json'], /is not a valid workpaper file/],
      [['memo', 'a.tolrate.json', 'b.tolrate.json'], /unexpected argument: b\.tolrate\.json/],
      [['memo', 'a.tolrate.json', '--outt', 'x.docx'], /unknown option --outt\. Did you mean --out\?/],
    ];
    writeFileSync(join(dir, 'bad.tolrate.json'), '{ not json');
    writeFileSync(join(dir, 'invalid.tolrate.json'), JSON.stringify({ schemaVersion: 1, tool: { name: 'tolrate', version: '1' } }));
    for (const [args, re] of cases) {
      const k = ctx(dir);
      expect(await runCli(args, k.c), args.join(' ')).toBe(2);
      expect(k.err()).toMatch(re);
      expect(k.err()).not.toMatch(/\n\s+at /);
    }
    const f = buildFixture({ variant: 'supported' });
    const more: Array<[string[], RegExp]> = [
      [['memo', f.path, '--out', join(f.dir, 'no-such-folder', 'm.docx')], /the folder .*no-such-folder does not exist/],
      [['memo', f.path, '--out', join(f.dir, 'memo.pdf')], /does not end in \.docx/],
      [['memo', f.path, '--template', join(f.dir, 'nope')], /No memo template folder/],
    ];
    for (const [args, re] of more) {
      const k = ctx(f.dir);
      expect(await runCli(args, k.c), args.join(' ')).toBe(2);
      expect(k.err()).toMatch(re);
    }
  });

  it('a template with an unknown placeholder: exit 2 naming file, key and placeholder', async () => {
    const f = buildFixture({ variant: 'supported' });
    const tpl = join(f.dir, 'firm-memo');
    cpSync(DEFAULT_TEMPLATE_DIR, tpl, { recursive: true });
    const memo = JSON.parse(readFileSync(join(tpl, 'memo.json'), 'utf8')) as { text: Record<string, string> };
    memo.text.signoff = 'Signed for {{firmName}}.';
    writeFileSync(join(tpl, 'memo.json'), JSON.stringify(memo));
    const k = ctx(f.dir);
    expect(await runCli(['memo', f.path, '--template', tpl], k.c)).toBe(2);
    expect(k.err()).toContain('memo.json, text.signoff: {{firmName}} is not a known placeholder.');
    expect(existsSync(join(f.dir, 'C-310.memo.docx'))).toBe(false);
  });
});

describe('writeMemo', () => {
  it('returns the path and size written', async () => {
    const f = buildFixture({ variant: 'supported' });
    const r = await writeMemo({ workpaper: f.wp, workpaperPath: f.path });
    expect(r.path).toBe(join(f.dir, 'C-310.memo.docx'));
    expect(r.bytes).toBe(statSync(r.path).size);
    expect(defaultMemoPath('/x/y/test.json')).toBe('/x/y/test.memo.docx');
  });
});
