/**
 * The DOCX memo, built with the `docx` package from the memo model and the template wording.
 * Real Word tables with fixed widths and repeated header rows, Heading styles, the workpaper
 * reference in the page header, page numbers in the footer, A4 or Letter with 2 cm / 1 inch margins.
 */
import {
  AlignmentType,
  BorderStyle,
  Document,
  Footer,
  Header,
  HeadingLevel,
  HeightRule,
  ImageRun,
  LevelFormat,
  LineRuleType,
  Packer,
  PageNumber,
  Paragraph,
  ShadingType,
  Tab,
  Table,
  TableCell,
  TableLayoutType,
  TableRow,
  TabStopType,
  TextRun,
  VerticalAlignTable,
  WidthType,
  type IParagraphOptions,
} from 'docx';
import { int, pct, pctLimit, pctPlain, pctUp } from '../util/format.js';
import { chartSvg, ocSvg, renderPng, spreadSvg, type ChartRow, type OcCurve } from './chart.js';
import { acceptanceNumber, operatingCharacteristic } from '../stats/index.js';
import { exact, formatAmount, type MemoModel } from './model.js';
import { fill, type MemoTemplate } from './template.js';
import { REVIEW_SECTION_LABELS } from '../control-test/index.js';

const PAPER = {
  A4: { width: 11906, height: 16838, margin: 1134 },
  Letter: { width: 12240, height: 15840, margin: 1440 },
} as const;

const BORDER = { style: BorderStyle.SINGLE, size: 4, color: 'A6A6A6' } as const;
const HEAD_FILL = 'DCE3EC';
const LABEL_FILL = 'F2F4F7';
const ACCENT = '1F3864';
const MONO = 'Courier New';

type Align = 'left' | 'right' | 'center';
interface Col {
  header: string;
  /** Relative width. */
  w: number;
  align?: Align;
}
interface CellSpec {
  text?: string;
  paragraphs?: Paragraph[];
  bold?: boolean;
  italics?: boolean;
  mono?: boolean;
  fill?: string;
  align?: Align;
}
type Cell = string | CellSpec;

const ALIGN = { left: AlignmentType.LEFT, right: AlignmentType.RIGHT, center: AlignmentType.CENTER } as const;

/** Text with **bold** marks as runs. */
function runs(text: string, base: { size?: number | undefined; bold?: boolean | undefined; italics?: boolean | undefined; font?: string | undefined; color?: string | undefined } = {}): TextRun[] {
  const parts = text.split(/\*\*/);
  return parts
    .map((t, i) => ({ t, bold: i % 2 === 1 }))
    .filter((x) => x.t !== '')
    .map(({ t, bold }) => {
      const o: { text: string; bold?: boolean; italics?: boolean; size?: number; font?: string; color?: string } = { text: t };
      if (base.bold || bold) o.bold = true;
      if (base.italics) o.italics = true;
      if (base.size !== undefined) o.size = base.size;
      if (base.font !== undefined) o.font = base.font;
      if (base.color !== undefined) o.color = base.color;
      return new TextRun(o);
    });
}

class Builder {
  readonly children: Array<Paragraph | Table> = [];
  private section = 0;
  readonly width: number;
  constructor(
    private readonly t: MemoTemplate,
    private readonly m: MemoModel,
    readonly values: Record<string, string | undefined>,
  ) {
    this.width = PAPER[t.memo.settings.paper].width - 2 * PAPER[t.memo.settings.paper].margin;
  }

  get L() {
    return this.t.memo.labels;
  }

  /** Fill a template text with the memo's values (and extra, per-attribute ones). */
  f(text: string, extra: Record<string, string | undefined> = {}): string {
    return fill(text, { ...this.values, ...extra }, this.L.notRecorded);
  }

  p(text: string, o: Omit<IParagraphOptions, 'children' | 'text'> & { bold?: boolean; italics?: boolean; size?: number } = {}): Paragraph {
    const { bold, italics, size, ...rest } = o;
    const para = new Paragraph({ ...rest, children: runs(text, { bold, italics, size }) });
    this.children.push(para);
    return para;
  }

  /** A paragraph per text (a template value may be one paragraph or several). */
  ps(text: string | string[], extra: Record<string, string | undefined> = {}): void {
    for (const x of Array.isArray(text) ? text : [text]) this.p(this.f(x, extra));
  }

  h1(text: string, o: { pageBreakBefore?: boolean; numbered?: boolean } = {}): number {
    const numbered = o.numbered ?? true;
    if (numbered) this.section++;
    const label = numbered && this.t.memo.settings.numberHeadings ? `${this.section}. ${text}` : text;
    this.children.push(new Paragraph({ heading: HeadingLevel.HEADING_1, pageBreakBefore: o.pageBreakBefore, keepNext: true, children: [new TextRun(label)] }));
    return this.section;
  }

  h2(text: string): void {
    this.children.push(new Paragraph({ heading: HeadingLevel.HEADING_2, keepNext: true, children: [new TextRun(text)] }));
  }

  note(text: string): void {
    this.p(text, { italics: true, style: 'MemoNote' });
  }

  cellParagraphs(c: Cell, align: Align | undefined, size: number): Paragraph[] {
    const spec: CellSpec = typeof c === 'string' ? { text: c } : c;
    if (spec.paragraphs) return spec.paragraphs;
    const lines = (spec.text ?? '').split('\n');
    // The size comes from a table paragraph style where one fits, to keep the XML small.
    const style = size === (this.t.memo.settings.fontSize - 1) * 2 ? 'TableText' : size === 16 ? 'TableSmall' : size === 14 ? 'TableTiny' : 'TableText';
    const runSize = style === 'TableText' && size !== (this.t.memo.settings.fontSize - 1) * 2 ? size : undefined;
    const a = spec.align ?? align ?? 'left';
    return lines.map(
      (line) =>
        new Paragraph({
          style,
          ...(a !== 'left' ? { alignment: ALIGN[a] } : {}),
          children: runs(line, { size: runSize, bold: spec.bold, italics: spec.italics, font: spec.mono ? MONO : undefined }),
        }),
    );
  }

  widths(cols: readonly { w: number }[], total = this.width): number[] {
    const sum = cols.reduce((s, c) => s + c.w, 0);
    const ws = cols.map((c) => Math.floor((c.w / sum) * total));
    ws[ws.length - 1]! += total - ws.reduce((s, x) => s + x, 0);
    return ws;
  }

  /** A table with a repeated header row. */
  table(cols: Col[], rows: Cell[][], o: { size?: number; total?: number } = {}): Table {
    const size = o.size ?? (this.t.memo.settings.fontSize - 1) * 2;
    const ws = this.widths(cols, o.total);
    const header = new TableRow({
      tableHeader: true,
      cantSplit: true,
      children: cols.map(
        (c, i) =>
          new TableCell({
            width: { size: ws[i]!, type: WidthType.DXA },
            shading: { fill: HEAD_FILL, type: ShadingType.CLEAR, color: 'auto' },
            verticalAlign: VerticalAlignTable.BOTTOM,
            children: this.cellParagraphs({ text: c.header, bold: true }, c.align, size),
          }),
      ),
    });
    const body = rows.map(
      (r) =>
        new TableRow({
          cantSplit: true,
          children: r.map((c, i) => {
            const spec = typeof c === 'string' ? undefined : c;
            return new TableCell({
              width: { size: ws[i]!, type: WidthType.DXA },
              ...(spec?.fill ? { shading: { fill: spec.fill, type: ShadingType.CLEAR, color: 'auto' } } : {}),
              children: this.cellParagraphs(c, cols[i]?.align, size),
            });
          }),
        }),
    );
    const t = new Table({
      width: { size: ws.reduce((s, x) => s + x, 0), type: WidthType.DXA },
      columnWidths: ws,
      layout: TableLayoutType.FIXED,
      margins: { top: 40, bottom: 40, left: 90, right: 90 },
      borders: { top: BORDER, bottom: BORDER, left: BORDER, right: BORDER, insideHorizontal: BORDER, insideVertical: BORDER },
      rows: [header, ...body],
    });
    this.children.push(t);
    this.spacer();
    return t;
  }

  /** A two-column table of labels and values (no header row). */
  kv(rows: Array<[string, Cell | undefined]>, o: { labelWidth?: number } = {}): void {
    const size = (this.t.memo.settings.fontSize - 1) * 2;
    const ws = this.widths([{ w: o.labelWidth ?? 1.7 }, { w: 4.8 }]);
    const shown = rows.filter((r): r is [string, Cell] => r[1] !== undefined);
    if (shown.length === 0) return;
    this.children.push(
      new Table({
        width: { size: this.width, type: WidthType.DXA },
        columnWidths: ws,
        layout: TableLayoutType.FIXED,
        margins: { top: 40, bottom: 40, left: 90, right: 90 },
        borders: { top: BORDER, bottom: BORDER, left: BORDER, right: BORDER, insideHorizontal: BORDER, insideVertical: BORDER },
        rows: shown.map(
          ([label, value]) =>
            new TableRow({
              cantSplit: true,
              children: [
                new TableCell({
                  width: { size: ws[0]!, type: WidthType.DXA },
                  shading: { fill: LABEL_FILL, type: ShadingType.CLEAR, color: 'auto' },
                  children: this.cellParagraphs({ text: label, bold: true }, 'left', size),
                }),
                new TableCell({ width: { size: ws[1]!, type: WidthType.DXA }, children: this.cellParagraphs(value, 'left', size) }),
              ],
            }),
        ),
      }),
    );
    this.spacer();
  }

