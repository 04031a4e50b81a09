/**
 * Text going out: into XML (DOCX, XLSX) and onto the terminal.
 *
 * XML 1.0 (W3C Recommendation, 5th edition, section 2.2 "Characters") allows
 *   #x9 | #xA | #xD | [#x20-#xD7FF] | [#xE000-#xFFFD] | [#x10000-#x10FFFF]
 * so C0 controls other than tab, LF and CR, U+FFFE, U+FFFF and lone surrogates are removed.
 */

// eslint-disable-next-line no-control-regex
const NOT_XML = /[\u0000-\u0008\u000B\u000C\u000E-\u001F\uFFFE\uFFFF]|[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/g;

/** `text` with every character XML 1.0 forbids removed, and how many were removed. */
export function xmlSafe(text: string): { text: string; removed: number } {
  let removed = 0;
  const out = text.replace(NOT_XML, () => {
    removed++;
    return '';
  });
  return { text: out, removed };
}

/** Just the cleaned text. */
export function xmlText(text: string): string {
  return xmlSafe(text).text;
}

/** Where characters were removed from, and how many. */
export interface Removal {
  where: string;
  count: number;
}

function keyPath(path: readonly (string | number)[]): string {
  let s = '';
  for (const p of path) s += typeof p === 'number' ? `[${p}]` : s === '' ? p : `.${p}`;
  return s || '(text)';
}

/**
 * A deep copy of a JSON-like value with every string (and key) cleaned for XML, and the list of
 * places where something was removed (`prefix` names the value, e.g. "workpaper").
 */
export function xmlSafeDeep<T>(value: T, prefix = ''): { value: T; removals: Removal[] } {
  const removals: Removal[] = [];
  const walk = (v: unknown, path: (string | number)[]): unknown => {
    if (typeof v === 'string') {
      const r = xmlSafe(v);
      if (r.removed) removals.push({ where: (prefix ? `${prefix} ` : '') + keyPath(path), count: r.removed });
      return r.text;
    }
    if (Array.isArray(v)) return v.map((x, i) => walk(x, [...path, i]));
    if (v && typeof v === 'object' && Object.getPrototypeOf(v) === Object.prototype) {
      const o: Record<string, unknown> = {};
      for (const [k, x] of Object.entries(v)) o[xmlSafe(k).text] = walk(x, [...path, k]);
      return o;
    }
    return v;
  };
  return { value: walk(value, []) as T, removals };
}

// C0 controls, DEL, C1 controls, and the bidirectional overrides and isolates that can hide or
// reorder text on a terminal.
// eslint-disable-next-line no-control-regex
const INVISIBLE = /[\u0000-\u001F\u007F-\u009F\u202A-\u202E\u2066-\u2069]/g;
// eslint-disable-next-line no-control-regex
const INVISIBLE_KEEP_LINES = /[\u0000-\u0008\u000B-\u001F\u007F-\u009F\u202A-\u202E\u2066-\u2069]/g;

function shown(c: string): string {
  const n = c.charCodeAt(0);
  if (c === '\t') return '\\t';
  if (c === '\n') return '\\n';
  if (c === '\r') return '\\r';
  return n < 0x100 ? `\\x${n.toString(16).padStart(2, '0')}` : `\\u${n.toString(16).padStart(4, '0')}`;
}

/**
 * Text from a file made safe to show on a terminal: control and escape characters are written
 * out (ESC as `\x1b`, a tab as `\t`), so a key cannot retitle the window, move the cursor or hide
 * text. With `keepLines`, line breaks and tabs of a message are kept.
 */
export function visible(text: string, o: { keepLines?: boolean } = {}): string {
  return text.replace(o.keepLines ? INVISIBLE_KEEP_LINES : INVISIBLE, shown);
}

/** True when `text` holds a character that `visible` would write out. */
export function hasControl(text: string): boolean {
  INVISIBLE.lastIndex = 0;
  const r = INVISIBLE.test(text);
  INVISIBLE.lastIndex = 0;
  return r;
}
