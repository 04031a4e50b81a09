/**
 * The memo as a Word document: Heading styles, real tables with fixed widths inside the page and
 * repeated header rows, the reference in the page header, page numbers in the footer, the page
 * size and margins, and the picture embedded as a PNG with a text alternative.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { renderMemo } from '../../src/memo/index.js';
import { readDocx, type DocxText } from './docx-text.js';
import { buildFixture } from './fixtures.js';

// A4 is 210 × 297 mm = 11906 × 16838 twips; 2 cm margins = 1134 twips (ISO 216; 1 inch = 1440 twips).
const A4 = { w: 11906, h: 16838, margin: 1134 };
const CONTENT = A4.w - 2 * A4.margin;

let doc: DocxText;
beforeAll(async () => {
  const f = buildFixture({ variant: 'not-supported' });
  doc = await readDocx(await renderMemo(f.wp, { workpaperPath: f.path }));
});

describe('the memo document', () => {
  it('uses Heading styles for its sections and the Title style for its title', () => {
    const h1 = doc.xml.match(/<w:pStyle w:val="Heading1"\/>/g) ?? [];
    const h2 = doc.xml.match(/<w:pStyle w:val="Heading2"\/>/g) ?? [];
    expect(h1.length).toBe(17); // 14 numbered sections (amendments after sign-off the last) + 3 appendices
    expect(h2.length).toBeGreaterThanOrEqual(8);
    expect(doc.xml).toContain('<w:pStyle w:val="Title"/>');
    expect(doc.paragraphs).toContain('1. Objective and control');
    expect(doc.paragraphs).toContain('10. Follow-up actions');
    expect(doc.paragraphs).toContain('Appendix A — Items selected and their results');
  });

  it('is A4 with 2 cm margins', () => {
    expect(doc.xml).toMatch(new RegExp(`<w:pgSz w:w="${A4.w}" w:h="${A4.h}"`));
    expect(doc.xml).toMatch(new RegExp(`<w:pgMar w:top="${A4.margin}" w:right="${A4.margin}" w:bottom="${A4.margin}" w:left="${A4.margin}"`));
  });

  it('has real tables with fixed layout, exact widths inside the page, and header rows that repeat', () => {
    const tables = [...doc.xml.matchAll(/<w:tbl>[\s\S]*?<\/w:tbl>/g)].map((m) => m[0]);
    expect(tables.length).toBeGreaterThan(15);
    let withHeader = 0;
    for (const t of tables) {
      expect(t).toContain('<w:tblLayout w:type="fixed"/>');
      const w = Number(/<w:tblW w:type="dxa" w:w="(\d+)"\/>|<w:tblW w:w="(\d+)" w:type="dxa"\/>/.exec(t)!.slice(1).find(Boolean));
      const grid = [...t.matchAll(/<w:gridCol w:w="(\d+)"\/>/g)].map((m) => Number(m[1]));
      expect(grid.reduce((s, x) => s + x, 0)).toBe(w);
      expect(w).toBeLessThanOrEqual(CONTENT);
      const rows = [...t.matchAll(/<w:tr[ >][\s\S]*?<\/w:tr>/g)].map((m) => m[0]);
      rows.forEach((r, i) => {
        if (r.includes('<w:tblHeader/>')) expect(i).toBe(0);
      });
      if (rows[0]!.includes('<w:tblHeader/>')) withHeader++;
    }
    // Every table with column headings repeats them: results, deviations, items, follow-ups...
    expect(withHeader).toBeGreaterThanOrEqual(10);
    const items = tables.find((t) => t.includes('Void / replacement'))!;
    expect(items).toContain('<w:tblHeader/>');
    expect(items).toContain('<w:cantSplit/>');
  });

  it('has the workpaper reference in the page header and page numbers in the footer', async () => {
    const headers = doc.files.filter((f) => /^word\/header\d*\.xml$/.test(f));
    const footers = doc.files.filter((f) => /^word\/footer\d*\.xml$/.test(f));
    expect(headers.length).toBeGreaterThan(0);
    expect(footers.length).toBeGreaterThan(0);
    const header = await doc.zip.file(headers[0]!)!.async('string');
    const footer = await doc.zip.file(footers[0]!)!.async('string');
    expect(header).toContain('C-310');
    expect(footer).toMatch(/PAGE/);
    expect(footer).toMatch(/NUMPAGES/);
    expect(doc.headerFooter).toMatch(/Page .* of /);
  });

  it('embeds the picture as a PNG with the figures as its text alternative', async () => {
    const media = doc.files.filter((f) => f.startsWith('word/media/'));
    expect(media).toHaveLength(1);
    const png = await doc.zip.file(media[0]!)!.async('uint8array');
    expect([...png.slice(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    const descr = /<wp:docPr [^>]*descr="([^"]*)"/.exec(doc.xml)![1]!;
    expect(descr).toContain('A1: Sample deviation rate 2.6%, Upper deviation limit 7.9%, Tolerable rate 6.0%');
  });

  it('carries a title in its properties', async () => {
    const core = await doc.zip.file('docProps/core.xml')!.async('string');
    expect(core).toContain('Test of controls by attribute sampling — C-310');
  });
});