  spacer(): void {
    this.children.push(new Paragraph({ style: 'Spacer', children: [] }));
  }

  bullets(texts: string[]): void {
    for (const x of texts) this.children.push(new Paragraph({ bullet: { level: 0 }, children: runs(x) }));
  }

  steps(texts: string[]): void {
    for (const x of texts) this.children.push(new Paragraph({ numbering: { reference: 'steps', level: 0 }, children: runs(x) }));
  }

  /** The value or the 'not recorded' label. */
  v(x: string | undefined): string {
    return x === undefined || x === '' ? this.L.notRecorded : x;
  }
}

/**
 * Width in twips of an Appendix A result column: the longest word at 8 pt bold, taken at 0.6 em a
 * character (wider than the average bold sans-serif letter), plus the cell margins (2 × 90) and a
 * little slack. "Deviation" is about 4.5 em (36 pt = 720 twips) in Arial bold, exactly the room a
 * 900-twip column leaves, so it used to wrap.
 */
export function resultColumnWidth(words: readonly string[]): number {
  const longest = Math.max(0, ...words.map((w) => [...w].length));
  return Math.max(1000, Math.ceil(longest * 0.6 * 8 * 20) + 180 + 60);
}

export interface RenderOptions {
  /** Whether to draw the chart (default true). */
  chart?: boolean;
  /** Add the appendix with the operating characteristic of each attribute's plan (default false). */
  operatingCharacteristic?: boolean;
}

/** A centred picture (a PNG drawn from SVG) with its text alternative. */
function imageParagraph(png: Buffer, size: { width: number; height: number }, alt: { name: string; title: string; description: string }): Paragraph {
  return new Paragraph({
    alignment: AlignmentType.CENTER,
    keepNext: true,
    children: [new ImageRun({ type: 'png', data: png, transformation: { width: size.width, height: size.height }, altText: alt })],
  });
}

/** What every section of the memo is written with. */
interface Ctx {
  b: Builder;
  m: MemoModel;
  t: MemoTemplate;
  W: MemoTemplate['memo'];
  L: MemoTemplate['memo']['labels'];
  H: MemoTemplate['memo']['headings'];
  T: MemoTemplate['memo']['text'];
  O: MemoTemplate['outcomes'];
  wp: MemoModel['wp'];
  values: Record<string, string | undefined>;
  fs: number;
  a: MemoModel['wp']['approach'];
  pop: MemoModel['wp']['population'];
  s: MemoModel['wp']['selection'];
  con: MemoModel['wp']['conclusion'];
  /** Every attribute has its evaluation. */
  evaluated: boolean;
  o: RenderOptions;
}

async function titleBlock(c: Ctx): Promise<void> {
  const { b, m, W, L, T, O, wp, values } = c;
  b.children.push(new Paragraph({ heading: HeadingLevel.TITLE, children: [new TextRun(b.f(W.title))] }));
  b.p(b.f(W.subtitle), { style: 'Subtitle' });
  if (m.draft) {
    b.p(b.f(O.draft.banner), {
      bold: true,
      shading: { fill: 'FCE4D6', type: ShadingType.CLEAR, color: 'auto' },
      border: { top: { style: BorderStyle.SINGLE, size: 6, color: 'C55A11', space: 4 }, bottom: { style: BorderStyle.SINGLE, size: 6, color: 'C55A11', space: 4 } },
    });
    if (m.notFinal.length > 0) {
      b.p(b.f(O.draft.reasonsLead), { bold: true, keepNext: true });
      b.bullets(m.notFinal);
    }
  }
  const signedLine = (date: string | undefined) => date ?? `${L.date}: ____________  (${L.notSigned})`;
  b.kv([
    [L.entity, b.v(values.entity)],
    [L.period, b.v(values.period)],
    [L.reference, b.v(values.reference)],
    [L.control, wp.control ? `${wp.control.id} — ${wp.control.description}` : L.notRecorded],
    [L.preparedBy, `${b.v(values.preparer)}\n${wp.signoffs?.preparer ? `${L.date}: ${wp.signoffs.preparer.date}` : signedLine(undefined)}`],
    [L.reviewedBy, `${b.v(wp.signoffs?.reviewer?.name ?? values.reviewer)}\n${wp.signoffs?.reviewer ? `${L.date}: ${wp.signoffs.reviewer.date}` : signedLine(undefined)}`],
    [L.status, { text: m.draft ? L.statusDraft : L.statusFinal, bold: m.draft }],
  ]);
  b.ps(T.intro);

}

async function objectiveSection(c: Ctx): Promise<void> {
  const { b, L, T, wp } = c;
  b.ps(T.objective);
  if (wp.control) {
    const c = wp.control;
    b.kv([
      [L.controlId, c.id],
      [L.description, c.description],
      [L.objective, c.objective],
      [L.owner, c.owner],
      [L.frequency, L.frequencies[c.frequency]],
      [L.nature, L.natures[c.nature]],
      [L.keyControl, c.key ? L.yes : L.no],
    ]);
  } else b.note(L.notRecorded);

}

async function attributesSection(c: Ctx): Promise<void> {
  const { b, m, L, T, wp, a } = c;
  if (wp.attributes) {
    b.ps(T.attributes);
    b.table(
      [
        { header: L.attribute, w: 0.8 },
        { header: L.attributeDescription, w: 2.4 },
        { header: L.deviationDefinition, w: 2.6 },
        { header: L.tolerableRate, w: 0.9, align: 'right' },
      ],
      m.attributes.map((a) => [{ text: a.attribute.id, bold: true }, a.attribute.description, a.attribute.deviationDefinition, a.tolerableRate !== undefined ? pct(a.tolerableRate) : L.notRecorded]),
    );
  } else b.note(b.f(T.attributesMissing));

}

async function populationSection(c: Ctx): Promise<void> {
  const { b, L, H, T, values, pop } = c;
  if (c.wp.rollForward) b.ps(T.interimPartNote);
  if (pop) {
    b.ps(T.population);
    const src = pop.source;
    b.kv([
      [L.populationDescription, pop.description],
      [L.samplingUnit, pop.samplingUnit],
      [L.source, b.v(values.populationSource)],
      [L.keyColumn, src.kind === 'csv' || src.kind === 'xlsx' ? src.keyColumn : undefined],
      [L.amountColumn, src.kind === 'csv' || src.kind === 'xlsx' ? src.amountColumn : undefined],
      [L.scannedAt, pop.scannedAt.replace('T', ' ').replace(/:\d\d(\.\d+)?Z$/, ' UTC')],
    ]);
    b.h2(H.tieOut);
    const tie = pop.tieOut;
    const hasTotal = pop.fingerprint.amountTotal !== undefined || tie.ledgerTotal !== undefined;
    const tieRows: Cell[][] = [[{ text: L.count, bold: true }, b.v(values.populationCount), b.v(values.ledgerCount), b.v(values.countDifference)]];
    if (hasTotal) tieRows.push([{ text: L.total, bold: true }, b.v(values.populationTotal), b.v(values.ledgerTotal), b.v(values.totalDifference)]);
    b.table(
      [
        { header: L.figure, w: 1.6 },
        { header: L.population, w: 1.6, align: 'right' },
        { header: L.ledger, w: 1.6, align: 'right' },
        { header: L.difference, w: 1.6, align: 'right' },
      ],
      tieRows,
    );
    const noLedger = tie.ledgerCount === undefined && tie.ledgerTotal === undefined;
    const differs = (tie.countDifference ?? 0) !== 0 || (tie.totalDifference !== undefined && !/^-?0+(\.0+)?$/.test(tie.totalDifference));
    b.ps(noLedger ? T.tieOutNone : differs ? T.tieOutDifferences : T.tieOutAgreed);
    if (!differs && tie.explanation) b.p(`${L.explanation}: ${tie.explanation}`);
    // A check that passed may still carry notes (e.g. how the delimiter was found): they are listed
    // under the 'no problems' text, never presented as problems the preparer had to accept.
    if (pop.validation.ok) {
      b.ps(T.validationOk);
      if (pop.validation.messages.length) b.bullets(pop.validation.messages);
    } else {
      b.ps(T.validationProblems);
      b.bullets(pop.validation.messages.length ? pop.validation.messages : [L.notRecorded]);
    }
  } else b.note(b.f(T.populationMissing));

}

