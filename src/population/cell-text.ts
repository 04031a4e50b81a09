/**
 * The text of a cell value as a user sees it: numbers to at most 15 significant digits (what a
 * spreadsheet shows; 1234.5599999999999 is 1234.56), dates as yyyy-mm-dd (with the time when
 * there is one), formulas as their last computed result, rich text as its plain text. The values
 * are the shapes exceljs gives (it writes the fieldwork sheet, and the tests compare with it).
 *
 * The workbook reader (xlsx-scan.ts) gives the texts exceljs's streaming reader gave, cell for
 * cell (tests/population/xlsx-property.test.ts), except where that reader lost or damaged the
 * value; there it follows the file format (tests/population/xlsx-reader.test.ts):
 * - a formula's cached value is read like a constant of its type: 0 is "0" and FALSE "FALSE"
 *   (exceljs: blank), TRUE is "TRUE" (exceljs: "1"), an error is its code (exceljs: blank), and a
 *   result with a date format is a date (exceljs: the serial number);
 * - an inline string is all its runs (exceljs: the last run); a phonetic reading (rPh) is not
 *   part of the text (exceljs: it replaced the text);
 * - entities are decoded once (exceljs decoded inline strings and sheet names twice);
 * - a character cut by a 16 KiB chunk boundary of the unpacked XML stays whole (exceljs: U+FFFD);
 * - ISO 8601 date cells (t="d") are dates (exceljs: the year as a number); date1904="true" is
 *   honoured like date1904="1"; an empty <v/> is blank (exceljs: "NaN").
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

