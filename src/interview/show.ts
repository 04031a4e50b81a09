/**
 * Plain-text layout for the interview: aligned tables and wrapped paragraphs. No colour codes
 * here (the session adds them only when the terminal allows).
 */
import { wrap as wrapText } from '../util/text.js';

/**
 * An aligned table; columns whose cells all look numeric are right-aligned. When the table would
 * be wider than `maxWidth`, the last column is wrapped onto continuation lines.
 */
export function table(header: readonly string[], rows: readonly (readonly string[])[], indent = '  ', maxWidth = 100): string[] {
  const all = [header, ...rows];
  const widths = header.map((_, c) => Math.max(...all.map((r) => (r[c] ?? '').length)));
  const numeric = header.map((_, c) => rows.length > 0 && rows.every((r) => /^[-+]?[\d.,]+%?$|^—$|^[<≤>]/.test((r[c] ?? '').trim())));
  const last = header.length - 1;
  const before = indent.length + widths.slice(0, last).reduce((a, w) => a + w + 2, 0);
  if (last > 0 && !numeric[last] && before + widths[last]! > maxWidth) {
    widths[last] = Math.max(24, maxWidth - before, header[last]!.length);
  }
  const line = (r: readonly string[]) =>
    indent +
    r
      .map((cell, c) => (numeric[c] ? (cell ?? '').padStart(widths[c]!) : (cell ?? '').padEnd(widths[c]!)))
      .join('  ')
      .trimEnd();
  const lines = (r: readonly string[]): string[] => {
    const cell = r[last] ?? '';
    if (numeric[last] || cell.length <= widths[last]!) return [line(r)];
    const parts = wrap(cell, widths[last]!);
    const blank = r.map(() => '');
    return parts.map((p, i) => line([...(i === 0 ? r : blank).slice(0, last), p]));
  };
  return [line(header), indent + widths.map((w) => '-'.repeat(w)).join('  '), ...rows.flatMap(lines)];
}

/** Wrap at 92 columns by default (words are never split). */
export function wrap(text: string, width = 92, indent = ''): string[] {
  return wrapText(text, width, indent);
}

export const CAUTION =
  'The tool computes. Whether the control can be relied on, and how severe a deficiency is, are the ' +
  "practitioner's judgements under the auditing standards that apply to the engagement (e.g. AU-C 530, " +
  "ISA 530, AS 2315 for sampling) and the firm's methodology.";