async function approachSection(c: Ctx): Promise<void> {
  const { b, L, H, T, O, values, a, s } = c;
  if (a) {
    if (a.kind === 'statistical') b.ps(T.approachStatistical);
    else {
      b.ps(T.approachNonStatistical);
      b.p(b.f(O['non-statistical'].approachNote), { bold: true });
    }
    b.kv([
      [L.approachKind, L.approaches[a.kind]],
      [L.confidence, pctPlain(a.confidence)],
      [L.allowedRisk, a.kind === 'statistical' ? b.v(values.risk) : undefined],
      [L.tolerableRate, pct(a.tolerableRate)],
      [L.expectedRate, pct(a.expectedRate)],
      [L.model, a.kind === 'statistical' ? L.models[a.model] : `${L.models[a.model]} (${L.illustrative})`],
      [L.populationSize, a.model === 'hypergeometric' ? `N = ${b.v(values.populationSize)}` : undefined],
      [L.sampleSize, { text: int(a.sampleSize), bold: true }],
      [L.spares, values.spares],
      [L.policy, a.policy ? `${a.policy.name} (${L.frequencies[a.policy.frequency]}, ${a.policy.reliance}: ${int(a.policy.size)})` : undefined],
    ]);
    if (a.kind === 'statistical') {
      b.ps(a.model === 'hypergeometric' ? T.sizeRuleHypergeometric : a.model === 'poisson' ? T.sizeRulePoisson : T.sizeRuleBinomial);
      if (a.sizes.length > 0) {
        b.h2(H.sizes);
        b.table(
          [
            { header: L.attribute, w: 1.2 },
            { header: L.tolerableRate, w: 1.2, align: 'right' },
            { header: L.expectedDeviations, w: 1.4, align: 'right' },
            { header: L.sampleSize, w: 1.1, align: 'right' },
            { header: L.plannedRisk, w: 1.2, align: 'right' },
            ...(a.sizes.some((s) => s.underrelianceRisk !== undefined) ? [{ header: L.underrelianceRisk, w: 1.3, align: 'right' as const }] : []),
          ],
          a.sizes.map((s) => [
            { text: s.attributeId, bold: true },
            pct(s.tolerableRate),
            int(s.expectedDeviations),
            int(s.sampleSize),
            pctUp(s.achievedRisk),
            ...(a.sizes.some((x) => x.underrelianceRisk !== undefined) ? [s.underrelianceRisk !== undefined ? pctUp(s.underrelianceRisk) : L.notRecorded] : []),
          ]),
        );
        b.ps(T.sizePlanned);
      }
      if (a.finitePopulationCorrection) b.ps(T.fpc);
      planPart(c);
    } else if (a.policy) b.ps(T.policy);
    b.ps(T.rationale);
    b.ps(T.adopted);
  } else b.note(b.f(T.approachMissing));

}

/** The plan adopted when it is not the ordinary single sample: its parameters, both risks, and for two stages the items expected and the chance of the second stage. */
function planPart(c: Ctx): void {
  const { b, L, T, a } = c;
  const p = a?.kind === 'statistical' ? a.plan : undefined;
  if (!p) return;
  b.h2(L.plan);
  if (p.kind === 'two-stage') {
    b.kv([
      [L.plan, { text: L.planKinds['two-stage'], bold: true }],
      [L.firstSampleSize, int(p.firstSampleSize)],
      [L.firstAcceptanceNumber, int(p.firstAcceptanceNumber)],
      [L.firstRejectionNumber, int(p.firstRejectionNumber)],
      [L.secondSampleSize, int(p.secondSampleSize)],
      [L.secondAcceptanceNumber, int(p.secondAcceptanceNumber)],
      [L.plannedRisk, pctUp(p.overrelianceRisk)],
      [L.underrelianceRisk, pctUp(p.underrelianceRisk)],
      [L.allowedUnderrelianceRisk, pctUp(p.allowedUnderrelianceRisk)],
      [L.expectedItems, p.averageSampleNumber.toFixed(1)],
      [L.secondStageChance, pctUp(p.secondStageProbability)],
    ]);
    b.ps(T.planTwoStage);
  } else {
    b.kv([
      [L.plan, { text: L.planKinds['both-risks'], bold: true }],
      [L.sampleSize, int(p.sampleSize)],
      [L.acceptanceNumber, int(p.acceptanceNumber)],
      [L.plannedRisk, pctUp(p.overrelianceRisk)],
      [L.underrelianceRisk, pctUp(p.underrelianceRisk)],
      [L.allowedUnderrelianceRisk, pctUp(p.allowedUnderrelianceRisk)],
    ]);
    b.ps(T.planBothRisks);
  }
}

/** Two stages: per attribute the deviations of each stage, the stage reached and the plan's decision. */
function stagePart(c: Ctx): void {
  const { b, m, L, T } = c;
  const rows = m.attributes.filter((x) => x.evaluation?.stage);
  if (rows.length === 0) return;
  b.ps(T.resultsTwoStage);
  b.table(
    [
      { header: L.attribute, w: 0.9 },
      { header: L.firstStage, w: 1.3, align: 'right' },
      { header: L.secondStage, w: 1.6, align: 'right' },
      { header: L.stageReached, w: 0.9, align: 'right' },
      { header: L.decision, w: 2.2 },
    ],
    rows.map((x) => {
      const st = x.evaluation!.stage!;
      return [
        { text: x.attribute.id, bold: true },
        `${int(st.firstDeviations)} / ${int(st.firstSampleSize)}`,
        st.secondSampleSize !== undefined ? `${int(st.secondDeviations ?? 0)} / ${int(st.secondSampleSize)}` : L.stageNotNeeded,
        int(st.reached),
        { text: L.stageDecisions[st.decision], bold: true },
      ];
    }),
  );
}

async function selectionSection(c: Ctx): Promise<void> {
  const { b, m, L, H, T, O, wp, values, fs, pop, s } = c;
  if (wp.rollForward) b.ps(T.interimPartNote);
  if (s) {
    b.ps(s.method === 'random' ? T.selectionRandom : s.method === 'systematic' ? T.selectionSystematic : T.selectionHaphazard);
    if (s.method === 'haphazard') b.p(b.f(O.haphazard.selectionNote), { bold: true });
    b.kv([
      [L.method, L.methods[s.method]],
      [L.algorithm, { paragraphs: b.cellParagraphs({ text: b.v(values.algorithm), mono: true, bold: true }, 'left', (fs - 1) * 2).concat(values.algorithmDescription ? b.cellParagraphs({ text: values.algorithmDescription }, 'left', 16) : []) }],
      [L.seed, s.seed !== undefined ? { text: s.seed, mono: true } : undefined],
      [L.interval, values.interval],
      [L.starts, s.starts?.length ? s.starts.map((x) => String(x)).join(', ') : undefined],
      [L.selectedBy, s.haphazard?.selectedBy],
      [L.how, s.haphazard?.how],
      [L.sampleSize, int(s.sampleSize)],
      [L.spares, int(s.spares)],
      [L.selectedAt, values.selectedAt],
    ]);
    if (pop) {
      b.h2(H.fingerprint);
      b.ps(T.fingerprint);
      const fp = pop.fingerprint;
      b.kv([
        [L.sha256, { text: fp.sha256, mono: true }],
        [L.rowCount, int(fp.rowCount)],
        [L.firstKey, fp.firstKey],
        [L.lastKey, fp.lastKey],
        [L.amountTotal, values.populationTotal],
        [L.format, `${fp.format}${fp.sheet ? `, ${fp.sheet}` : ''}`],
        [L.columns, fp.columns.length ? fp.columns.join(', ') : undefined],
      ]);
    }
    b.h2(H.spares);
    if (!wp.results) b.note(b.f(T.resultsMissing));
    else if (m.spares.length === 0) b.ps(T.sparesNone);
    else {
      b.ps(T.sparesUsed);
      b.table(
        [
          { header: L.sparesUsed, w: 1.4 },
          { header: L.replaces, w: 1.4 },
          { header: L.voidReason, w: 3.7 },
        ],
        m.spares.map((x) => [x.spareKey, x.replacesKey, x.reason]),
      );
    }
  } else b.note(b.f(T.selectionMissing));

}

