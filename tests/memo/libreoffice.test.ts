/**
 * The memo opens in a common word processor: LibreOffice converts it to PDF (headless), and the
 * PDF's text has the figures, whole (nothing cut off at a cell or page edge).
 * Skipped, with the reason, when `soffice` is not on PATH.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { renderMemo } from '../../src/memo/index.js';
import { buildFixture } from './fixtures.js';

function onPath(cmd: string): boolean {
  return spawnSync('sh', ['-c', `command -v ${cmd}`], { encoding: 'utf8' }).status === 0;
}

const hasSoffice = onPath('soffice');
const hasPdftotext = onPath('pdftotext');
const reason = hasSoffice ? '' : ' (skipped: soffice is not on PATH; install LibreOffice, e.g. apt-get install libreoffice-writer-nogui)';

function toPdf(docx: string, outDir: string): string {
  // A private profile, so that a LibreOffice already running for someone else does not interfere.
  const profile = pathToFileURL(mkdtempSync(join(tmpdir(), 'tolrate-lo-profile-'))).href;
  execFileSync('soffice', [`-env:UserInstallation=${profile}`, '--headless', '--convert-to', 'pdf', '--outdir', outDir, docx], { stdio: 'pipe', timeout: 120000 });
  const pdf = join(outDir, readdirSync(outDir).find((f) => f.endsWith('.pdf'))!);
  return pdf;
}

describe(`LibreOffice opens the memo${reason}`, () => {
  it.skipIf(!hasSoffice)('converts it to PDF with every figure whole', { timeout: 120000 }, async () => {
    const f = buildFixture({ variant: 'not-supported' });
    const docx = join(f.dir, 'C-310.memo.docx');
    writeFileSync(docx, await renderMemo(f.wp, { workpaperPath: f.path }));
    const outDir = mkdtempSync(join(tmpdir(), 'tolrate-lo-out-'));
    const pdf = toPdf(docx, outDir);
    expect(existsSync(pdf)).toBe(true);
    if (!hasPdftotext) return; // the conversion alone shows it opens; the text check needs poppler-utils
    const text = execFileSync('pdftotext', ['-layout', pdf, '-'], { encoding: 'utf8' });
    // A4 pages: 595 × 842 pt (ISO 216).
    const info = execFileSync('pdfinfo', [pdf], { encoding: 'utf8' });
    expect(info).toMatch(/Page size:\s+595\.\d+ x 841\.\d+ pts \(A4\)/);
    const pages = Number(/Pages:\s+(\d+)/.exec(info)![1]);
    expect(pages).toBeGreaterThanOrEqual(6);
    expect(pages).toBeLessThanOrEqual(12);
    // The SHA-256 on one line, in the fingerprint table: nothing cut off at the cell edge.
    expect(text).toContain(f.populationSha256);
    // 7.9% and 14.7%: the limit and risk for 2 deviations in 78 at 95% / 6%, as checked against
    // @stdlib in content.test.ts.
    for (const s of ['Test of controls by attribute sampling', '6. Results by attribute', 'Appendix A', 'Appendix B', '7.9%', '14.7%', 'Page 1 of']) {
      expect(text).toContain(s);
    }
    for (const item of f.wp.results!.items) {
      // Cell text wraps across lines in the PDF; the keys of the deviating items are single words.
      for (const [id, r] of Object.entries(item.attributes)) {
        if (r.result === 'deviation') expect(text).toMatch(new RegExp(`${item.key}\\s+${id}\\s+${r.found.split(' ')[0]}`));
      }
    }
    // Every selected item key is in the PDF (the appendix table is not cut at the page edge).
    for (const it of f.wp.selection!.items) expect(text).toContain(it.key);
  });
});
