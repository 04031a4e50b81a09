/**
 * The engagement summary as a DOCX (the `docx` package, as the memo): landscape A4, one Word
 * table per list with a repeated header row, and the chart of every attribute's upper limit
 * against its tolerable rate.
 */
import {
  AlignmentType,
  BorderStyle,
  Document,
  HeadingLevel,
  ImageRun,
  Packer,
  PageOrientation,
  Paragraph,
  ShadingType,
  Table,
  TableCell,
  TableLayoutType,
  TableRow,
  TextRun,
  WidthType,
} from 'docx';
import { renderPng } from '../memo/chart.js';
import { int, pct, pctLimit, pctPlain } from '../util/format.js';
import { limitChartParts } from './chart.js';
import type { SummaryModel } from './summary.js';

/** What the summary says about who judges (README: the tool computes, the practitioner judges). */
export const SUMMARY_CAUTION =
  'tolrate computes the figures and lists what the workpapers record; the practitioner judges, under the auditing standards and the firm methodology that apply. ' +
  'Classifications of deficiencies are the practitioner\'s, as recorded in each workpaper.';

const BORDER = { style: BorderStyle.SINGLE, size: 4, color: '999999' };
const HEAD_FILL = 'D9E2F3';
/** Landscape A4 in twentieths of a point, 2 cm margins. */
const PAGE = { width: 16838, height: 11906, margin: 1134 };
const TEXT_WIDTH = PAGE.width - 2 * PAGE.margin;

function cell(text: string, o: { bold?: boolean; fill?: string; width: number; right?: boolean }): TableCell {
  return new TableCell({
    width: { size: o.width, type: WidthType.DXA },
    ...(o.fill ? { shading: { fill: o.fill, type: ShadingType.CLEAR, color: 'auto' } } : {}),
    children: text.split('\n').map((line) => new Paragraph({ ...(o.right ? { alignment: AlignmentType.RIGHT } : {}), children: [new TextRun({ text: line, bold: o.bold ?? false, size: 17 })] })),
  });
}

/** A table with a repeated header row; `cols` give the header, relative width and alignment. */
function table(cols: Array<{ h: string; w: number; right?: boolean }>, rows: string[][]): Table {
  const total = cols.reduce((s, c) => s + c.w, 0);
  const ws = cols.map((c) => Math.floor((c.w / total) * TEXT_WIDTH));
  return new Table({
    width: { size: ws.reduce((s, x) => s + x, 0), type: WidthType.DXA },
    columnWidths: ws,
    layout: TableLayoutType.FIXED,
    margins: { top: 30, bottom: 30, left: 70, right: 70 },
    borders: { top: BORDER, bottom: BORDER, left: BORDER, right: BORDER, insideHorizontal: BORDER, insideVertical: BORDER },
    rows: [
      new TableRow({ tableHeader: true, cantSplit: true, children: cols.map((c, i) => cell(c.h, { bold: true, fill: HEAD_FILL, width: ws[i]!, ...(c.right ? { right: true } : {}) })) }),
      ...rows.map((r) => new TableRow({ cantSplit: true, children: r.map((t, i) => cell(t, { width: ws[i]!, ...(cols[i]!.right ? { right: true } : {}) })) })),
    ],
  });
}

const p = (text: string, o: { italic?: boolean } = {}) => new Paragraph({ spacing: { after: 120 }, children: [new TextRun({ text, italics: o.italic ?? false, size: 20 })] });
const h1 = (text: string) => new Paragraph({ heading: HeadingLevel.HEADING_1, spacing: { before: 240, after: 120 }, children: [new TextRun({ text })] });
const none = (what: string) => p(`No ${what}.`, { italic: true });