/** How the sample spreads over the period: the population and the sample by month, a table and a picture. */
async function spreadSection(c: Ctx): Promise<void> {
  const { b, m, L, H, T } = c;
  const v = m.spread!;
  if (v.kind === 'no-dates') {
    b.ps(v.reason === 'ranges' ? T.spreadNoDates : T.spreadNoDateColumn);
    return;
  }
  if (v.kind === 'no-selection') {
    b.note(b.f(T.spreadNoSelection));
    return;
  }
  b.ps(T.spreadLead);
  const sp = v.parts;
  if (sp) {
    // A test in parts: the whole period, each month marked with its part, and what is not known yet named.
    b.ps(T.spreadParts);
    if (sp.split) b.ps(T.spreadSplit);
    if (sp.pending.length) b.ps(T.spreadPartPending);
    if (sp.noPopulation.length) b.ps(T.spreadPartNoPopulation);
    if (sp.noTally.length) b.ps(T.spreadPartNoTally);
    if (sp.noDates.length) b.ps(T.spreadPartNoDates);
  }
  const share = (n: number, of: number) => (of > 0 ? pct(n / of) : '–');
  const amt = (a: string) => formatAmount(a) ?? '';
  const label = (r: (typeof v.rows)[number]) => (r.kind === 'month' ? r.month! : r.kind === 'outside' ? L.outsidePeriod : r.kind === 'undated' ? L.undated : L.spreadTotal);
  const partOf = (r: (typeof v.rows)[number]) => (!r.parts ? '' : r.parts.length === 2 ? L.partBoth : r.parts[0] === 'interim' ? L.partInterim : L.partRollForward);
  b.table(
    [
      { header: L.month, w: 1.3 },
      ...(sp ? [{ header: L.part, w: 1.2 }] : []),
      { header: L.populationItems, w: 1.1, align: 'right' },
      { header: L.populationShare, w: 1, align: 'right' },
      ...(v.withAmounts ? [{ header: L.populationAmount, w: 1.5, align: 'right' as const }] : []),
      { header: L.sampleItems, w: 1, align: 'right' },
      { header: L.sampleShare, w: 1, align: 'right' },
      ...(v.withAmounts ? [{ header: L.sampleAmount, w: 1.4, align: 'right' as const }] : []),
    ],
    v.rows.map((r) => {
      const bold = r.kind === 'total';
      // A month of a part not counted or not selected yet shows – rather than a 0 that would read as a count.
      const popUnknown = r.populationUnknown === true && r.population.count === 0;
      const smpPending = r.samplePending === true && r.sample.count === 0;
      return [
        { text: label(r), bold, italics: r.kind === 'outside' || r.kind === 'undated' },
        ...(sp ? [{ text: partOf(r), bold }] : []),
        { text: popUnknown ? '–' : int(r.population.count), bold },
        { text: popUnknown ? '–' : share(r.population.count, v.populationTotal), bold },
        ...(v.withAmounts ? [{ text: popUnknown ? '–' : amt(r.population.amount), bold }] : []),
        { text: smpPending ? '–' : int(r.sample.count), bold },
        { text: smpPending ? '–' : share(r.sample.count, v.sampleTotal), bold },
        ...(v.withAmounts ? [{ text: smpPending ? '–' : r.sample.count > 0 || bold ? amt(r.sample.amount) : '', bold }] : []),
      ];
    }),
    { size: 16 },
  );
  // While a part is not selected yet, "every month has an item" can only be said of the parts selected.
  b.ps(v.unselected.length ? T.spreadUnselected : sp?.pending.length ? T.spreadAllSelectedSoFar : T.spreadAllSelected);
  if (v.empty.length) b.ps(T.spreadEmpty);
  if (v.outside.population + v.undated.population > 0) b.ps(T.spreadApart);
  const months = v.rows.filter((r) => r.kind === 'month');
  if (c.o.chart !== false && months.length > 0) {
    b.h2(H.spreadChart);
    const bars = months.map((r) => ({ month: r.month!, populationShare: v.populationTotal ? r.population.count / v.populationTotal : 0, sampleShare: v.sampleTotal ? r.sample.count / v.sampleTotal : 0 }));
    const chartW = Math.min(640, Math.floor((b.width / 1440) * 96));
    // A test in parts: where the interim part ends (after its last month, or inside the month split by the interim date).
    const lastInterim = months.map((r) => r.parts?.length === 1 && r.parts[0] === 'interim').lastIndexOf(true);
    const boundary = sp ? { at: sp.split ? months.findIndex((r) => r.month === sp.split) + 0.5 : lastInterim + 1, label: `${L.interimDate} ${sp.interimDate}` } : undefined;
    const svg = spreadSvg(bars, { population: L.legendPopulationShare, sample: L.legendSampleShare }, chartW, boundary);
    const png = await renderPng(svg.svg, 2);
    if (png) {
      b.children.push(
        imageParagraph(png, svg, {
          name: 'spread-chart',
          title: H.spread,
          description: months.map((r) => `${r.month}${sp ? ` (${partOf(r)})` : ''}: ${L.populationItems} ${int(r.population.count)}, ${L.sampleItems} ${int(r.sample.count)}`).join('; '),
        }),
      );
      b.p(b.f(T.spreadCaption), { style: 'Caption' });
      if (sp) b.p(b.f(T.spreadCaptionParts), { style: 'Caption' });
    } else b.note(b.f(T.chartUnavailable));
  }
}

async function resultsSection(c: Ctx): Promise<void> {
  const { b, m, L, H, T, O, wp, a, evaluated, o } = c;
  if (!wp.results) b.note(b.f(T.resultsMissing));
  else {
    if (!evaluated) b.note(b.f(T.resultsNotEvaluated));
    else b.ps(T.resultsLead);
    const caveat = m.nonStatistical ? O['non-statistical'] : m.haphazard ? O.haphazard : undefined;
    if (caveat && evaluated) b.p(b.f(caveat.figuresLabel), { bold: true, italics: true });
    const ill = m.illustrative ? ` (${L.illustrative})` : '';
    b.table(
      [
        { header: L.attribute, w: 0.85 },
        { header: L.n, w: 0.55, align: 'right' },
        { header: L.deviations, w: 0.9, align: 'right' },
        { header: L.sampleRate, w: 0.85, align: 'right' },
        { header: `${L.upperLimit}${ill}`, w: 0.95, align: 'right' },
        { header: L.tolerableRate, w: 0.85, align: 'right' },
        { header: `${L.risk}${ill}`, w: 1.05, align: 'right' },
        { header: L.decision, w: 1.5 },
      ],
      m.attributes.map((x) => [
        { text: x.attribute.id, bold: true },
        b.v(x.values.n),
        b.v(x.values.deviations),
        b.v(x.values.sampleRate),
        x.values.upperLimit ?? L.notYetEvaluated,
        b.v(x.values.attributeTolerableRate),
        x.values.achievedRisk ?? L.notYetEvaluated,
        { text: x.decision, bold: true },
      ]),
    );
    if (evaluated) {
      const model = m.evaluation?.attributes[0]?.model ?? a?.model ?? 'binomial';
      // A test in parts: the figures are the whole period's, its limit the one over both parts.
      if (wp.rollForward) b.ps(T.resultsParts);
      else {
        b.ps(model === 'hypergeometric' ? T.limitRuleHypergeometric : model === 'poisson' ? T.limitRulePoisson : T.limitRuleBinomial);
        if (!m.illustrative && !m.attributes.some((x) => x.evaluation?.stage)) b.ps(T.decisionRule);
        if (!m.illustrative) stagePart(c);
      }
      if (caveat) b.p(b.f(caveat.resultsNote), { bold: true });
      if (m.nonStatistical && m.haphazard) b.p(b.f(O.haphazard.resultsNote), { bold: true });
      // A conclusion of reliance that the recorded evaluation does not bear out is said plainly,
      // in place of the summary that would claim every attribute passed.
      const against = m.attributes.some((x) => x.againstEvidence);
      if (against) b.ps(T.againstEvidence);
      else if (m.concluded && !m.illustrative) {
        const staged = m.attributes.some((x) => x.evaluation?.stage);
        b.ps(m.outcome === 'supported' ? (staged ? T.supportedTwoStage : O.supported.resultsSummary) : O['not-supported'].resultsSummary);
      }
      for (const x of m.attributes) {
        const ev = x.evaluation!;
        if (!ev.illustrative && !ev.supportedByRates && ev.extension !== null && ev.extension > 0) b.ps(T.extension, x.values);
      }
      // The picture.
      if (o.chart !== false) {
        b.h2(H.chart);
        const rows: ChartRow[] = m.attributes.map((x) => ({
          id: x.attribute.id,
          sampleRate: x.evaluation!.sampleRate,
          upperLimit: x.evaluation!.upperLimit,
          tolerableRate: x.evaluation!.tolerableRate,
          sampleRateText: pct(x.evaluation!.sampleRate),
          upperLimitText: pctLimit(x.evaluation!.upperLimit, x.evaluation!.tolerableRate),
          tolerableRateText: pct(x.evaluation!.tolerableRate),
          ...(x.evaluation!.illustrative ? {} : { exceeds: !x.evaluation!.supportedByRates }),
        }));
        const chartW = Math.min(640, Math.floor((b.width / 1440) * 96));
        const svg = chartSvg(rows, { sampleRate: L.legendSampleRate, upperLimit: L.legendUpperLimit, exceeds: L.legendExceeds, tolerable: L.legendTolerable, ...(m.illustrative ? { note: L.illustrative } : {}) }, chartW);
        const png = await renderPng(svg.svg, 2);
        if (png) {
          b.children.push(
            imageParagraph(png, svg, {
              name: 'rates-chart',
              title: H.chart,
              description: rows.map((r) => `${r.id}: ${L.legendSampleRate} ${r.sampleRateText}, ${L.legendUpperLimit} ${r.upperLimitText}, ${L.legendTolerable} ${r.tolerableRateText}`).join('; '),
            }),
          );
          b.p(b.f(T.chartCaption), { style: 'Caption' });
        } else b.note(b.f(T.chartUnavailable));
      }
    }
  }

}

async function deviationsSection(c: Ctx): Promise<void> {
  const { b, m, L, T, wp } = c;
  if (!wp.results) b.note(b.f(T.deviationsMissing));
  else if (m.deviations.length === 0) b.ps(T.deviationsNone);
  else {
    b.ps(T.deviationsLead);
    b.table(
      [
        { header: L.itemKey, w: 1.05 },
        { header: L.itemDate, w: 0.95 },
        { header: L.amount, w: 1.0, align: 'right' },
        { header: L.attribute, w: 0.85 },
        { header: L.found, w: 2.0 },
        { header: L.cause, w: 1.15 },
        { header: L.intentional, w: 1.0 },
        { header: L.pattern, w: 0.9 },
      ],
      m.deviations.map((d) => [{ text: d.part ? `${d.key} (${d.part === 'interim' ? L.partInterim : L.partRollForward})` : d.key, bold: true }, d.date, d.amount, d.attributeId, d.found, d.cause, d.intentional, d.pattern]),
      { size: 16 },
    );
  }

}

