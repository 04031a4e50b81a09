/**
 * The memo's picture: for each attribute, the sample deviation rate and the upper deviation limit
 * as horizontal bars against the attribute's tolerable rate (a vertical mark). Drawn as SVG by
 * tolrate, rendered to PNG with resvg (its binary ships inside its npm package).
 *
 * The geometry alone carries the figures: bar lengths, the mark and the axis ticks are drawn to
 * scale, and a limit beyond the tolerable rate is filled differently, so the picture stays right
 * if no font can be found and the text is not drawn. The same figures are in the results table.
 */
import { existsSync } from 'node:fs';

export interface ChartRow {
  /** The limit does not support reliance (from the decision, not from comparing rounded rates). */
  exceeds?: boolean;
  id: string;
  sampleRate: number;
  upperLimit: number;
  tolerableRate: number;
  /** The labels written beside the bars (formatted as in the table). */
  sampleRateText: string;
  upperLimitText: string;
  tolerableRateText: string;
}

export interface ChartLabels {
  sampleRate: string;
  upperLimit: string;
  /** The fill of a limit above the tolerable rate. */
  exceeds: string;
  tolerable: string;
  /** Shown top right, e.g. "illustrative". */
  note?: string;
}

export interface ChartSvg {
  svg: string;
  /** Size in CSS pixels (96 to the inch). */
  width: number;
  height: number;
  /** The axis maximum, as a fraction. */
  axisMax: number;
  /** Geometry, for tests: x of each figure in pixels, per row. */
  geometry: Array<{ id: string; sampleEnd: number; limitEnd: number; tolerableX: number; exceeds: boolean }>;
  scale: (fraction: number) => number;
}

export const COLORS = {
  sample: '#2F5597',
  limit: '#BDD7EE',
  limitStroke: '#2F5597',
  exceed: '#F4B183',
  exceedStroke: '#C55A11',
  tolerable: '#000000',
  grid: '#D9D9D9',
  text: '#1F1F1F',
} as const;

const FONT = "DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif";

function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

/** A round axis maximum with its tick step, so that `maxValue` ends at most at ~85% of the axis. */
export function niceAxis(maxValue: number): { max: number; step: number } {
  const target = Math.max(maxValue / 0.85, 0.01);
  const steps = [0.001, 0.002, 0.0025, 0.005, 0.01, 0.02, 0.025, 0.05, 0.1, 0.2, 0.25];
  for (const step of steps) {
    const ticks = Math.ceil(target / step - 1e-9);
    if (ticks <= 8) return { max: Math.min(1, Number((ticks * step).toFixed(6))), step };
  }
  return { max: 1, step: 0.25 };
}

/** Percentage tick label: 0.05 -> "5%", 0.025 -> "2.5%". */
function tickLabel(v: number): string {
  return `${Number((v * 100).toFixed(2))}%`;
}

