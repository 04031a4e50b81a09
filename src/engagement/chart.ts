/**
 * The engagement summary's picture: every attribute of every evaluated test, its upper deviation
 * limit as a bar against its tolerable rate (a vertical mark), on one axis for all. Compact rows,
 * so sixty tests fit on a few pages; long lists are cut into parts that share the axis. Drawn as
 * SVG with the memo chart's colours and axis, rendered to PNG by the memo's renderer.
 */
import { COLORS, niceAxis } from '../memo/chart.js';

export interface LimitRow {
  label: string;
  upperLimit: number;
  tolerableRate: number;
  upperLimitText: string;
}

const FONT = 'DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif';

function esc(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

export interface LimitChart {
  svg: string;
  width: number;
  height: number;
  /** For tests: where each row's bar ends and its mark is, in pixels. */
  geometry: Array<{ label: string; limitEnd: number; tolerableX: number; exceeds: boolean }>;
}

/** One part of the chart (rows drawn on the axis given, so every part reads the same). */
export function limitChart(rows: readonly LimitRow[], axisMax: number, step: number, legend: { limit: string; exceeds: string; tolerable: string }, width = 640): LimitChart {
  const left = 150;
  const right = 56;
  const top = 30;
  const rowH = 18;
  const bottom = 30;
  const plotW = width - left - right;
  const height = top + rowH * rows.length + bottom;
  const scale = (f: number) => left + (Math.min(Math.max(f, 0), axisMax) / axisMax) * plotW;
  const out: string[] = [];
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`);
  out.push(`<rect x="0" y="0" width="${width}" height="${height}" fill="#FFFFFF"/>`);
  out.push(`<rect x="${left}" y="8" width="18" height="10" fill="${COLORS.limit}" stroke="${COLORS.limitStroke}"/>`);
  out.push(`<text x="${left + 24}" y="17" font-family="${FONT}" font-size="11" fill="${COLORS.text}">${esc(legend.limit)}</text>`);
  out.push(`<rect x="${left + 170}" y="8" width="18" height="10" fill="${COLORS.exceed}" stroke="${COLORS.exceedStroke}"/>`);
  out.push(`<text x="${left + 194}" y="17" font-family="${FONT}" font-size="11" fill="${COLORS.text}">${esc(legend.exceeds)}</text>`);
  out.push(`<line x1="${left + 390}" y1="6" x2="${left + 390}" y2="20" stroke="${COLORS.tolerable}" stroke-width="2.5"/>`);
  out.push(`<text x="${left + 398}" y="17" font-family="${FONT}" font-size="11" fill="${COLORS.text}">${esc(legend.tolerable)}</text>`);
  const plotBottom = top + rowH * rows.length;
  const nTicks = Math.round(axisMax / step);
  for (let i = 0; i <= nTicks; i++) {
    const x = scale(i * step).toFixed(2);
    out.push(`<line x1="${x}" y1="${top}" x2="${x}" y2="${plotBottom}" stroke="${COLORS.grid}" stroke-width="1"/>`);
    out.push(`<text x="${x}" y="${plotBottom + 16}" text-anchor="middle" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${Number((i * step * 100).toFixed(2))}%</text>`);
  }
  out.push(`<line x1="${left}" y1="${plotBottom}" x2="${left + plotW}" y2="${plotBottom}" stroke="${COLORS.text}" stroke-width="1"/>`);
  const geometry: LimitChart['geometry'] = [];
  rows.forEach((r, i) => {
    const y = top + i * rowH;
    const exceeds = r.upperLimit > r.tolerableRate + 1e-12;
    const ux = scale(r.upperLimit);
    const tx = scale(r.tolerableRate);
    geometry.push({ label: r.label, limitEnd: ux, tolerableX: tx, exceeds });
    out.push(`<text x="${left - 6}" y="${y + 13}" text-anchor="end" font-family="${FONT}" font-size="10" fill="${COLORS.text}">${esc(r.label)}</text>`);
    out.push(`<rect x="${left}" y="${y + 3}" width="${Math.max(ux - left, 1).toFixed(2)}" height="12" fill="${exceeds ? COLORS.exceed : COLORS.limit}" stroke="${exceeds ? COLORS.exceedStroke : COLORS.limitStroke}" stroke-width="1"/>`);
    out.push(`<line x1="${tx.toFixed(2)}" y1="${y + 1}" x2="${tx.toFixed(2)}" y2="${y + 17}" stroke="${COLORS.tolerable}" stroke-width="2.5"/>`);
    // The value just after its bar; after the mark instead when the mark would cross it.
    const lx = tx >= ux - 2 && tx <= ux + 34 ? tx + 5 : ux + 5;
    out.push(`<text x="${lx.toFixed(2)}" y="${y + 13}" font-family="${FONT}" font-size="9" fill="${COLORS.text}">${esc(r.upperLimitText)}</text>`);
  });
  out.push('</svg>');
  return { svg: out.join('\n'), width, height, geometry };
}

/** The whole chart in parts of at most `perPart` rows (28 fit a landscape A4 page with the caption), on one axis. */
export function limitChartParts(rows: readonly LimitRow[], legend: { limit: string; exceeds: string; tolerable: string }, perPart = 28): LimitChart[] {
  if (rows.length === 0) return [];
  const axis = niceAxis(Math.max(...rows.flatMap((r) => [r.upperLimit, r.tolerableRate])));
  const parts: LimitChart[] = [];
  for (let i = 0; i < rows.length; i += perPart) parts.push(limitChart(rows.slice(i, i + perPart), axis.max, axis.step, legend));
  return parts;
}