async function qualitativeSection(c: Ctx): Promise<void> {
  const { b, m, L, T, con } = c;
  if (con) {
    b.ps(m.deviations.length > 0 ? T.qualitative : T.deviationsNone);
    b.kv(
      [
        [L.intentionalFound, { text: con.qualitative.intentionalFound ? L.yes : L.no, bold: con.qualitative.intentionalFound }],
        [L.systemicFound, { text: con.qualitative.systemicFound ? L.yes : L.no, bold: con.qualitative.systemicFound }],
        [L.compensatingControls, con.qualitative.compensatingControls || L.none],
        [L.notes, con.qualitative.notes || L.none],
      ],
      { labelWidth: 2.6 },
    );
  } else b.note(b.f(T.qualitativeMissing));

}

async function conclusionSection(c: Ctx): Promise<void> {
  const { b, m, L, T, O, con } = c;
  if (con && m.concluded) {
    b.p(b.f(m.outcome === 'supported' ? O.supported.verdict : O['not-supported'].verdict), { bold: true });
    if (m.attributes.some((x) => x.againstEvidence)) b.ps(T.againstEvidence);
    b.p(`**${L.recordedConclusion}:** ${con.control.text}`);
    if (m.nonStatistical) b.p(b.f(O['non-statistical'].conclusionNote), { italics: true });
    if (m.haphazard) b.p(b.f(O.haphazard.conclusionNote), { italics: true });
    b.table(
      [
        { header: L.attribute, w: 0.75 },
        { header: L.decision, w: 1.25 },
        { header: L.reasoning, w: 4.5 },
      ],
      m.attributes.map((x) => [{ text: x.attribute.id, bold: true }, { text: x.decision, bold: true }, x.conclusion?.reasoning ?? L.notYetEvaluated]),
    );
  } else {
    b.p(b.f(O.draft.verdict), { bold: true });
    b.note(b.f(T.conclusionMissing));
  }

}

async function followUpsSection(c: Ctx): Promise<void> {
  const { b, m, L, T, con } = c;
  if (!con) b.note(b.f(T.followUpsMissing));
  else if (m.followUps.length === 0) b.ps(T.followUpsNone);
  else {
    b.table(
      [
        { header: L.action, w: 1.3 },
        { header: L.description, w: 3.2 },
        { header: L.actionOwner, w: 1.1 },
        { header: L.due, w: 0.95 },
      ],
      m.followUps.map((f) => [
        { text: f.kindLabel, bold: true },
        f.items !== undefined && !f.description.includes(String(f.items)) ? `${f.description} (${int(f.items)} ${L.items.toLowerCase()})` : f.description,
        f.owner ?? L.notRecorded,
        f.due ?? L.notRecorded,
      ]),
    );
  }

}

async function severitySection(c: Ctx): Promise<void> {
  const { b, m, L, T, con } = c;
  if (con?.severity) {
    b.ps(T.severity);
    b.kv([
      [L.classification, { text: L.severities[con.severity.classification], bold: true }],
      [L.rationale, con.severity.rationale],
    ]);
    if (con.severity.answers.length > 0) {
      b.table(
        [
          { header: L.question, w: 3.6 },
          { header: L.answer, w: 2.9 },
        ],
        con.severity.answers.map((x) => [x.question, x.answer]),
      );
    }
  } else if (con && m.concluded && m.outcome === 'supported' && !m.attributes.some((x) => x.againstEvidence)) b.ps(T.severityNotNeeded);
  else b.note(b.f(T.severityMissing));

}

async function responsibilitySection(c: Ctx): Promise<void> {
  const { b, T } = c;
  b.p(b.f(T.caution), {
    shading: { fill: 'F2F2F2', type: ShadingType.CLEAR, color: 'auto' },
    border: { left: { style: BorderStyle.SINGLE, size: 18, color: ACCENT, space: 6 } },
  });

}

async function signoffSection(c: Ctx): Promise<void> {
  const { b, L, T, wp, fs } = c;
  b.ps(T.signoff);
  {
    const ws = b.widths([{ w: 1.2 }, { w: 1.9 }, { w: 2.2 }, { w: 1.2 }]);
    const size = (fs - 1) * 2;
    const head = [L.role, L.name, L.signature, L.date];
    const line = (role: string, name: string | undefined, date: string | undefined) =>
      new TableRow({
        cantSplit: true,
        height: { value: 720, rule: HeightRule.ATLEAST },
        children: [role, b.v(name), '', date ?? ''].map(
          (text, i) =>
            new TableCell({
              width: { size: ws[i]!, type: WidthType.DXA },
              verticalAlign: VerticalAlignTable.BOTTOM,
              ...(i === 0 ? { shading: { fill: LABEL_FILL, type: ShadingType.CLEAR, color: 'auto' } } : {}),
              children: b.cellParagraphs({ text, bold: i === 0 }, 'left', size),
            }),
        ),
      });
    b.children.push(
      new Table({
        width: { size: b.width, type: WidthType.DXA },
        columnWidths: ws,
        layout: TableLayoutType.FIXED,
        margins: { top: 40, bottom: 60, left: 90, right: 90 },
        borders: { top: BORDER, bottom: BORDER, left: BORDER, right: BORDER, insideHorizontal: BORDER, insideVertical: BORDER },
        rows: [
          new TableRow({
            tableHeader: true,
            children: head.map(
              (h, i) =>
                new TableCell({
                  width: { size: ws[i]!, type: WidthType.DXA },
                  shading: { fill: HEAD_FILL, type: ShadingType.CLEAR, color: 'auto' },
                  children: b.cellParagraphs({ text: h, bold: true }, 'left', size),
                }),
            ),
          }),
          line(L.preparedBy, wp.signoffs?.preparer?.name ?? wp.engagement?.preparer, wp.signoffs?.preparer?.date),
          line(L.reviewedBy, wp.signoffs?.reviewer?.name ?? wp.engagement?.reviewer, wp.signoffs?.reviewer?.date),
        ],
      }),
    );
    b.spacer();
  }

}

async function appendixItemsSection(c: Ctx): Promise<void> {
  const { b, m, H, T } = c;
  b.h2(H.appendixItemsList);
  if (m.items.length === 0) b.note(b.f(T.appendixItemsMissing));
  else {
    b.ps(T.appendixItems);
    if (m.rollForward) b.p(b.f(T.appendixItemsInterim), { bold: true, keepNext: true });
    itemsTables(c, m);
  }
  evidenceTable(c, m);
  if (m.rollForward) {
    b.h2(H.appendixItemsRollForward);
    if (m.rollForward.items.length === 0) b.note(b.f(T.rollForwardMissing));
    else {
      b.ps(T.appendixItemsRollForward);
      itemsTables(c, m.rollForward);
      evidenceTable(c, m.rollForward);
    }
  }
  exactFigures(c);
}

/** The items of one part (or of a test in one part) and their results, as tables of as many attribute columns as fit. */
function itemsTables(c: Ctx, m: MemoModel): void {
  const { b, L } = c;
  {
    // Widths in twips: fixed columns, one column per attribute wide enough for the longest result
    // word in bold at 8 pt on one line, the rest for void reasons. More attributes than fit go to a
    // further table with the same rows.
    const fixed = [520, 1400, 680, 1150];
    const perAttr = resultColumnWidth([L.resultConforms, L.resultDeviation, L.resultVoid, L.resultMissing, ...m.attributes.map((x) => x.attribute.id)]);
    const minNote = 1250;
    const fit = Math.max(1, Math.floor((b.width - fixed.reduce((x, y) => x + y, 0) - minNote) / perAttr));
    const groups: number[][] = [];
    for (let i = 0; i < m.attributes.length; i += fit) groups.push(m.attributes.slice(i, i + fit).map((_, j) => i + j));
    if (groups.length === 0) groups.push([]);
    for (const g of groups) {
      if (groups.length > 1) {
        const ids = g.map((i) => m.attributes[i]!.attribute.id);
        b.p(`${L.attributesShown} ${ids[0]}${ids.length > 1 ? `–${ids[ids.length - 1]}` : ''}`, { bold: true, keepNext: true });
      }
      const note = b.width - fixed.reduce((x, y) => x + y, 0) - g.length * perAttr;
      const cols: Col[] = [
        { header: L.seq, w: fixed[0]!, align: 'right' },
        { header: L.itemKey, w: fixed[1]! },
        { header: L.row, w: fixed[2]!, align: 'right' },
        { header: L.itemRole, w: fixed[3]! },
        ...g.map((i) => ({ header: m.attributes[i]!.attribute.id, w: perAttr, align: 'center' as const })),
        { header: L.voidOrReplacement, w: note },
      ];
      b.table(
        cols,
        m.items.map((it) => [
          String(it.seq),
          it.key,
          int(it.row),
          it.role,
          ...g.map((i) => it.results[i]!).map((r) => (r === L.resultDeviation ? { text: r, bold: true, fill: 'FCE4D6' } : r)),
          it.note,
        ]),
        { size: 16 },
      );
    }
  }
}

/** Who tested each item, when, and the evidence: every tested item of the part, conforming or not. */
function evidenceTable(c: Ctx, m: MemoModel): void {
  const { b, L, T } = c;
  const tested = m.items.filter((it) => it.tested);
  if (m.items.length > 0) {
    b.p(L.evidencePerItem, { bold: true, keepNext: true });
    if (tested.length === 0) b.note(b.f(T.appendixEvidenceNone));
    else {
      b.ps(T.appendixEvidence);
      b.table(
        [
          { header: L.seq, w: 520, align: 'right' },
          { header: L.itemKey, w: 1400 },
          { header: L.testedBy, w: 1300 },
          { header: L.dateTested, w: 1100 },
          { header: L.evidence, w: Math.max(1500, b.width - 520 - 1400 - 1300 - 1100 - 2000) },
          { header: L.note, w: 2000 },
        ],
        tested.map((it) => [String(it.seq), it.key, it.testedBy || L.notRecorded, it.testedOn || L.notRecorded, it.evidence || L.notRecorded, it.itemNote]),
        { size: 16, total: b.width },
      );
    }
  }
}

