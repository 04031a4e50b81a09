/**
 * Reading a memo back: the body of a DOCX as a list of blocks (paragraphs with their style, and
 * tables as rows of cell texts), parsed with a strict XML parser, so that a memo can be compared
 * with one rendered afresh from the workpaper, section by section and cell by cell.
 */
import { FileInputError } from '../errors.js';

export type MemoBlock =
  | { kind: 'paragraph'; style: string | undefined; text: string }
  | { kind: 'table'; rows: string[][] };

/** The blocks of a DOCX body, in order. Throws FileInputError when it is not a DOCX or its XML does not parse. */
export async function readMemoBlocks(data: Uint8Array, name = 'the memo'): Promise<MemoBlock[]> {
  const { default: JSZip } = await import('jszip');
  let xml: string | undefined;
  try {
    const zip = await JSZip.loadAsync(data);
    xml = await zip.file('word/document.xml')?.async('string');
  } catch {
    xml = undefined;
  }
  if (xml === undefined) throw new FileInputError(name, `${name} is not a DOCX file (no word/document.xml inside).`);
  return blocksOf(xml, name);
}

/** Parse a WordprocessingML body into blocks. */
export async function blocksOf(xml: string, name = 'the memo'): Promise<MemoBlock[]> {
  const { SaxesParser } = await import('saxes');
  const parser = new SaxesParser({ xmlns: false });
  const blocks: MemoBlock[] = [];
  let depthTable = 0;
  let rows: string[][] = [];
  let row: string[] | undefined;
  let cell: string[] | undefined;
  let para: { style: string | undefined; text: string } | undefined;
  let inText = false;
  let error: Error | undefined;
  parser.on('error', (e) => {
    error ??= e;
  });
  parser.on('opentag', (t) => {
    switch (t.name) {
      case 'w:tbl':
        depthTable++;
        if (depthTable === 1) rows = [];
        break;
      case 'w:tr':
        if (depthTable === 1) row = [];
        break;
      case 'w:tc':
        if (depthTable === 1) cell = [];
        break;
      case 'w:p':
        para = { style: undefined, text: '' };
        break;
      case 'w:pStyle':
        if (para) para.style = String(t.attributes['w:val'] ?? '');
        break;
      case 'w:t':
        inText = true;
        break;
      case 'w:tab':
        if (para && !inText) para.text += '\t';
        break;
      case 'w:br':
        if (para) para.text += '\n';
        break;
    }
  });
  parser.on('text', (text) => {
    if (inText && para) para.text += text;
  });
  parser.on('closetag', (t) => {
    switch (t.name) {
      case 'w:t':
        inText = false;
        break;
      case 'w:p':
        if (para) {
          if (cell) cell.push(para.text);
          else if (depthTable === 0) blocks.push({ kind: 'paragraph', style: para.style, text: para.text });
        }
        para = undefined;
        break;
      case 'w:tc':
        if (depthTable === 1 && row && cell) row.push(cell.join('\n'));
        cell = undefined;
        break;
      case 'w:tr':
        if (depthTable === 1 && row) rows.push(row);
        row = undefined;
        break;
      case 'w:tbl':
        depthTable--;
        if (depthTable === 0) blocks.push({ kind: 'table', rows });
        break;
    }
  });
  try {
    parser.write(xml).close();
  } catch (e) {
    error ??= e as Error;
  }
  if (error) throw new FileInputError(name, `${name} does not parse as XML: ${error.message.split('\n')[0]}`);
  return blocks;
}

export interface MemoDifference {
  section: string;
  where: string;
  memo: string;
  expected: string;
}

const isHeading = (b: MemoBlock): boolean => b.kind === 'paragraph' && /^(Heading1|Title)$/.test(b.style ?? '');

