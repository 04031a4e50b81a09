/** Text output of `tolrate select`: the population fingerprint, the validation report, the selection. */
import { groupDigits } from '../../population/amount.js';
import type { PopulationScan } from '../../population/types.js';
import type { FieldworkItem, Selection } from '../../selection/index.js';
import { int } from '../../util/format.js';
import { wrap } from '../../util/text.js';
import { block as sharedBlock } from '../output.js';


/** "  label   value" lines, long values wrapped under themselves at 100 columns. */
export function block(rows: Array<[string, string]>, indent = '  ', width = 100): string[] {
  return sharedBlock(rows, indent, width);
}

function delimiterWords(d: string | undefined): string {
  return d === '\t' ? 'TAB' : d === ',' ? 'comma' : d === ';' ? 'semicolon' : d === '|' ? 'pipe' : JSON.stringify(d);
}

export function populationText(scan: PopulationScan, label: string): string[] {
  const f = scan.fingerprint;
  const rows: Array<[string, string]> = [];
  if (f.format === 'ranges') {
    rows.push(['Format', 'document-number ranges (no file)']);
    rows.push(['Ranges', f.canonical?.split('\n')[1]?.replace(/^ranges: /, '') ?? '']);
    const ex = f.canonical?.split('\n')[2]?.replace(/^excluded: ?/, '') ?? 'none';
    rows.push(['Excluded', ex !== 'none' ? `${ex} (${int(f.excludedCount ?? 0)} numbers in the ranges)` : 'none']);
    rows.push(['SHA-256', `${f.sha256} (of the canonical text of the ranges and exclusions)`]);
    rows.push(['Numbers', int(f.rowCount)]);
    rows.push(['First, last', f.rowCount ? `${f.firstKey}, ${f.lastKey}` : '-']);
  } else if (f.format === 'periods') {
    const lines = f.canonical?.split('\n') ?? [];
    const off = lines[3]?.replace(/^non-working days: ?/, '') ?? 'none';
    rows.push(['Format', 'the occurrences of a periodic control (no file)']);
    rows.push(['Each', lines[1]?.replace(/^frequency: /, '') ?? '']);
    rows.push(['Period', lines[2]?.replace(/^period: /, '') ?? '']);
    if (off !== 'none') rows.push(['Non-working', `${off} (${int(f.excludedCount ?? 0)} of them on a working day of the period, left out)`]);
    rows.push(['SHA-256', `${f.sha256} (of the canonical text of the frequency, the period and the non-working days)`]);
    rows.push(['Occurrences', int(f.rowCount)]);
    rows.push(['First, last', f.rowCount ? `${f.firstKey}, ${f.lastKey}` : '-']);
  } else {
    rows.push([
      'Format',
      f.format === 'csv' ? `CSV, ${delimiterWords(f.delimiter)} delimiter, ${int(f.bytes ?? 0)} bytes` : `XLSX, sheet "${f.sheet}", ${int(f.bytes ?? 0)} bytes`,
    ]);
    rows.push(['SHA-256', f.sha256]);
    rows.push(['Rows', `${int(f.rowCount)} (the header and blank lines are not counted)`]);
    rows.push(['Columns', f.columns.join(', ') || '-']);
    rows.push(['Key column', `${f.keyColumn}: first ${f.firstKey || '-'}, last ${f.lastKey || '-'}`]);
    if (f.amountColumn !== undefined) {
      rows.push(['Amount total', `${groupDigits(f.amountTotal ?? '0')} (column ${f.amountColumn}, ${int(f.amountCount ?? 0)} amounts read)`]);
    }
    if (f.dateColumn !== undefined) {
      rows.push(['Dates', f.dateRange ? `${f.dateRange.earliest} to ${f.dateRange.latest} (column ${f.dateColumn})` : `none read (column ${f.dateColumn})`]);
    }
  }
  return [`Population  ${label}`, ...block(rows)];
}

export function validationText(scan: PopulationScan): string[] {
  const v = scan.validation;
  const out: string[] = [];
  out.push(v.ok ? 'Validation  no problems found' : `Validation  ${v.messages.length} problem${v.messages.length === 1 ? '' : 's'}`);
  for (const m of v.messages) wrap(m, 96).forEach((l, i) => out.push(`${i === 0 ? '  - ' : '    '}${l}`));
  for (const n of v.notes) wrap(`Note: ${n}`, 96).forEach((l, i) => out.push(`${i === 0 ? '  ' : '        '}${l}`));
  return out;
}

export function selectionText(sel: Selection): string[] {
  const rows: Array<[string, string]> = [];
  const what = `${sel.method}, ${int(sel.sampleSize)} item${sel.sampleSize === 1 ? '' : 's'}${sel.spares ? ` + ${int(sel.spares)} spare${sel.spares === 1 ? '' : 's'}` : ''} from ${int(sel.populationSize)}`;
  rows.push(['Method', what]);
  if (sel.seed !== undefined) rows.push(['Seed', sel.seedDrawn ? `${sel.seed} (drawn by tolrate because none was given: record it)` : sel.seed]);
  if (sel.interval !== undefined) {
    rows.push(['Interval', `${sel.intervalExact} rows${sel.intervalExact?.includes('/') ? ` (${Number(sel.interval.toFixed(4))})` : ''}`]);
    rows.push(['Random starts', (sel.startsExact ?? []).map((s, i) => `${s} (${Number(sel.starts![i]!.toFixed(4))})`).join(', ')]);
  }
  if (sel.haphazard) {
    rows.push(['Chosen by', sel.haphazard.selectedBy]);
    rows.push(['How', sel.haphazard.how]);
  }
  rows.push(['Algorithm', sel.algorithm]);
  const out = ['Selection', ...block(rows)];
  if (sel.note) wrap(sel.note, 96).forEach((l) => out.push(`  ${l}`));
  return out;
}

export function itemsText(items: FieldworkItem[]): string[] {
  const wRow = Math.max(3, ...items.map((i) => int(i.row).length));
  const wSeq = Math.max(3, String(items.length).length);
  const out = ['Items', `  ${'Seq'.padStart(wSeq)}  Role    ${'Row'.padStart(wRow)}  Key`];
  for (const it of items) out.push(`  ${String(it.seq).padStart(wSeq)}  ${it.role.padEnd(6)}  ${int(it.row).padStart(wRow)}  ${it.key}`);
  return out;
}

/** Quote an argument for a shell command line when needed. */
export function shellWord(s: string): string {
  return /^[A-Za-z0-9_./:=,@+-]+$/.test(s) ? s : `'${s.replace(/'/g, "'\\''")}'`;
}