export function chartSvg(rows: readonly ChartRow[], labels: ChartLabels, width = 620): ChartSvg {
  const left = 64;
  const right = 24;
  const top = 56;
  const rowH = 54;
  const bottom = 34;
  const plotW = width - left - right;
  const height = top + rowH * rows.length + bottom;
  const maxValue = Math.max(0, ...rows.flatMap((r) => [r.sampleRate, r.upperLimit, r.tolerableRate]));
  const axis = niceAxis(maxValue);
  const scale = (f: number) => left + (Math.min(Math.max(f, 0), axis.max) / axis.max) * plotW;
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`);
  out.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#FFFFFF"/>`);
  // Legend (shapes first, then words), two rows of two.
  const legend = (x: number, y: number, shape: string, text: string) => {
    out.push(shape);
    out.push(`<text x="${x + 26}" y="${y + 9}" font-family="${FONT}" font-size="11" fill="${COLORS.text}">${esc(text)}</text>`);
  };
  const col2 = left + Math.round(plotW / 2);
  legend(left, 8, `<rect x="${left}" y="8" width="18" height="10" fill="${COLORS.sample}"/>`, labels.sampleRate);
  legend(col2, 8, `<line x1="${col2 + 9}" y1="5" x2="${col2 + 9}" y2="21" stroke="${COLORS.tolerable}" stroke-width="2.5"/>`, labels.tolerable);
  legend(left, 26, `<rect x="${left}" y="26" width="18" height="10" fill="${COLORS.limit}" stroke="${COLORS.limitStroke}" stroke-width="1"/>`, labels.upperLimit);
  legend(col2, 26, `<rect x="${col2}" y="26" width="18" height="10" fill="${COLORS.exceed}" stroke="${COLORS.exceedStroke}" stroke-width="1"/>`, labels.exceeds);
  if (labels.note) {
    out.push(`<text x="${width - right}" y="${top - 6}" text-anchor="end" font-family="${FONT}" font-size="10" font-style="italic" fill="${COLORS.text}">${esc(labels.note)}</text>`);
  }
  // Grid and axis.
  const plotBottom = top + rowH * rows.length;
  const nTicks = Math.round(axis.max / axis.step);
  for (let i = 0; i <= nTicks; i++) {
    const v = i * axis.step;
    const x = scale(v);
    out.push(`<line x1="${x.toFixed(2)}" y1="${top}" x2="${x.toFixed(2)}" y2="${plotBottom}" stroke="${COLORS.grid}" stroke-width="1"/>`);
    out.push(`<line x1="${x.toFixed(2)}" y1="${plotBottom}" x2="${x.toFixed(2)}" y2="${plotBottom + 5}" stroke="${COLORS.text}" stroke-width="1"/>`);
    out.push(`<text x="${x.toFixed(2)}" y="${plotBottom + 18}" text-anchor="middle" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${tickLabel(v)}</text>`);
  }
  out.push(`<line x1="${left}" y1="${plotBottom}" x2="${left + plotW}" y2="${plotBottom}" stroke="${COLORS.text}" stroke-width="1"/>`);
  out.push(`<line x1="${left}" y1="${top}" x2="${left}" y2="${plotBottom}" stroke="${COLORS.text}" stroke-width="1"/>`);
  const geometry: ChartSvg['geometry'] = [];
  rows.forEach((r, i) => {
    const y = top + i * rowH;
    // The colour follows the decision (a hypergeometric limit equal to the tolerable rate does not
    // support reliance), falling back to the figures only for a row without one.
    const exceeds = r.exceeds ?? r.upperLimit > r.tolerableRate + 1e-12;
    const sx = scale(r.sampleRate);
    const ux = scale(r.upperLimit);
    const tx = scale(r.tolerableRate);
    geometry.push({ id: r.id, sampleEnd: sx, limitEnd: ux, tolerableX: tx, exceeds });
    // A value label that would be crossed by the tolerable mark goes just after the mark instead.
    const labelX = (x: number) => {
      const start = Math.max(x, left + 1) + 5;
      return tx >= start - 4 && tx <= start + 34 ? tx + 5 : start;
    };
    out.push(`<text x="${left - 10}" y="${y + 31}" text-anchor="end" font-family="${FONT}" font-size="12" font-weight="bold" fill="${COLORS.text}">${esc(r.id)}</text>`);
    // Sample deviation rate: solid bar (a zero rate leaves a hairline so the row is visibly drawn).
    out.push(`<rect x="${left}" y="${y + 12}" width="${Math.max(sx - left, 1).toFixed(2)}" height="14" fill="${COLORS.sample}"/>`);
    out.push(`<text x="${labelX(sx).toFixed(2)}" y="${y + 23}" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${esc(r.sampleRateText)}</text>`);
    // Upper deviation limit: outlined bar, filled differently when it exceeds the tolerable rate.
    out.push(
      `<rect x="${left}" y="${y + 30}" width="${Math.max(ux - left, 1).toFixed(2)}" height="14" fill="${exceeds ? COLORS.exceed : COLORS.limit}" stroke="${exceeds ? COLORS.exceedStroke : COLORS.limitStroke}" stroke-width="1"/>`,
    );
    out.push(`<text x="${labelX(ux).toFixed(2)}" y="${y + 41}" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${esc(r.upperLimitText)}</text>`);
    // Tolerable rate: a vertical mark across the row, its value just above.
    out.push(`<line x1="${tx.toFixed(2)}" y1="${y + 6}" x2="${tx.toFixed(2)}" y2="${y + 50}" stroke="${COLORS.tolerable}" stroke-width="2.5"/>`);
    out.push(`<text x="${(tx + 4).toFixed(2)}" y="${y + 9}" font-family="${FONT}" font-size="9" fill="${COLORS.text}">${esc(r.tolerableRateText)}</text>`);
  });
  out.push('</svg>');
  return { svg: out.join('\n'), width, height, axisMax: axis.max, geometry, scale };
}