/** The exact figures of the evaluation and of the plan, and the state of the workpaper the memo shows. */
function exactFigures(c: Ctx): void {
  const { b, m, L, H, T, a, evaluated } = c;
  b.h2(H.appendixExact);
  if (evaluated) {
    b.ps(T.appendixExact);
    b.p(L.evaluationFigures, { bold: true, keepNext: true });
    const hyp = m.attributes.some((x) => x.evaluation?.deviationsInPopulation !== undefined);
    const cols: Col[] = [
      { header: L.attribute, w: 0.8 },
      { header: L.n, w: 0.55, align: 'right' },
      { header: L.deviations, w: 0.85, align: 'right' },
      { header: L.sampleRate, w: 0.95, align: 'right' },
      { header: L.upperLimit, w: 0.95, align: 'right' },
      { header: L.tolerableRate, w: 0.95, align: 'right' },
      { header: L.risk, w: 1.05, align: 'right' },
      { header: L.allowedRisk, w: 1.0, align: 'right' },
    ];
    if (hyp) cols.push({ header: L.deviationsInPopulation, w: 0.9, align: 'right' });
    b.table(
      cols,
      m.attributes.map((x) => {
        const ev = x.evaluation!;
        const row: Cell[] = [
          { text: x.attribute.id, bold: true },
          int(ev.sampleSize),
          int(ev.deviations),
          exact(ev.sampleRate),
          exact(ev.upperLimit),
          exact(ev.tolerableRate),
          exact(ev.achievedRisk),
          exact(1 - ev.confidence),
        ];
        if (hyp) row.push(ev.deviationsInPopulation !== undefined ? int(ev.deviationsInPopulation) : '');
        return row;
      }),
      { size: 16 },
    );
  } else b.note(L.notYetEvaluated);
  if (a && a.sizes.length > 0) {
    b.p(L.planningFigures, { bold: true, keepNext: true });
    b.table(
      [
        { header: L.attribute, w: 1.2 },
        { header: L.tolerableRate, w: 1.2, align: 'right' },
        { header: L.expectedDeviations, w: 1.4, align: 'right' },
        { header: L.sampleSize, w: 1.1, align: 'right' },
        { header: L.plannedRisk, w: 1.4, align: 'right' },
      ],
      a.sizes.map((x) => [{ text: x.attributeId, bold: true }, exact(x.tolerableRate), int(x.expectedDeviations), int(x.sampleSize), exact(x.achievedRisk)]),
      { size: 16 },
    );
  }
  b.p(b.f(T.workpaperState), { style: 'MemoNote' });
  if (m.cleanedNote) b.note(m.cleanedNote);

}

async function appendixReperformSection(c: Ctx): Promise<void> {
  const { b, m, H, T, a } = c;
  b.ps(T.reperform);
  if (m.rollForward) b.ps(T.reperformRollForward);
  b.h2(H.reperformCommand);
  b.ps(T.reperformCommand);
  b.h2(H.reperformManual);
  const manual = (Array.isArray(T.reperformManual) ? T.reperformManual : [T.reperformManual]).map((x) => b.f(x));
  if (m.haphazard && manual.length > 1) manual[1] = b.f(T.reperformHaphazard);
  b.steps(manual);
  b.h2(H.formulas);
  const model = a?.model ?? 'binomial';
  const byModel = (bin: string, hyp: string, poi: string) => (model === 'hypergeometric' ? hyp : model === 'poisson' ? poi : bin);
  b.bullets(
    [
      T.formulaSampleRate,
      byModel(T.formulaRiskBinomial, T.formulaRiskHypergeometric, T.formulaRiskPoisson),
      byModel(T.formulaLimitBinomial, T.formulaLimitHypergeometric, T.formulaLimitPoisson),
      T.formulaSize,
      T.formulaDecision,
    ].map((x) => b.f(x)),
  );

}

/** A value of an amendment as text (a whole object shown as its JSON, shortened). */
function valueText(v: unknown): string {
  if (v === undefined) return '—';
  if (typeof v === 'string') return v;
  const t = JSON.stringify(v);
  return t.length > 300 ? `${t.slice(0, 297)}...` : t;
}

function when(iso: string): string {
  return iso.replace('T', ' ').replace(/(\.\d+)?Z$/, ' UTC');
}

async function amendmentsSection(c: Ctx): Promise<void> {
  const { b, L, T, wp } = c;
  const list = wp.amendments ?? [];
  if (list.length === 0) {
    b.ps(T.amendmentsNone);
    return;
  }
  b.ps(T.amendmentsLead);
  list.forEach((a, i) => {
    b.p(`**${i + 1}. ${when(a.at)}, ${a.by} (${a.role}).** ${L.why}: ${a.why}. ${L.clearedSignoffs}: ${a.cleared.length ? a.cleared.join(', ') : L.none}.`, { keepNext: true });
    if (a.changes.length === 0) b.note(L.none);
    else {
      b.table(
        [
          { header: L.field, w: 2.2 },
          { header: L.before, w: 2.1 },
          { header: L.after, w: 2.1 },
        ],
        a.changes.map((x) => [{ text: x.path, mono: true }, valueText(x.old), valueText(x.new)]),
        { size: 16 },
      );
    }
  });
}

async function appendixReviewSection(c: Ctx): Promise<void> {
  const { b, L, T, wp } = c;
  const notes = wp.review?.notes ?? [];
  for (const s of wp.review?.sittings ?? []) {
    if (s.warning) b.p(`**${L.reviewerWarning}** (${s.by}, ${when(s.at)}): ${s.warning}`);
  }
  if (notes.length === 0) {
    b.ps(T.reviewNone);
    return;
  }
  b.ps(T.reviewLead);
  const kind = { raised: L.noteRaised, answered: L.noteAnswered, reopened: L.noteReopened, cleared: L.noteCleared } as const;
  b.table(
    [
      { header: L.note, w: 0.6 },
      { header: L.reviewSection, w: 1.4 },
      { header: L.thread, w: 4.5 },
    ],
    notes.map((n) => [
      { text: n.id, bold: true },
      `${REVIEW_SECTION_LABELS[n.section]}${n.item ? `\n${n.item}` : ''}${n.mustClear ? `\n(${L.mustClear})` : ''}`,
      n.thread.map((e) => `${e.kind === 'answered' && e.changedRecord ? L.noteAnsweredChanged : kind[e.kind]} — ${e.by} (${e.role}), ${when(e.at)}${e.text ? `: ${e.text}` : ''}`).join('\n'),
    ]),
    { size: 16 },
  );
}

/** The operating characteristic of each attribute's plan: a table of rates and a picture. */
async function appendixOcSection(c: Ctx): Promise<void> {
  const { b, L, T, a, wp } = c;
  if (!a || a.kind !== 'statistical' || a.sizes.length === 0) {
    b.note(T.ocNotStatistical);
    return;
  }
  b.ps(T.ocLead);
  const N = a.model === 'hypergeometric' ? wp.population?.fingerprint.rowCount : undefined;
  const curves: OcCurve[] = [];
  const rates = Array.from({ length: 17 }, (_, i) => Math.round(((i * Math.max(...a.sizes.map((s) => s.tolerableRate)) * 2) / 16) * 1e6) / 1e6);
  const adopted = a.plan;
  if (adopted?.kind === 'two-stage') b.ps(T.ocTwoStage);
  if (adopted) {
    // The plan actually adopted (one acceptance rule for the test, which has one tolerable rate).
    const plan = adopted.kind === 'two-stage'
      ? { firstSampleSize: adopted.firstSampleSize, firstAcceptanceNumber: adopted.firstAcceptanceNumber, firstRejectionNumber: adopted.firstRejectionNumber, secondSampleSize: adopted.secondSampleSize, secondAcceptanceNumber: adopted.secondAcceptanceNumber }
      : { sampleSize: adopted.sampleSize, acceptanceNumber: adopted.acceptanceNumber };
    const pts = operatingCharacteristic({ plan, rates, model: a.model, ...(N !== undefined ? { populationSize: N } : {}) });
    const id = adopted.kind === 'two-stage'
      ? `${a.sizes.map((s) => s.attributeId).join(', ')} (n1 = ${int(adopted.firstSampleSize)}, c1 = ${adopted.firstAcceptanceNumber}, r1 = ${adopted.firstRejectionNumber}; n2 = ${int(adopted.secondSampleSize)}, c2 = ${adopted.secondAcceptanceNumber})`
      : `${a.sizes.map((s) => s.attributeId).join(', ')} (n = ${int(adopted.sampleSize)}, c = ${adopted.acceptanceNumber})`;
    // Both risks are planned at the lowest tolerable rate (two stages only with the test's one).
    curves.push({ id, points: pts, tolerableRate: Math.min(...a.sizes.map((s) => s.tolerableRate)), expectedRate: a.expectedRate });
  }
  for (const s of adopted ? [] : a.sizes) {
    // The plan as adopted: the sample size used, and the most deviations with which it supports
    // reliance at this attribute's tolerable rate.
    const n = a.sampleSize;
    const acc = acceptanceNumber({ sampleSize: n, tolerableRate: s.tolerableRate, confidence: a.confidence, model: a.model, ...(N !== undefined ? { populationSize: N } : {}) });
    if (acc === null) continue;
    const pts = operatingCharacteristic({ plan: { sampleSize: n, acceptanceNumber: acc }, rates, model: a.model, ...(N !== undefined ? { populationSize: N } : {}) });
    curves.push({ id: `${s.attributeId} (n = ${int(n)}, c = ${acc})`, points: pts, tolerableRate: s.tolerableRate, expectedRate: a.expectedRate });
  }
  b.table(
    [{ header: L.trueRate, w: 1 }, ...curves.map((cv) => ({ header: cv.id, w: 1.4, align: 'right' as const }))],
    rates.map((r, i) => [pct(r), ...curves.map((cv) => pct(cv.points[i]!.acceptanceProbability))]),
    { size: 16 },
  );
  const chartW = Math.min(640, Math.floor((b.width / 1440) * 96));
  if (curves.length === 0) {
    b.note(T.ocNotStatistical);
    return;
  }
  const svg = ocSvg(curves, { x: L.trueRate, y: L.chanceOfReliance, tolerable: `${L.legendTolerable} (${a.sizes[0]!.attributeId})`, expected: L.expectedRate }, chartW);
  const png = await renderPng(svg.svg, 2);
  if (png) b.children.push(imageParagraph(png, svg, { name: 'operating-characteristic', title: L.chanceOfReliance, description: curves.map((cv) => cv.id).join('; ') }));
  b.p(b.f(T.ocCaption), { style: 'Caption' });
}

