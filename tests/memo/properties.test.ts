/** The memo's document properties carry the memo's own time, and the same workpaper and time give the same bytes. */
import { describe, expect, it } from 'vitest';
import { renderMemo } from '../../src/memo/index.js';
import { buildFixture } from './fixtures.js';

describe('document properties and reproducible bytes', () => {
  it('created and modified are the memo time, not the clock at packing; two renders are byte for byte equal', async () => {
    const f = buildFixture({ variant: 'supported', reviewerSigned: true });
    const at = new Date('2026-02-21T10:15:00.000Z');
    const a = await renderMemo(f.wp, { workpaperPath: f.path, now: at });
    const { default: JSZip } = await import('jszip');
    const core = await (await JSZip.loadAsync(a)).file('docProps/core.xml')!.async('string');
    expect(core).toMatch(/<dcterms:created[^>]*>2026-02-21T10:15:00Z<\/dcterms:created>/);
    expect(core).toMatch(/<dcterms:modified[^>]*>2026-02-21T10:15:00Z<\/dcterms:modified>/);
    const b = await renderMemo(f.wp, { workpaperPath: f.path, now: at });
    expect(Buffer.compare(a, b)).toBe(0);
    // The content types come first in the zip, as Word and LibreOffice expect.
    expect(Object.keys((await JSZip.loadAsync(a)).files)[0]).toBe('[Content_Types].xml');
  });
});