/** Font files worth pointing resvg at when present (system fonts are loaded as well). */
const FONT_FILES = [
  '/usr/share/fonts/truetype/dejavu/DejaVuSans.ttf',
  '/usr/share/fonts/truetype/dejavu/DejaVuSans-Bold.ttf',
  '/usr/share/fonts/TTF/DejaVuSans.ttf',
  '/usr/share/fonts/dejavu/DejaVuSans.ttf',
  '/usr/share/fonts/truetype/liberation2/LiberationSans-Regular.ttf',
  '/usr/share/fonts/truetype/liberation/LiberationSans-Regular.ttf',
  '/Library/Fonts/Arial.ttf',
  '/System/Library/Fonts/Supplemental/Arial.ttf',
  'C:\\Windows\\Fonts\\arial.ttf',
];

export function fontFiles(): string[] {
  return FONT_FILES.filter((f) => existsSync(f));
}

/**
 * Render the SVG to PNG at `zoom` times its size. Returns undefined when the renderer cannot run
 * on this machine (the memo then says so and keeps the table).
 */
export async function renderPng(svg: string, zoom = 2): Promise<Buffer | undefined> {
  try {
    const { Resvg } = await import('@resvg/resvg-js');
    const files = fontFiles();
    const r = new Resvg(svg, {
      fitTo: { mode: 'zoom', value: zoom },
      background: '#FFFFFF',
      font: {
        loadSystemFonts: true,
        fontFiles: files,
        defaultFontFamily: files.some((f) => /DejaVu/i.test(f)) ? 'DejaVu Sans' : files.some((f) => /Liberation/i.test(f)) ? 'Liberation Sans' : 'Arial',
      },
    });
    return Buffer.from(r.render().asPng());
  } catch {
    return undefined;
  }
}

/** One curve of the operating characteristic: the chance of relying on the control at each true rate. */
export interface OcCurve {
  id: string;
  points: ReadonlyArray<{ rate: number; acceptanceProbability: number }>;
  tolerableRate: number;
  expectedRate: number;
}

/**
 * The operating characteristic as a line chart: the chance of acceptance (relying on the control)
 * against the true deviation rate, one line per attribute, with the tolerable and expected rates
 * marked. At the tolerable rate the curve's height is the risk of overreliance; at the expected
 * rate one minus its height is the risk of underreliance.
 */
