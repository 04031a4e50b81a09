/**
 * The picture of the rates: drawn to scale, so it is right even when no text can be drawn.
 * The pixels are read back from resvg with no fonts loaded at all.
 */
import { Resvg } from '@resvg/resvg-js';
import { describe, expect, it } from 'vitest';
import { chartSvg, COLORS, niceAxis, renderPng, type ChartRow } from '../../src/memo/chart.js';

const rows: ChartRow[] = [
  // n = 78, k = 2 at 95%: 2/78 and the binomial limit 7.852% (@stdlib/stats-base-dists-beta-quantile(0.95, 3, 76)).
  { id: 'A1', sampleRate: 2 / 78, upperLimit: 0.07852108907382152, tolerableRate: 0.06, sampleRateText: '2.6%', upperLimitText: '7.9%', tolerableRateText: '6.0%' },
  // n = 78, k = 0: the limit 1 − 0.05^(1/78) = 3.768% (same library, (0.95, 1, 78)).
  { id: 'A2', sampleRate: 0, upperLimit: 0.03767863420096847, tolerableRate: 0.06, sampleRateText: '0.0%', upperLimitText: '3.8%', tolerableRateText: '6.0%' },
];
const labels = { sampleRate: 'Sample deviation rate', upperLimit: 'Upper deviation limit', exceeds: 'Above', tolerable: 'Tolerable rate' };

function hex(rgb: readonly number[]): string {
  return `#${rgb.map((v) => v.toString(16).padStart(2, '0').toUpperCase()).join('')}`;
}

/** Render with no font at all, return a pixel reader in SVG coordinates (zoom 2). */
function pixelsWithoutText(svg: string) {
  const r = new Resvg(svg, { fitTo: { mode: 'zoom', value: 2 }, font: { loadSystemFonts: false, fontFiles: [] } });
  const img = r.render();
  const px = img.pixels;
  return (x: number, y: number) => {
    const i = (Math.round(y * 2) * img.width + Math.round(x * 2)) * 4;
    return hex([px[i]!, px[i + 1]!, px[i + 2]!]);
  };
}

describe('the rates chart', () => {
  it('draws each bar to scale against the tolerable mark', () => {
    const c = chartSvg(rows, labels, 620);
    expect(c.axisMax).toBe(0.1); // 7.85% / 0.85 = 9.2%, next round step of 1%: 10%
    const [a1, a2] = c.geometry;
    const left = c.scale(0);
    const per = (c.scale(0.1) - left) / 0.1;
    expect(a1!.sampleEnd - left).toBeCloseTo((2 / 78) * per, 6);
    expect(a1!.limitEnd - left).toBeCloseTo(0.07852108907382152 * per, 6);
    expect(a1!.tolerableX - left).toBeCloseTo(0.06 * per, 6);
    expect(a1!.exceeds).toBe(true);
    expect(a2!.exceeds).toBe(false);
  });

  it('shows the same figures with no font available: bars end where the rates are, the breach is coloured', () => {
    const c = chartSvg(rows, labels, 620);
    const at = pixelsWithoutText(c.svg);
    const top = 56;
    const rowH = 54;
    const sampleY = (i: number) => top + i * rowH + 19; // middle of the sample bar
    const limitY = (i: number) => top + i * rowH + 37; // middle of the limit bar
    const [a1, a2] = c.geometry;
    // A1: sample bar solid up to 2.564%, not beyond.
    expect(at(a1!.sampleEnd - 3, sampleY(0))).toBe(COLORS.sample);
    expect(at(a1!.sampleEnd + 3, sampleY(0))).not.toBe(COLORS.sample);
    // A1: limit bar beyond the tolerable mark, in the breach colour, up to 7.852%.
    expect(at(a1!.tolerableX + 6, limitY(0))).toBe(COLORS.exceed);
    expect(at(a1!.limitEnd - 3, limitY(0))).toBe(COLORS.exceed);
    expect(at(a1!.limitEnd + 4, limitY(0))).not.toBe(COLORS.exceed);
    // The tolerable mark itself.
    expect(at(a1!.tolerableX, top + 8)).toBe(COLORS.tolerable);
    // A2: limit bar in the within-limit colour, ending before the mark.
    expect(at(a2!.limitEnd - 3, limitY(1))).toBe(COLORS.limit);
    expect(at(a2!.limitEnd + 4, limitY(1))).not.toBe(COLORS.limit);
    expect(a2!.limitEnd).toBeLessThan(a2!.tolerableX);
  });

  it('renders to PNG with the fonts found', async () => {
    const c = chartSvg(rows, labels, 620);
    const png = await renderPng(c.svg, 2);
    expect(png).toBeDefined();
    // PNG IHDR: width and height at offsets 16 and 20 (PNG specification).
    expect(png!.readUInt32BE(16)).toBe(1240);
    expect(png!.readUInt32BE(20)).toBe(c.height * 2);
  });

  it('escapes text and picks round axes', () => {
    const c = chartSvg([{ ...rows[0]!, id: 'A<1>&' }], labels);
    expect(c.svg).toContain('A&lt;1&gt;&amp;');
    expect(niceAxis(0.3)).toEqual({ max: 0.4, step: 0.05 });
    expect(niceAxis(1)).toEqual({ max: 1, step: 0.2 });
    expect(niceAxis(0)).toEqual({ max: 0.01, step: 0.002 });
  });
});

describe('the colour follows the decision', () => {
  it('a hypergeometric limit equal to the tolerable rate is drawn as not supporting reliance', async () => {
    const { chartSvg } = await import('../../src/memo/chart.js');
    const { upperLimit, limitDecision } = await import('../../src/stats/index.js');
    // 1 deviation in 88 from N = 1,000 at 95%: the exact limit is 50/1,000 = 5% exactly, which the
    // count rule does not support (issue check value, re-derived here by the engine's own rule).
    const lim = upperLimit({ sampleSize: 88, deviations: 1, confidence: 0.95, populationSize: 1000 });
    expect(lim.rate).toBe(0.05);
    const dec = limitDecision({ sampleSize: 88, deviations: 1, confidence: 0.95, tolerableRate: 0.05, populationSize: 1000 });
    expect(dec.supported).toBe(false);
    const labels = { sampleRate: 's', upperLimit: 'u', exceeds: 'x', tolerable: 't' };
    const row = { id: 'A1', sampleRate: 1 / 88, upperLimit: lim.rate, tolerableRate: 0.05, sampleRateText: '1.1%', upperLimitText: '5.0%', tolerableRateText: '5%' };
    expect(chartSvg([row], labels, 600).geometry[0]!.exceeds).toBe(false);
    expect(chartSvg([{ ...row, exceeds: !dec.supported }], labels, 600).geometry[0]!.exceeds).toBe(true);
  });
});
