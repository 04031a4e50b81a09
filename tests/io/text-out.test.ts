/**
 * Text goes out clean: characters XML 1.0 forbids never reach a DOCX or XLSX (and the memo says
 * what was removed), the memo's XML is parsed, `reperform --memo` parses it too; text from files
 * is shown on the terminal with its control characters written out; the population check names
 * keys with control characters.
 *
 * The allowed characters are those of XML 1.0 (Fifth Edition), W3C Recommendation, section 2.2
 * production [2] Char: #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF].
 */
import { describe, expect, it } from 'vitest';
import { cpSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import JSZip from 'jszip';
import { runCli } from '../../src/cli/main.js';
import { xmlSafe, visible, hasControl } from '../../src/io/text.js';
import { xmlProblem, zipXmlProblems } from '../../src/io/xml.js';
import { DEFAULT_TEMPLATE_DIR, renderMemo } from '../../src/memo/index.js';
import { readDocx } from '../memo/docx-text.js';
import { buildFixture } from '../memo/fixtures.js';
import { captureContext, tempDir } from '../fixtures/interview.js';

describe('xmlSafe', () => {
  it('removes exactly the characters XML 1.0 forbids', () => {
    // Forbidden (section 2.2): C0 controls but tab, LF, CR; U+FFFE; U+FFFF; lone surrogates.
    const bad = '\u0000\u0001\u0008\u000B\u000C\u000E\u001F\uFFFE\uFFFF\uDFFF\uD800';
    expect(xmlSafe(`a${bad}b`)).toEqual({ text: 'ab', removed: 11 });
    // Allowed: tab, LF, CR, U+0085, U+FFFD, a surrogate pair (U+1F600), U+E000.
    const good = '\t\n\r\u0085\uFFFD\uD83D\uDE00\uE000 é';
    expect(xmlSafe(good)).toEqual({ text: good, removed: 0 });
    expect(xmlProblem(`<a>${good}</a>`)).toBeUndefined();
    expect(xmlProblem('<a>\uFFFE</a>')).toMatch(/does not parse at line 1, column/);
  });
});

describe('the memo', () => {
  it('with U+FFFE/U+FFFF in a finding and in the template: the XML parses and the appendix says what was removed', async () => {
    // The case found: such a memo did not parse ("Memo written", exit 0) and reperform --memo agreed.
    const f = buildFixture({
      variant: 'supported',
      deviations: [{ at: 17, attributeId: 'A2', result: { result: 'deviation', found: 'GRN dated after\uFFFE approval\uFFFF', cause: 'performed-late', intentional: 'no', pattern: 'isolated' } }],
    });
    const t = join(f.dir, 'tpl');
    cpSync(DEFAULT_TEMPLATE_DIR, t, { recursive: true });
    const memo = JSON.parse(readFileSync(join(t, 'memo.json'), 'utf8')) as { title: string };
    memo.title = `${memo.title}\u0007`;
    writeFileSync(join(t, 'memo.json'), JSON.stringify(memo, null, 2));
    const ctx = captureContext(f.dir, false);
    expect(await runCli(['memo', f.path, '--template', t, '--out', 'm.docx'], ctx)).toBe(0);
    const buf = readFileSync(join(f.dir, 'm.docx'));
    expect(await zipXmlProblems(buf)).toEqual([]);
    const doc = await readDocx(buf);
    expect(doc.text).toContain('GRN dated after approval');
    expect(doc.text).toMatch(/3 character\(s\) that a Word document cannot hold .* were left out of this memo: workpaper results\.items\[\d+\]\.attributes\.A2\.found \(2\); template memo\.title \(1\)/);
    const rp = captureContext(f.dir, false);
    expect(await runCli(['reperform', f.path, '--memo', 'm.docx'], rp)).toBe(0);
  });

  it('reperform --memo: a memo whose XML does not parse is a difference', async () => {
    const f = buildFixture({ variant: 'supported' });
    const good = await renderMemo(f.wp, { workpaperPath: f.path });
    const zip = await JSZip.loadAsync(good);
    const xml = await zip.file('word/document.xml')!.async('string');
    zip.file('word/document.xml', xml.replace('</w:body>', '<w:p><w:r><w:t>\uFFFF</w:t></w:r></w:p></w:body>'));
    writeFileSync(join(f.dir, 'bad.docx'), await zip.generateAsync({ type: 'nodebuffer' }));
    const ctx = captureContext(f.dir, false);
    expect(await runCli(['reperform', f.path, '--memo', 'bad.docx'], ctx)).toBe(1);
    const flat = ctx.text().replace(/\s+/g, ' ');
    expect(flat).toMatch(/memo DIFFERS .*bad\.docx: cannot be read/);
    expect(flat).toMatch(/bad\.docx does not parse as XML: \d+:\d+: disallowed character/);
  });

  it('a styles.docx whose styles do not parse is refused with a message (exit 2), not an internal error', async () => {
    const f = buildFixture({ variant: 'supported' });
    const t = join(f.dir, 'tpl');
    cpSync(DEFAULT_TEMPLATE_DIR, t, { recursive: true });
    const zip = new JSZip();
    zip.file('word/styles.xml', '<w:styles xmlns:w="http://schemas.openxmlformats.org/wordprocessingml/2006/main"><w:style>');
    writeFileSync(join(t, 'styles.docx'), await zip.generateAsync({ type: 'nodebuffer' }));
    const ctx = captureContext(f.dir, false);
    expect(await runCli(['memo', f.path, '--template', t], ctx)).toBe(2);
    expect(ctx.err.join('')).toMatch(/styles\.docx is damaged: word\/styles\.xml does not parse/);
    writeFileSync(join(t, 'styles.docx'), 'not a zip');
    const ctx2 = captureContext(f.dir, false);
    expect(await runCli(['memo', f.path, '--template', t], ctx2)).toBe(2);
    expect(ctx2.err.join('')).toContain('is not a Word document (.docx)');
  });
});

describe('text from files on the terminal', () => {
  it('visible writes control and escape characters out', () => {
    expect(visible('INV-1\u001b]0;owned\u0007')).toBe('INV-1\\x1b]0;owned\\x07');
    expect(visible('a\u001b[8mhidden')).toBe('a\\x1b[8mhidden');
    expect(visible('a\tb\nc', { keepLines: true })).toBe('a\tb\nc');
    expect(visible('a\tb\nc')).toBe('a\\tb\\nc');
    expect(visible('\u202Egnp.exe')).toBe('\\u202egnp.exe');
    expect(hasControl('plain ünïcode')).toBe(false);
  });

  it("the terminal answerer shows a question's message and its choices with control characters written out", async () => {
    const { TerminalAsker } = await import('../../src/interview/terminal.js');
    const seen: Array<{ message: string; choices?: Array<{ name: string }> }> = [];
    const asker = new TerminalAsker({ out: { write: () => undefined }, color: false });
    // The prompts library is replaced by one that records what it would draw.
    (asker as unknown as { prompts: unknown }).prompts = {
      select: async (c: { message: string; choices: Array<{ name: string; value: string }> }) => {
        seen.push(c);
        return c.choices[0]!.value;
      },
      confirm: async (c: { message: string }) => {
        seen.push(c);
        return true;
      },
      input: async (c: { message: string }) => {
        seen.push(c);
        return 'x';
      },
    };
    await asker.select({ id: 't', message: 'Item K-1\u001b]0;pwned\u0007', choices: [{ value: 'a', name: 'K-2\u001b[8m' }] });
    await asker.confirm({ id: 'c', message: 'Remove \u001b[2J?' });
    await asker.text({ id: 'x', message: 'Key \u009b31m', parse: (t) => t });
    expect(seen.map((q) => q.message)).toEqual(['Item K-1\\x1b]0;pwned\\x07', 'Remove \\x1b[2J?', 'Key \\x9b31m']);
    expect(seen[0]!.choices![0]!.name).toBe('K-2\\x1b[8m');
  });

  it('select: keys with escape sequences are shown written out, and the population check reports them', async () => {
    // The case found: keys were printed raw (a key could retitle the window or hide text) and not reported.
    const dir = tempDir();
    const rows = ['key,amount'];
    for (let i = 1; i <= 30; i++) rows.push(`K-${i},${i}.00`);
    rows[1] = 'K-1\u001b]0;pwned\u0007,1.00';
    rows[5] = '"K-5\u001b[8m",5.00';
    writeFileSync(join(dir, 'pop.csv'), `${rows.join('\n')}\n`);
    const ctx = captureContext(dir, false);
    const code = await runCli(['select', '--population', 'pop.csv', '--key', 'key', '--size', '30', '--seed', 's', '--out', 'sheet.csv', '--accept-issues'], ctx);
    expect(code).toBe(0);
    const all = ctx.out.join('') + ctx.err.join('');
    expect(all).not.toContain('\u001b');
    expect(all).toContain('K-1\\x1b]0;pwned\\x07');
    expect(all).toMatch(/2 keys hold control or escape characters.*line 2 "K-1\\x1b\]0;pwned\\x07"; line 6 "K-5\\x1b\[8m"/s);
  });
});
