/** Read a DOCX back for tests: its parts and the text of its paragraphs. */
import JSZip from 'jszip';

export interface DocxText {
  /** word/document.xml as written. */
  xml: string;
  /** The text of each paragraph of the body, in order (runs joined). */
  paragraphs: string[];
  /** All body text, paragraphs joined with newlines. */
  text: string;
  /** The text of the page headers and footers. */
  headerFooter: string;
  files: string[];
  zip: JSZip;
}

function decode(s: string): string {
  return s
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&quot;/g, '"')
    .replace(/&apos;/g, "'")
    .replace(/&#(\d+);/g, (_, d: string) => String.fromCodePoint(Number(d)))
    .replace(/&amp;/g, '&');
}

export function paragraphsOf(xml: string): string[] {
  const out: string[] = [];
  for (const m of xml.matchAll(/<w:p[ >][\s\S]*?<\/w:p>/g)) {
    const t = [...m[0].matchAll(/<w:t(?: [^>]*)?>([^<]*)<\/w:t>|<w:tab\/>/g)].map((x) => (x[0] === '<w:tab/>' ? '\t' : decode(x[1] ?? ''))).join('');
    out.push(t);
  }
  return out;
}

export async function readDocx(buf: Buffer | Uint8Array): Promise<DocxText> {
  const zip = await JSZip.loadAsync(buf);
  const files = Object.keys(zip.files);
  const xml = await zip.file('word/document.xml')!.async('string');
  const paragraphs = paragraphsOf(xml);
  const hf: string[] = [];
  for (const f of files.filter((x) => /^word\/(header|footer)\d*\.xml$/.test(x))) {
    hf.push(...paragraphsOf(await zip.file(f)!.async('string')));
  }
  return { xml, paragraphs, text: paragraphs.join('\n'), headerFooter: hf.join('\n'), files, zip };
}

/** The tables of a part: table → rows → cell texts (a cell's paragraphs joined by newlines). */
export function tablesOf(xml: string): string[][][] {
  const tables: string[][][] = [];
  for (const t of xml.matchAll(/<w:tbl>[\s\S]*?<\/w:tbl>/g)) {
    const rows: string[][] = [];
    for (const r of t[0].matchAll(/<w:tr[ >][\s\S]*?<\/w:tr>/g)) {
      rows.push([...r[0].matchAll(/<w:tc>[\s\S]*?<\/w:tc>/g)].map((c) => paragraphsOf(c[0]).join('\n')));
    }
    tables.push(rows);
  }
  return tables;
}

/** The first table whose header row has all these cells (exactly). */
export function findTable(xml: string, headers: string[]): string[][] {
  const t = tablesOf(xml).find((rows) => headers.every((h) => rows[0]?.includes(h)));
  if (!t) throw new Error(`no table with headers ${headers.join(', ')}`);
  return t;
}

/** A row of a table as header -> cell. */
export function rowByFirstCell(table: string[][], first: string): Record<string, string> {
  const header = table[0]!;
  const row = table.find((r, i) => i > 0 && r[0] === first);
  if (!row) throw new Error(`no row ${first}`);
  return Object.fromEntries(header.map((h, i) => [h, row[i] ?? '']));
}