export function ocSvg(curves: readonly OcCurve[], labels: { x: string; y: string; tolerable: string; expected: string }, width = 620): { svg: string; width: number; height: number } {
  const left = 56;
  const right = 20;
  const top = 20;
  const bottom = 46;
  const height = 300;
  const plotW = width - left - right;
  const plotH = height - top - bottom;
  const maxRate = Math.max(...curves.flatMap((c) => c.points.map((p) => p.rate)), 0.01);
  const x = (r: number) => left + (r / maxRate) * plotW;
  const y = (p: number) => top + (1 - p) * plotH;
  const esc = (t: string) => t.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;');
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" font-family="${FONT}" font-size="11">`);
  parts.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#FFFFFF"/>`);
  for (let i = 0; i <= 4; i++) {
    const p = i / 4;
    parts.push(`<line x1="${left}" y1="${y(p).toFixed(1)}" x2="${left + plotW}" y2="${y(p).toFixed(1)}" stroke="#D9D9D9" stroke-width="1"/>`);
    parts.push(`<text x="${left - 6}" y="${(y(p) + 4).toFixed(1)}" text-anchor="end" fill="#404040">${Math.round(p * 100)}%</text>`);
  }
  const step = maxRate <= 0.1 ? 0.02 : 0.05;
  for (let r = 0; r <= maxRate + 1e-9; r += step) {
    parts.push(`<text x="${x(r).toFixed(1)}" y="${top + plotH + 16}" text-anchor="middle" fill="#404040">${Math.round(r * 1000) / 10}%</text>`);
  }
  parts.push(`<text x="${left + plotW / 2}" y="${height - 8}" text-anchor="middle" fill="#262626">${esc(labels.x)}</text>`);
  parts.push(`<text x="14" y="${top + plotH / 2}" text-anchor="middle" fill="#262626" transform="rotate(-90 14 ${top + plotH / 2})">${esc(labels.y)}</text>`);
  const shades = ['#2F5597', '#C55A11', '#548235', '#7030A0', '#BF9000', '#404040'];
  curves.forEach((c, i) => {
    const color = shades[i % shades.length]!;
    const d = c.points.map((p, j) => `${j === 0 ? 'M' : 'L'}${x(p.rate).toFixed(1)},${y(p.acceptanceProbability).toFixed(1)}`).join(' ');
    parts.push(`<path d="${d}" fill="none" stroke="${color}" stroke-width="2"/>`);
    const last = c.points[c.points.length - 1]!;
    parts.push(`<text x="${(x(last.rate) - 4).toFixed(1)}" y="${(y(last.acceptanceProbability) - 6 - i * 12).toFixed(1)}" text-anchor="end" fill="${color}">${esc(c.id)}</text>`);
  });
  const first = curves[0];
  if (first) {
    parts.push(`<line x1="${x(first.tolerableRate).toFixed(1)}" y1="${top}" x2="${x(first.tolerableRate).toFixed(1)}" y2="${top + plotH}" stroke="#000000" stroke-width="1.5" stroke-dasharray="5,3"/>`);
    parts.push(`<text x="${(x(first.tolerableRate) + 4).toFixed(1)}" y="${top + 12}" fill="#000000">${esc(labels.tolerable)}</text>`);
    parts.push(`<line x1="${x(first.expectedRate).toFixed(1)}" y1="${top}" x2="${x(first.expectedRate).toFixed(1)}" y2="${top + plotH}" stroke="#7F7F7F" stroke-width="1" stroke-dasharray="2,2"/>`);
    parts.push(`<text x="${(x(first.expectedRate) + 4).toFixed(1)}" y="${top + 26}" fill="#595959">${esc(labels.expected)}</text>`);
  }
  parts.push(`<rect x="${left}" y="${top}" width="${plotW}" height="${plotH}" fill="none" stroke="#A6A6A6" stroke-width="1"/>`);
  parts.push('</svg>');
  return { svg: parts.join(''), width, height };
}

/** One month of the spread picture: its share of the population's items and of the sample's. */
export interface SpreadBar {
  month: string;
  populationShare: number;
  sampleShare: number;
}

/** The spread's colours: the sample in the colour the rates picture gives the sample, the population in a neutral grey. */
export const SPREAD_COLORS = { population: '#A6A6A6', sample: COLORS.sample } as const;

/**
 * The spread of the sample over the period as a picture: for each month, two bars side by side,
 * its share of the population's items and its share of the sample's, to the same scale, so a month
 * the sample leaves out or covers heavily stands out. The same figures are in the table beside it.
 */