export async function renderSummaryDocx(m: SummaryModel): Promise<Buffer> {
  const ch: Array<Paragraph | Table> = [];
  ch.push(new Paragraph({ heading: HeadingLevel.TITLE, children: [new TextRun({ text: m.title })] }));
  const f = m.folder;
  if (f) {
    ch.push(p(`Engagement ${f.reference}; period ${f.periodStart} to ${f.periodEnd}. Team: ${f.team.map((t) => `${t.name} (${t.role})`).join(', ')}.`));
  }
  ch.push(p(`Written ${m.writtenAt} from ${m.counts.workpapers} workpaper file(s): ${m.counts.concluded} concluded, ${m.counts.inProgress} in progress (listed as such, not counted as concluded)${m.counts.unreadable ? `, ${m.counts.unreadable} that cannot be read` : ''}. Follow-up actions are dated against ${m.asOf}.`));
  ch.push(p(SUMMARY_CAUTION, { italic: true }));

  ch.push(h1('1. Workpapers this summary was written from'));
  ch.push(
    table(
      [{ h: 'File', w: 3 }, { h: 'Reference', w: 1.2 }, { h: 'Control', w: 1.2 }, { h: 'State', w: 1.6 }, { h: 'Review', w: 2.6 }, { h: 'State hash (SHA-256)', w: 4.2 }],
      m.sources.map((s) => [s.file, s.reference, s.control, s.state === 'in progress' ? `in progress (step reached: ${s.stepReached})` : s.state, s.problem ?? s.review, s.stateHash]),
    ),
  );

  ch.push(h1('2. Controls tested'));
  if (m.controls.length === 0) ch.push(none('controls'));
  else ch.push(table([{ h: 'Ref.', w: 0.9 }, { h: 'Control', w: 1 }, { h: 'What the control does', w: 4 }, { h: 'Approach', w: 1.3 }, { h: 'Items', w: 0.7, right: true }, { h: 'Conclusion', w: 5 }], m.controls.map((c) => [c.reference, c.control, c.description, c.approach, c.sampleSize !== undefined ? int(c.sampleSize) : '-', c.conclusion])));

  ch.push(h1('3. Results by attribute'));
  if (m.results.length === 0) ch.push(none('results'));
  else {
    ch.push(
      table(
        [{ h: 'Ref.', w: 0.9 }, { h: 'Control', w: 1 }, { h: 'Attr.', w: 0.6 }, { h: 'Attribute', w: 4 }, { h: 'Tested', w: 0.8, right: true }, { h: 'Deviations', w: 1.1, right: true }, { h: 'Sample rate', w: 0.9, right: true }, { h: 'Upper limit', w: 0.9, right: true }, { h: 'Tolerable', w: 1.0, right: true }, { h: 'Decision', w: 2 }],
        m.results.map((r) => [
          r.reference,
          r.control,
          r.attribute,
          r.description,
          int(r.sampleSize),
          int(r.deviations),
          r.sampleRate !== undefined ? pct(r.sampleRate) : '-',
          r.upperLimit !== undefined ? pctLimit(r.upperLimit, r.tolerableRate) : '-',
          r.tolerableRate !== undefined ? pctPlain(r.tolerableRate) : '-',
          r.decision,
        ]),
      ),
    );
    const rows = m.results
      .filter((r) => r.concluded && r.upperLimit !== undefined && r.tolerableRate !== undefined)
      .map((r) => ({ label: `${r.reference} ${r.attribute}`, upperLimit: r.upperLimit!, tolerableRate: r.tolerableRate!, upperLimitText: pctLimit(r.upperLimit!, r.tolerableRate!) }));
    const parts = limitChartParts(rows, { limit: 'Upper deviation limit', exceeds: 'Limit above the tolerable rate', tolerable: 'Tolerable rate' });
    for (const [i, part] of parts.entries()) {
      const png = await renderPng(part.svg, 2);
      if (!png) {
        ch.push(p('The chart could not be drawn on this machine; the figures are in the table above.', { italic: true }));
        break;
      }
      ch.push(
        new Paragraph({
          alignment: AlignmentType.CENTER,
          children: [new ImageRun({ type: 'png', data: png, transformation: { width: part.width, height: part.height }, altText: { name: `limits-${i + 1}`, title: 'Upper limits against tolerable rates', description: part.geometry.map((g) => g.label).join(', ') } })],
        }),
      );
      ch.push(p(`Chart${parts.length > 1 ? ` (part ${i + 1} of ${parts.length})` : ''}: the upper deviation limit of every attribute of every concluded test (bar) against its tolerable rate (mark), on one axis. Tests in progress are not drawn.`, { italic: true }));
    }
  }

  ch.push(h1('4. Deviations and their causes'));
  if (m.deviations.length === 0) ch.push(none('deviations'));
  else ch.push(table([{ h: 'Ref.', w: 0.9 }, { h: 'Control', w: 1 }, { h: 'Item', w: 1.2 }, { h: 'Attr.', w: 0.6 }, { h: 'What was found', w: 4 }, { h: 'Cause', w: 1.6 }, { h: 'Detail', w: 2.4 }, { h: 'Intentional', w: 0.9 }, { h: 'Pattern', w: 0.9 }], m.deviations.map((d) => [d.reference, d.control, d.item, d.attribute, d.found + (d.concluded ? '' : ' (test in progress)'), d.cause, d.causeDetail, d.intentional, d.pattern])));

  ch.push(h1('5. Deficiencies, as classified by the practitioner'));
  if (m.deficiencies.length === 0) ch.push(none('deficiencies in the concluded tests'));
  else ch.push(table([{ h: 'Ref.', w: 0.9 }, { h: 'Control', w: 1 }, { h: 'Classification', w: 1.6 }, { h: 'Reasons', w: 5 }, { h: 'Conclusion on the control', w: 5 }], m.deficiencies.map((d) => [d.reference, d.control, d.classification, d.reasons, d.controlConclusion])));

  ch.push(h1('6. Follow-up actions'));
  if (m.followUps.length === 0) ch.push(none('follow-up actions in the concluded tests'));
  else ch.push(table([{ h: 'Ref.', w: 0.9 }, { h: 'Control', w: 1 }, { h: 'Action', w: 1.6 }, { h: 'Description', w: 5 }, { h: 'Owner', w: 1.6 }, { h: 'Due', w: 1 }, { h: `As of ${m.asOf}`, w: 1 }], m.followUps.map((x) => [x.reference, x.control, x.kind, x.description, x.owner, x.due ?? '-', x.timing])));

  const doc = new Document({
    creator: 'tolrate',
    title: m.title,
    styles: { default: { document: { run: { font: 'Calibri', size: 20 } } } },
    sections: [{ properties: { page: { size: { width: PAGE.height, height: PAGE.width, orientation: PageOrientation.LANDSCAPE }, margin: { top: PAGE.margin, bottom: PAGE.margin, left: PAGE.margin, right: PAGE.margin } } }, children: ch }],
  });
  return Packer.toBuffer(doc);
}