/** The roll-forward part of a test done at an interim date: its dates, population, size and selection. */
async function rollForwardSection(c: Ctx): Promise<void> {
  const { b, m, L, H, T, wp, fs } = c;
  const rf = wp.rollForward!;
  const rm = m.rollForward!;
  b.ps(T.rollForwardLead);
  b.kv([
    [L.interimDate, rf.interimDate],
    [L.partDates, `${rf.periodStart} – ${rf.periodEnd}`],
  ]);
  const pop = rf.population;
  if (!pop) {
    b.note(b.f(T.rollForwardMissing));
    return;
  }
  b.h2(H.population);
  const src = pop.source;
  const tie = pop.tieOut;
  b.kv([
    [L.populationDescription, pop.description],
    [L.samplingUnit, pop.samplingUnit],
    [L.source, b.v(rm.values.populationSource)],
    [L.keyColumn, src.kind === 'csv' || src.kind === 'xlsx' ? src.keyColumn : undefined],
    [L.rowCount, int(pop.fingerprint.rowCount)],
    [L.amountTotal, rm.values.populationTotal],
    [L.sha256, { text: pop.fingerprint.sha256, mono: true }],
    [L.firstKey, pop.fingerprint.firstKey],
    [L.lastKey, pop.fingerprint.lastKey],
    [`${L.ledger}: ${L.count}`, rm.values.ledgerCount],
    [`${L.ledger}: ${L.total}`, rm.values.ledgerTotal],
    [L.difference, [rm.values.countDifference, rm.values.totalDifference].filter((x) => x !== undefined).join('; ') || undefined],
    [L.explanation, tie.explanation],
    [L.ledgerSource, tie.ledgerSource],
  ]);
  if (pop.validation.ok) b.ps(T.validationOk);
  else {
    b.ps(T.validationProblems);
    b.bullets(pop.validation.messages.length ? pop.validation.messages : [L.notRecorded]);
  }
  if (rf.sampleSize === undefined) {
    b.note(b.f(T.rollForwardMissing));
    return;
  }
  b.h2(H.approach);
  b.ps(T.rollForwardSize);
  b.kv([
    [L.sizeRule, rf.sizing ? (rf.sizing.kind === 'policy-pro-rata' ? L.sizeRulePolicyProRata : L.sizeRuleStatistical) : undefined],
    [L.sampleSize, { text: int(rf.sampleSize), bold: true }],
  ]);
  const sel = rf.selection;
  b.h2(H.selection);
  if (!sel) {
    b.note(b.f(T.rollForwardMissing));
    return;
  }
  b.kv([
    [L.method, L.methods[sel.method]],
    [L.algorithm, { paragraphs: b.cellParagraphs({ text: b.v(rm.values.algorithm), mono: true, bold: true }, 'left', (fs - 1) * 2) }],
    [L.seed, sel.seed !== undefined ? { text: sel.seed, mono: true } : undefined],
    [L.interval, rm.values.interval],
    [L.selectedBy, sel.haphazard?.selectedBy],
    [L.how, sel.haphazard?.how],
    [L.sampleSize, int(sel.sampleSize)],
    [L.spares, int(sel.spares)],
    [L.selectedAt, rm.values.selectedAt],
  ]);
  b.h2(H.spares);
  if (!rf.results) b.note(b.f(T.rollForwardResultsMissing));
  else if (rm.spares.length === 0) b.ps(T.sparesNone);
  else {
    b.table(
      [
        { header: L.sparesUsed, w: 1.4 },
        { header: L.replaces, w: 1.4 },
        { header: L.voidReason, w: 3.7 },
      ],
      rm.spares.map((x) => [x.spareKey, x.replacesKey, x.reason]),
    );
  }
}

/** Each part's figures per attribute, and the whole period's limit over both parts with the conservative bound beside it. */
async function wholePeriodSection(c: Ctx): Promise<void> {
  const { b, m, L, T } = c;
  const evs = m.attributes.map((x) => x.evaluation).filter((e): e is NonNullable<typeof e> => e?.parts !== undefined && e.combined !== undefined);
  if (evs.length === 0) {
    b.note(b.f(T.wholePeriodMissing));
    return;
  }
  b.ps(T.wholePeriodLead);
  const partName = (p: string) => (p === 'interim' ? L.partInterim : L.partRollForward);
  const rows: Cell[][] = [];
  for (const ev of evs) {
    for (const p of ev.parts!) {
      rows.push([{ text: ev.attributeId, bold: true }, partName(p.part), int(p.populationSize), int(p.sampleSize), int(p.deviations), pct(p.sampleRate), `${pctLimit(p.upperLimit, ev.tolerableRate)}${p.deviationsInPopulation !== undefined ? ` (${int(p.deviationsInPopulation)})` : ''}`, '', '']);
    }
    const cmb = ev.combined!;
    const N = ev.parts!.reduce((x, p) => x + p.populationSize, 0);
    rows.push([
      { text: ev.attributeId, bold: true },
      { text: L.wholePeriod, bold: true },
      int(N),
      int(ev.sampleSize),
      int(ev.deviations),
      pct(ev.sampleRate),
      { text: cmb.rate !== null ? `${pctLimit(cmb.rate, ev.tolerableRate)} (${int(cmb.deviationsInPopulation!)})` : L.notComputed, bold: true },
      `${pctUp(cmb.conservativeRate)} (${int(cmb.conservativeDeviations)})`,
      { text: ev.illustrative ? L.illustrative : cmb.supported ? L.decisionSupported : L.decisionNotSupported, bold: true },
    ]);
  }
  b.table(
    [
      { header: L.attribute, w: 0.8 },
      { header: L.part, w: 1.05 },
      { header: 'N', w: 0.6, align: 'right' },
      { header: L.n, w: 0.5, align: 'right' },
      { header: L.deviations, w: 0.95, align: 'right' },
      { header: L.sampleRate, w: 0.8, align: 'right' },
      { header: `${L.upperLimit} / ${L.combinedLimit}`, w: 1.25, align: 'right' },
      { header: L.conservativeBound, w: 1.2, align: 'right' },
      { header: L.decision, w: 1.1 },
    ],
    rows,
    { size: 16 },
  );
  for (const ev of evs) if (ev.combined!.note) b.note(`${ev.attributeId}: ${ev.combined!.note}`);
  b.ps(T.wholePeriodDecision);
  b.ps(T.wholePeriodJudgement);
}

/**
 * The numbered sections of the memo, in order: a section's number is its place in this list
 * (among the sections whose `when` holds for the memo), so a section added or moved renumbers the
 * rest (and the texts that point to one).
 */
const SECTIONS: ReadonlyArray<{ heading: keyof MemoTemplate['memo']['headings']; render: (c: Ctx) => Promise<void>; when?: (m: MemoModel) => boolean }> = [
  { heading: 'objective', render: objectiveSection },
  { heading: 'attributes', render: attributesSection },
  { heading: 'population', render: populationSection },
  { heading: 'approach', render: approachSection },
  { heading: 'selection', render: selectionSection },
  // A test done at an interim date only: the roll-forward part, and the figures per part and for the whole period.
  { heading: 'rollForward', render: rollForwardSection, when: (m) => m.wp.rollForward !== undefined },
  // After both parts' selections, so that the spread of the whole period follows them. Only when the population's tally by month is recorded: a memo of an older file keeps its sections and their numbers.
  { heading: 'spread', render: spreadSection, when: (m) => m.spread !== undefined },
  { heading: 'results', render: resultsSection },
  { heading: 'wholePeriod', render: wholePeriodSection, when: (m) => m.wp.rollForward !== undefined },
  { heading: 'deviations', render: deviationsSection },
  { heading: 'qualitative', render: qualitativeSection },
  { heading: 'conclusion', render: conclusionSection },
  { heading: 'followUps', render: followUpsSection },
  { heading: 'severity', render: severitySection },
  { heading: 'responsibility', render: responsibilitySection },
  { heading: 'signoff', render: signoffSection },
  { heading: 'amendments', render: amendmentsSection },
];