export function spreadSvg(bars: readonly SpreadBar[], labels: { population: string; sample: string }, width = 620, boundary?: { at: number; label: string }): { svg: string; width: number; height: number; geometry: Array<{ month: string; populationTop: number; sampleTop: number; base: number }> } {
  const left = 48;
  const right = 16;
  const top = 34;
  const plotH = 150;
  const bottom = 40;
  const height = top + plotH + bottom;
  const plotW = width - left - right;
  const max = Math.max(0, ...bars.flatMap((b) => [b.populationShare, b.sampleShare]));
  const axis = niceAxis(max);
  const y = (f: number) => top + plotH - (Math.min(Math.max(f, 0), axis.max) / axis.max) * plotH;
  const slot = bars.length ? plotW / bars.length : plotW;
  const barW = Math.max(2, Math.min(18, (slot - 4) / 2));
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`);
  out.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#FFFFFF"/>`);
  const col2 = left + Math.round(plotW / 2);
  out.push(`<rect x="${left}" y="8" width="18" height="10" fill="${SPREAD_COLORS.population}"/>`);
  out.push(`<text x="${left + 26}" y="17" font-family="${FONT}" font-size="11" fill="${COLORS.text}">${esc(labels.population)}</text>`);
  out.push(`<rect x="${col2}" y="8" width="18" height="10" fill="${SPREAD_COLORS.sample}"/>`);
  out.push(`<text x="${col2 + 26}" y="17" font-family="${FONT}" font-size="11" fill="${COLORS.text}">${esc(labels.sample)}</text>`);
  const nTicks = Math.round(axis.max / axis.step);
  for (let i = 0; i <= nTicks; i++) {
    const v = i * axis.step;
    const yy = y(v).toFixed(2);
    out.push(`<line x1="${left}" y1="${yy}" x2="${left + plotW}" y2="${yy}" stroke="${COLORS.grid}" stroke-width="1"/>`);
    out.push(`<text x="${left - 6}" y="${(y(v) + 3.5).toFixed(2)}" text-anchor="end" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${tickLabel(v)}</text>`);
  }
  const base = top + plotH;
  const geometry: Array<{ month: string; populationTop: number; sampleTop: number; base: number }> = [];
  bars.forEach((b, i) => {
    const cx = left + slot * i + slot / 2;
    const py = y(b.populationShare);
    const sy = y(b.sampleShare);
    geometry.push({ month: b.month, populationTop: py, sampleTop: sy, base });
    out.push(`<rect x="${(cx - barW - 1).toFixed(2)}" y="${py.toFixed(2)}" width="${barW.toFixed(2)}" height="${Math.max(base - py, 0).toFixed(2)}" fill="${SPREAD_COLORS.population}"/>`);
    out.push(`<rect x="${(cx + 1).toFixed(2)}" y="${sy.toFixed(2)}" width="${barW.toFixed(2)}" height="${Math.max(base - sy, 0).toFixed(2)}" fill="${SPREAD_COLORS.sample}"/>`);
    // Month number under each slot; the year under the first month and each January.
    const [yr, mo] = b.month.split('-');
    if (bars.length <= 36 || i % 3 === 0) out.push(`<text x="${cx.toFixed(2)}" y="${base + 14}" text-anchor="middle" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${esc(mo ?? '')}</text>`);
    if (i === 0 || mo === '01') out.push(`<text x="${cx.toFixed(2)}" y="${base + 28}" text-anchor="middle" font-family="${FONT}" font-size="10" font-weight="bold" fill="${COLORS.text}">${esc(yr ?? '')}</text>`);
  });
  out.push(`<line x1="${left}" y1="${base}" x2="${left + plotW}" y2="${base}" stroke="${COLORS.text}" stroke-width="1"/>`);
  out.push(`<line x1="${left}" y1="${top}" x2="${left}" y2="${base}" stroke="${COLORS.text}" stroke-width="1"/>`);
  // A test in parts: a dashed line where the interim part ends (at a slot's edge, or through the
  // middle of the month the interim date falls inside), labelled, so the two parts' months read apart.
  if (boundary && boundary.at > 0 && boundary.at < bars.length) {
    const bx = (left + slot * boundary.at).toFixed(2);
    out.push(`<line x1="${bx}" y1="${top - 6}" x2="${bx}" y2="${base}" stroke="${COLORS.text}" stroke-width="1" stroke-dasharray="4 3"/>`);
    out.push(`<text x="${(Number(bx) - 4).toFixed(2)}" y="${top - 2}" text-anchor="end" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${esc(boundary.label)}</text>`);
  }
  out.push('</svg>');
  return { svg: out.join('\n'), width, height, geometry };
}