function sections(blocks: readonly MemoBlock[]): Array<{ title: string; blocks: MemoBlock[] }> {
  const out: Array<{ title: string; blocks: MemoBlock[] }> = [{ title: '(before the first section)', blocks: [] }];
  for (const b of blocks) {
    if (isHeading(b)) out.push({ title: (b as { text: string }).text, blocks: [] });
    else if (!(b.kind === 'paragraph' && b.text.trim() === '')) out[out.length - 1]!.blocks.push(b);
  }
  return out;
}

const clip = (t: string) => {
  const x = t.replace(/\s+/g, ' ').trim();
  return x.length > 160 ? `${x.slice(0, 157)}...` : x;
};

/**
 * Every difference between a memo and the memo the workpaper gives, section by section: a
 * section missing or added, a paragraph changed, a table cell changed (with its row and column
 * header), a table with rows added or removed.
 */
export function compareMemoBlocks(memo: readonly MemoBlock[], expected: readonly MemoBlock[]): MemoDifference[] {
  const diffs: MemoDifference[] = [];
  const a = sections(memo);
  const e = sections(expected);
  const titles = new Set(a.map((s) => s.title));
  for (const s of e) if (!titles.has(s.title)) diffs.push({ section: s.title, where: 'section', memo: '(missing)', expected: s.title });
  const wanted = new Set(e.map((s) => s.title));
  for (const s of a) if (!wanted.has(s.title)) diffs.push({ section: s.title, where: 'section', memo: s.title, expected: '(no such section)' });
  for (const se of e) {
    const sa = a.find((s) => s.title === se.title);
    if (!sa) continue;
    const paras = (x: MemoBlock[]) => x.filter((b): b is Extract<MemoBlock, { kind: 'paragraph' }> => b.kind === 'paragraph');
    const tables = (x: MemoBlock[]) => x.filter((b): b is Extract<MemoBlock, { kind: 'table' }> => b.kind === 'table');
    const pa = paras(sa.blocks);
    const pe = paras(se.blocks);
    for (let i = 0; i < Math.max(pa.length, pe.length); i++) {
      const x = pa[i]?.text ?? '(missing)';
      const y = pe[i]?.text ?? '(not in the workpaper\'s memo)';
      if (x.replace(/\s+/g, ' ').trim() !== y.replace(/\s+/g, ' ').trim()) diffs.push({ section: se.title, where: `paragraph ${i + 1}`, memo: clip(x), expected: clip(y) });
    }
    const ta = tables(sa.blocks);
    const te = tables(se.blocks);
    for (let t = 0; t < Math.max(ta.length, te.length); t++) {
      const A = ta[t];
      const E = te[t];
      if (!A || !E) {
        diffs.push({ section: se.title, where: `table ${t + 1}`, memo: A ? 'a table' : '(missing)', expected: E ? 'a table' : '(no such table)' });
        continue;
      }
      const header = E.rows[0] ?? [];
      for (let r = 0; r < Math.max(A.rows.length, E.rows.length); r++) {
        const ra = A.rows[r];
        const re = E.rows[r];
        if (!ra || !re) {
          diffs.push({ section: se.title, where: `table ${t + 1}, row ${r + 1}`, memo: ra ? clip(ra.join(' | ')) : '(missing)', expected: re ? clip(re.join(' | ')) : '(no such row)' });
          continue;
        }
        for (let c = 0; c < Math.max(ra.length, re.length); c++) {
          const x = ra[c] ?? '(missing)';
          const y = re[c] ?? '(no such cell)';
          if (x.replace(/\s+/g, ' ').trim() !== y.replace(/\s+/g, ' ').trim()) {
            const col = header[c] && r > 0 ? ` ("${clip(header[c]!)}")` : '';
            const rowName = r > 0 && ra[0] ? ` (${clip(ra[0])})` : '';
            diffs.push({ section: se.title, where: `table ${t + 1}, row ${r + 1}${rowName}, column ${c + 1}${col}`, memo: clip(x), expected: clip(y) });
          }
        }
      }
    }
  }
  return diffs;
}
