/**
 * The text of a cell value as a user sees it: numbers to at most 15 significant digits (what a
 * spreadsheet shows; 1234.5599999999999 is 1234.56), dates as yyyy-mm-dd (with the time when
 * there is one), formulas as their last computed result, rich text as its plain text. The values
 * are the shapes exceljs gives (it writes the fieldwork sheet, and the tests compare with it).
 */

function pad(n: number, w = 2): string {
  return String(n).padStart(w, '0');
}

export function cellText(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'string') return v;
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) return String(v);
    if (Number.isInteger(v) && Math.abs(v) < 1e21) return String(v);
    return String(Number(v.toPrecision(15)));
  }
  if (typeof v === 'boolean') return v ? 'TRUE' : 'FALSE';
  if (v instanceof Date) {
    if (Number.isNaN(v.getTime())) return '';
    const d = `${pad(v.getUTCFullYear(), 4)}-${pad(v.getUTCMonth() + 1)}-${pad(v.getUTCDate())}`;
    const h = v.getUTCHours();
    const m = v.getUTCMinutes();
    const s = v.getUTCSeconds();
    return h || m || s ? `${d} ${pad(h)}:${pad(m)}:${pad(s)}` : d;
  }
  if (typeof v === 'object') {
    const o = v as Record<string, unknown>;
    if (Array.isArray(o.richText)) return (o.richText as Array<{ text?: string }>).map((r) => r.text ?? '').join('');
    if ('formula' in o || 'sharedFormula' in o) return cellText(o.result);
    if ('hyperlink' in o) return cellText(o.text);
    if ('error' in o) return String(o.error);
    if ('text' in o) return cellText(o.text);
  }
  return String(v);
}

