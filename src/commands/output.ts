/** Text and JSON output shared by the commands. */
import { wrap } from '../util/text.js';
import type { CommandContext } from './types.js';

/**
 * "  label   value" lines with the labels padded to one width. With a `width`, long values are
 * wrapped under themselves; without one, each value stays on its line.
 */
export function block(rows: Array<[string, string]>, indent = '  ', width = Infinity): string[] {
  const w = Math.max(...rows.map(([l]) => l.length));
  const out: string[] = [];
  for (const [l, v] of rows) {
    const lines = Number.isFinite(width) ? wrap(v, Math.max(30, width - indent.length - w - 2)) : [v];
    out.push(`${indent}${l.padEnd(w)}  ${lines[0] ?? ''}`.trimEnd());
    for (const more of lines.slice(1)) out.push(`${indent}${' '.repeat(w)}  ${more}`);
  }
  return out;
}

/** Print `value` as JSON when asked, else its human rendering. */
export function printResult<T>(ctx: CommandContext, json: boolean, value: T, render: (v: T) => string): void {
  ctx.stdout.write(json ? `${JSON.stringify(value, null, 2)}\n` : render(value));
}