/** The appendices, unnumbered, each on a new page. */
const APPENDICES: ReadonlyArray<{ heading: keyof MemoTemplate['memo']['headings']; render: (c: Ctx) => Promise<void> }> = [
  { heading: 'appendixItems', render: appendixItemsSection },
  { heading: 'appendixReperform', render: appendixReperformSection },
  { heading: 'appendixReview', render: appendixReviewSection },
];

/** The sections a memo of this model has, in order. */
function sectionsOf(m: MemoModel): typeof SECTIONS {
  return SECTIONS.filter((x) => !x.when || x.when(m));
}

/** The number of a section, as printed (or its heading when headings are not numbered). */
export function sectionNumber(heading: keyof MemoTemplate['memo']['headings'], m?: MemoModel): number {
  const i = (m ? sectionsOf(m) : SECTIONS).findIndex((x) => x.heading === heading);
  if (i < 0) throw new Error(`internal: no numbered memo section ${heading}`);
  return i + 1;
}

/** Build the memo document (not yet packed). */
export async function buildDocument(m: MemoModel, t: MemoTemplate, o: RenderOptions = {}): Promise<Document> {
  const W = t.memo;
  const values = { ...m.values };
  values.followUpsSection = W.settings.numberHeadings ? String(sectionNumber('followUps', m)) : W.headings.followUps;
  if (m.wp.rollForward) values.wholePeriodSection = W.settings.numberHeadings ? String(sectionNumber('wholePeriod', m)) : W.headings.wholePeriod;
  const b = new Builder(t, m, values);
  const wp = m.wp;
  const c: Ctx = {
    b, m, t, W, L: W.labels, H: W.headings, T: W.text, O: t.outcomes, wp, values, fs: W.settings.fontSize,
    a: wp.approach, pop: wp.population, s: wp.selection, con: wp.conclusion,
    evaluated: m.attributes.length > 0 && m.attributes.every((x) => x.evaluation),
    o,
  };
  await titleBlock(c);
  for (const sec of sectionsOf(m)) {
    b.h1(W.headings[sec.heading]);
    await sec.render(c);
  }
  for (const app of APPENDICES) {
    b.h1(W.headings[app.heading], { pageBreakBefore: true, numbered: false });
    await app.render(c);
  }
  if (o.operatingCharacteristic) {
    b.h1(W.headings.appendixOc, { pageBreakBefore: true, numbered: false });
    await appendixOcSection(c);
  }
  return assemble(b, m, t);
}

function assemble(b: Builder, m: MemoModel, t: MemoTemplate): Document {
  const W = t.memo;
  const font = W.settings.font;
  const size = W.settings.fontSize * 2;
  const paper = PAPER[W.settings.paper];
  const L = W.labels;
  const small = Math.max(14, size - 4);
  const headerText = [b.values.reference, b.values.entity].filter(Boolean).join(' · ') || L.notRecorded;
  const header = new Header({
    children: [
      new Paragraph({
        tabStops: [{ type: TabStopType.RIGHT, position: b.width }],
        border: { bottom: { style: BorderStyle.SINGLE, size: 4, color: '999999', space: 2 } },
        children: [
          new TextRun({ text: headerText, size: small, color: '404040' }),
          new TextRun({ children: [new Tab()] }),
          m.draft
            ? new TextRun({ text: t.outcomes.draft.headerMark, bold: true, size: small + 4, color: 'C00000' })
            : new TextRun({ text: `${L.control} ${b.values.controlId ?? ''}`.trim(), size: small, color: '404040' }),
        ],
      }),
    ],
  });
  const footer = new Footer({
    children: [
      new Paragraph({
        tabStops: [{ type: TabStopType.RIGHT, position: b.width }],
        border: { top: { style: BorderStyle.SINGLE, size: 4, color: '999999', space: 2 } },
        children: [
          new TextRun({ text: fill(L.generatedBy, b.values, L.notRecorded), size: small, color: '595959' }),
          new TextRun({ children: [new Tab()] }),
          new TextRun({ children: [`${L.page} `, PageNumber.CURRENT, ` ${L.of} `, PageNumber.TOTAL_PAGES], size: small, color: '404040' }),
        ],
      }),
    ],
  });
  const ownStyles = [
    { id: 'TableText', name: 'Table Text', basedOn: 'Normal', quickFormat: true, run: { size: size - 2 }, paragraph: { spacing: { before: 0, after: 0, line: 240, lineRule: LineRuleType.AUTO } } },
    { id: 'TableSmall', name: 'Table Text Small', basedOn: 'TableText', run: { size: 16 } },
    { id: 'TableTiny', name: 'Table Text Tiny', basedOn: 'TableText', run: { size: 14 } },
    { id: 'Spacer', name: 'Table Spacer', basedOn: 'Normal', paragraph: { spacing: { before: 0, after: 0, line: 200, lineRule: LineRuleType.AUTO } }, run: { size: 12 } },
    { id: 'MemoNote', name: 'Memo Note', basedOn: 'Normal', quickFormat: true, run: { italics: true, color: '595959' } },
  ];
  const styles = t.externalStyles
    ? { paragraphStyles: ownStyles }
    : {
        default: {
          document: { run: { font, size }, paragraph: { spacing: { after: 120, line: 264, lineRule: LineRuleType.AUTO } } },
          title: { run: { font, size: 36, bold: true, color: ACCENT }, paragraph: { spacing: { after: 60 } } },
          heading1: {
            run: { font, size: 26, bold: true, color: ACCENT },
            paragraph: { spacing: { before: 320, after: 120 }, keepNext: true, keepLines: true, border: { bottom: { style: BorderStyle.SINGLE, size: 4, color: 'B4C6E7', space: 2 } } },
          },
          heading2: { run: { font, size: 22, bold: true, color: ACCENT }, paragraph: { spacing: { before: 200, after: 80 }, keepNext: true, keepLines: true } },
          caption: { run: { font, size: size - 2, italics: true, color: '404040' }, paragraph: { spacing: { before: 60, after: 200 } } },
        },
        paragraphStyles: [
          ...ownStyles,
          { id: 'Subtitle', name: 'Subtitle', basedOn: 'Normal', run: { size: size + 4, color: '404040' }, paragraph: { spacing: { after: 240 } } },
        ],
      };
  return new Document({
    title: `${fill(W.title, b.values, L.notRecorded)} — ${b.values.reference ?? ''}`.trim(),
    subject: b.values.controlId ? `${L.control} ${b.values.controlId}` : undefined,
    creator: 'tolrate',
    lastModifiedBy: 'tolrate',
    description: fill(W.subtitle, b.values, L.notRecorded),
    ...(t.externalStyles ? { externalStyles: t.externalStyles } : {}),
    styles,
    numbering: {
      config: [
        {
          reference: 'steps',
          levels: [{ level: 0, format: LevelFormat.DECIMAL, text: '%1.', alignment: AlignmentType.START, style: { paragraph: { indent: { left: 440, hanging: 340 } } } }],
        },
      ],
    },
    sections: [
      {
        properties: {
          page: {
            size: { width: paper.width, height: paper.height },
            margin: { top: paper.margin, bottom: paper.margin, left: paper.margin, right: paper.margin, header: 567, footer: 567 },
          },
        },
        headers: { default: header },
        footers: { default: footer },
        children: b.children,
      },
    ],
  });
}

/**
 * Pack the document. The DOCX library stamps the document properties (created, modified) and
 * every zip entry with the clock at packing; they are set to `at`, the memo's own time (the one
 * its footer shows), so the properties agree with the memo and the same workpaper and time give
 * the same bytes.
 */
export async function packDocument(doc: Document, at: Date = new Date()): Promise<Buffer> {
  const packed = await Packer.toBuffer(doc);
  const { default: JSZip } = await import('jszip');
  const zip = await JSZip.loadAsync(packed);
  const stamp = at.toISOString().replace(/\.\d{3}Z$/, 'Z');
  const core = zip.file('docProps/core.xml');
  if (core) {
    const xml = (await core.async('string')).replace(/(<dcterms:(created|modified)[^>]*>)[^<]*(<\/dcterms:\2>)/g, `$1${stamp}$3`);
    zip.file('docProps/core.xml', xml);
  }
  // The library numbers drawings with a counter that runs on across documents: number them afresh.
  const body = zip.file('word/document.xml');
  if (body) {
    let n = 0;
    let m = 0;
    const xml = (await body.async('string')).replace(/<wp:docPr id="\d+"/g, () => `<wp:docPr id="${++n}"`).replace(/<pic:cNvPr id="\d+"/g, () => `<pic:cNvPr id="${++m}"`);
    zip.file('word/document.xml', xml);
  }
  const out = new JSZip();
  for (const name of Object.keys(zip.files).sort()) {
    const f = zip.files[name]!;
    if (f.dir) continue;
    out.file(name, await f.async('uint8array'), { date: at, createFolders: false });
  }
  return out.generateAsync({ type: 'nodebuffer', compression: 'DEFLATE', compressionOptions: { level: 6 } });
}

