/**
 * Planning, the population: the source (CSV or XLSX file, or document-number ranges), its key
 * column (picked from the columns found) and optional amount and date columns, the validation
 * report (going on despite problems needs a recorded reason), the sampling unit and the
 * completeness tie-out against the ledger figures the user enters.
 */
import { basename, relative, resolve, sep } from 'node:path';
import { groupDigits, parseNonWorkingDays, parseRanges, PERIOD_FREQUENCIES, scanPopulation, type PopulationScan, type PopulationSource as ReadSource } from '../population/index.js';
import { TolrateInputError } from '../errors.js';
import type { Population, PopulationSource } from '../workpaper/schema.js';
import { int } from '../util/format.js';
import type { Session } from './session.js';
import { partPeriod } from '../control-test/index.js';
import { AnswerError, existingFile, NONE_ANSWER, optionalCount, optionalDecimal, optionalText, requiredText } from './parse.js';
import { csvColumns, sheetList, xlsxColumns, xlsxSheets } from './columns.js';
import { wrap } from './show.js';

/** a − b for decimal strings, exactly. */
export function decimalDifference(a: string, b: string): string {
  const scale = Math.max((a.split('.')[1] ?? '').length, (b.split('.')[1] ?? '').length);
  const big = (x: string) => {
    const neg = x.startsWith('-');
    const [i, f = ''] = x.replace(/^-/, '').split('.');
    const v = BigInt(`${i}${f.padEnd(scale, '0')}`);
    return neg ? -v : v;
  };
  const d = big(a) - big(b);
  const neg = d < 0n;
  const abs = (neg ? -d : d).toString().padStart(scale + 1, '0');
  const text = scale > 0 ? `${abs.slice(0, abs.length - scale)}.${abs.slice(abs.length - scale)}` : abs;
  return `${neg ? '-' : ''}${text}`;
}

export function isZeroDecimal(d: string): boolean {
  return /^-?0*(\.0*)?$/.test(d);
}

/** Where the population is read from, with the path resolved against the workpaper's folder. */
export function readSource(src: PopulationSource, workpaperDir: string): ReadSource {
  if (src.kind === 'ranges') return { kind: 'ranges', ranges: src.ranges, exclusions: src.exclusions };
  if (src.kind === 'periods') return { ...src };
  return { ...src, path: resolve(workpaperDir, src.path) } as ReadSource;
}

/** The population report: fingerprint and validation, as lines. */
export function scanLines(scan: PopulationScan): string[] {
  const f = scan.fingerprint;
  const v = scan.validation;
  const lines = [
    `  Sampling units: ${int(f.rowCount)} (${f.format}${f.sheet ? `, sheet "${f.sheet}"` : ''})`,
    `  First key ${f.firstKey || '-'}, last key ${f.lastKey || '-'}`,
  ];
  if (f.amountTotal !== undefined) lines.push(`  Total of ${f.amountColumn}: ${groupDigits(f.amountTotal)}`);
  if (f.dateRange) lines.push(`  Dates in ${f.dateColumn}: ${f.dateRange.earliest} to ${f.dateRange.latest}`);
  lines.push(`  SHA-256 ${f.sha256}`);
  if (v.ok) lines.push('  Validation: no problems found.');
  else {
    lines.push('  Validation found problems:');
    // The bullet on the first line only; its continuation lines are indented under the text.
    for (const m of v.messages) lines.push(...wrap(m, 92, '      ').map((l, i) => (i === 0 ? `    - ${l.slice(6)}` : l)));
  }
  for (const n of v.notes) lines.push(...wrap(`Note: ${n}`, 92, '    '));
  return lines;
}

function guessColumn(columns: readonly string[], re: RegExp): string | undefined {
  return columns.find((c) => re.test(c));
}

/**
 * A periodic control's population: the period's months, quarters, weeks or working days, made
 * from the engagement's period and the control's frequency (no file to make by hand).
 */
async function askPeriods(s: Session, old: Extract<PopulationSource, { kind: 'periods' }> | undefined): Promise<SourceTry> {
  const a = s.asker;
  // The dates of the part being planned: the interim part ends at the interim date of a test done in parts.
  const period = partPeriod(s.wp, 'interim')!;
  const e = { periodStart: period.start, periodEnd: period.end };
  const fromControl = s.wp.control?.frequency;
  const frequency = await a.select({
    id: 'plan.population.frequency',
    message: `One sampling unit for each (period ${e.periodStart} to ${e.periodEnd})`,
    choices: [
      { value: 'monthly' as const, name: 'Month (a monthly control)' },
      { value: 'quarterly' as const, name: 'Quarter (a quarterly control)' },
      { value: 'weekly' as const, name: 'Week, Monday to Sunday (a weekly control)' },
      { value: 'daily' as const, name: 'Working day, Monday to Friday (a daily control)' },
    ],
    default: old?.frequency ?? (fromControl && (PERIOD_FREQUENCIES as readonly string[]).includes(fromControl) ? (fromControl as (typeof PERIOD_FREQUENCIES)[number]) : 'monthly'),
  });
  const nonWorkingDays =
    frequency === 'daily'
      ? await a.text({
          id: 'plan.population.nonWorkingDays',
          message: 'Non-working days besides Saturdays and Sundays (YYYY-MM-DD, separated by commas), blank = none',
          help: 'Public holidays and closures on which the control does not run, e.g. 2025-12-25, 2025-12-26',
          default: old?.nonWorkingDays.join(', ') ?? '',
          parse: (t) => {
            try {
              return parseNonWorkingDays(t);
            } catch (err) {
              throw new AnswerError(err instanceof Error ? err.message : String(err));
            }
          },
        })
      : [];
  const source: PopulationSource = { kind: 'periods', frequency, start: e.periodStart, end: e.periodEnd, nonWorkingDays };
  const read = readSource(source, s.dir);
  try {
    return { ok: true, source, read, scan: await scanPopulation(read) };
  } catch (err) {
    if (err instanceof TolrateInputError) {
      s.print(`  ${err.message}`, ...err.details.map((d) => `    ${d}`));
      return { ok: false, tried: source };
    }
    throw err;
  }
}

/** One try at the population: what was read, or the answers given so far (the defaults of the next try). */
type SourceTry = { ok: true; source: PopulationSource; read: ReadSource; scan: PopulationScan } | { ok: false; tried: PopulationSource };

/**
 * Ask where the population is and read it. `previous` is what the last try in this sitting
 * answered (it failed, or was not accepted): its answers are the defaults, so a retry only
 * changes what was wrong. Without one, the saved population's answers are the defaults.
 */
async function askSource(s: Session, previous?: PopulationSource, defaultKind?: PopulationSource['kind']): Promise<SourceTry> {
  const a = s.asker;
  const old = previous ?? s.wp.population?.source;
  const preset = old?.kind ?? defaultKind;
  const kind = await a.select({
    id: 'plan.population.kind',
    message: 'Where is the population?',
    choices: [
      { value: 'file', name: 'A file listing the items (CSV or XLSX)' },
      { value: 'ranges', name: 'Document-number ranges (e.g. 40001-52650), less voided numbers' },
      { value: 'periods', name: 'The occurrences of a periodic control: each month, quarter, week or working day of the period' },
    ],
    default: preset === 'ranges' ? 'ranges' : preset === 'periods' ? 'periods' : 'file',
  });
  if (kind === 'periods') return askPeriods(s, old?.kind === 'periods' ? old : undefined);
  if (kind === 'ranges') {
    const ranges = await a.text({
      id: 'plan.population.ranges',
      message: 'Document-number ranges',
      help: 'FIRST-LAST, separated by commas: 40001-52650,60001-61200',
      ...(old?.kind === 'ranges' ? { default: old.ranges } : {}),
      parse: (t) => {
        const v = requiredText('The ranges')(t);
        parseRanges({ kind: 'ranges', ranges: v });
        return v;
      },
    });
    const excl = await a.text({
      id: 'plan.population.exclusions',
      message: 'Numbers to leave out (voided or unused), blank = none',
      default: old?.kind === 'ranges' ? old.exclusions.join(',') : '',
      parse: (t) => {
        const v = optionalText(t);
        if (v) parseRanges({ kind: 'ranges', ranges, exclusions: [v] });
        return v;
      },
    });
    const source: PopulationSource = { kind: 'ranges', ranges, exclusions: excl ? [excl] : [] };
    const read = readSource(source, s.dir);
    try {
      return { ok: true, source, read, scan: await scanPopulation(read, { progress: s.out }) };
    } catch (e) {
      if (e instanceof TolrateInputError) {
        s.print(`  ${e.message}`, ...e.details.map((d) => `    ${d}`));
        return { ok: false, tried: source };
      }
      throw e;
    }
  }
  const oldAbs = old && (old.kind === 'csv' || old.kind === 'xlsx') ? resolve(s.dir, old.path) : undefined;
  const abs = await a.text({
    id: 'plan.population.file',
    message: 'Population file (CSV or XLSX)',
    help: 'A path relative to this folder, or absolute.',
    ...(oldAbs ? { default: relative(s.cwd, oldAbs) || oldAbs } : {}),
    parse: existingFile('The population file', s.cwd, ['.csv', '.txt', '.tsv', '.xlsx']),
  });
  const isXlsx = abs.toLowerCase().endsWith('.xlsx');
  const rel = relative(s.dir, abs).split(sep).join('/') || abs;
  // What a failed try keeps for the next one: the file (and sheet), and the columns chosen before.
  const sameFile = old !== undefined && (old.kind === 'csv' || old.kind === 'xlsx') && resolve(s.dir, old.path) === abs;
  const keep = (extra: { sheet?: string }): PopulationSource => {
    const base = { path: rel, keyColumn: sameFile ? old.keyColumn : '', ...(sameFile && old.amountColumn ? { amountColumn: old.amountColumn } : {}), ...(sameFile && old.dateColumn ? { dateColumn: old.dateColumn } : {}) };
    return isXlsx ? { kind: 'xlsx', ...base, ...(extra.sheet ? { sheet: extra.sheet } : {}) } : { kind: 'csv', ...base };
  };
  let columns: string[];
  let sheet: string | undefined;
  try {
    if (isXlsx) {
      // The sheets are listed and one is named as the default, so a notes or cover sheet in
      // front of the data is not read as the population without the user seeing it.
      // A hidden sheet is never the default; with more than one visible sheet the user picks.
      const sheets = await xlsxSheets(abs);
      const names = sheets.map((x) => x.name);
      const visible = sheets.filter((x) => !x.hidden);
      const oldSheet = sameFile && old.kind === 'xlsx' ? old.sheet : undefined;
      const want =
        visible.length === 1 && sheets.length === 1
          ? visible[0]!.name
          : visible.length === 1 && oldSheet === undefined
            ? visible[0]!.name
            : await a.text({
                id: 'plan.population.sheet',
                message: 'Worksheet',
                help: `Sheets in ${basename(abs)}: ${sheetList(sheets)}.`,
                default: oldSheet ?? visible[0]?.name ?? '',
                parse: (t) => {
                  const v = requiredText('The worksheet')(t);
                  const hit = names.find((n) => n === v) ?? names.find((n) => n.toLowerCase() === v.toLowerCase());
                  if (!hit) throw new AnswerError(`There is no sheet "${v}" in ${basename(abs)}. Sheets: ${sheetList(sheets)}.`);
                  return hit;
                },
              });
      const got = await xlsxColumns(abs, want);
      sheet = got.sheet;
      columns = got.columns;
      if (names.length > 1) s.print(`  Sheet "${sheet}" (${names.length} sheets in the workbook)`);
      if (sheets.some((x) => x.hidden)) s.print(`  Sheets: ${sheetList(sheets)}; a hidden sheet is read only when it is named.`);
    } else columns = await csvColumns(abs);
  } catch (e) {
    if (e instanceof TolrateInputError) {
      s.print(`  ${e.message}`, ...e.details.map((d) => `    ${d}`));
      return { ok: false, tried: keep(sheet ? { sheet } : {}) };
    }
    throw e;
  }
  s.print(`  Columns found: ${columns.join(', ')}`);
  const prevKey = old && (old.kind === 'csv' || old.kind === 'xlsx') && columns.includes(old.keyColumn) ? old.keyColumn : undefined;
  const keyColumn = await a.select({
    id: 'plan.population.keyColumn',
    message: 'Key column (identifies each sampling unit, e.g. the document number)',
    choices: columns.map((c) => ({ value: c, name: c })),
    default: prevKey ?? columns[0]!,
  });
  const NONE = '(none)';
  const optChoices = [{ value: NONE, name: 'None' }, ...columns.filter((c) => c !== keyColumn).map((c) => ({ value: c, name: c }))];
  const prevAmount = old && (old.kind === 'csv' || old.kind === 'xlsx') ? old.amountColumn : undefined;
  const amount = await a.select({
    id: 'plan.population.amountColumn',
    message: 'Amount column (totalled for the tie-out), if any',
    choices: optChoices,
    default: prevAmount && columns.includes(prevAmount) ? prevAmount : (guessColumn(columns, /amount|value|total|gross/i) ?? NONE),
  });
  const prevDate = old && (old.kind === 'csv' || old.kind === 'xlsx') ? old.dateColumn : undefined;
  const dateCol = await a.select({
    id: 'plan.population.dateColumn',
    message: 'Date column (checked against the period), if any',
    choices: optChoices,
    default: prevDate && columns.includes(prevDate) ? prevDate : (guessColumn(columns, /date|posted|_on$/i) ?? NONE),
  });
  const source: PopulationSource = isXlsx
    ? { kind: 'xlsx', path: rel, keyColumn, ...(sheet ? { sheet } : {}), ...(amount !== NONE ? { amountColumn: amount } : {}), ...(dateCol !== NONE ? { dateColumn: dateCol } : {}) }
    : { kind: 'csv', path: rel, keyColumn, ...(amount !== NONE ? { amountColumn: amount } : {}), ...(dateCol !== NONE ? { dateColumn: dateCol } : {}) };
  const read = readSource(source, s.dir);
  s.print('  Reading the population...');
  try {
    return { ok: true, source, read, scan: await scanPopulation(read, { progress: s.out }) };
  } catch (e) {
    if (e instanceof TolrateInputError) {
      s.print(`  ${e.message}`, ...e.details.map((d) => `    ${d}`));
      return { ok: false, tried: source };
    }
    throw e;
  }
}

/** The population step. `defaultKind`: the kind of source offered first (the roll-forward offers the interim part's). */
export async function askPopulation(s: Session, o: { defaultKind?: PopulationSource['kind']; heading?: string } = {}): Promise<Population> {
  const a = s.asker;
  const old = s.wp.population;
  s.heading(o.heading ?? 'Population');
  let got: Extract<SourceTry, { ok: true }>;
  let acceptedReason: string | undefined;
  let previous: PopulationSource | undefined;
  for (;;) {
    const tried = await askSource(s, previous, o.defaultKind);
    if (!tried.ok) {
      previous = tried.tried;
      s.print('  Choose the population again (your answers are kept as the defaults).');
      continue;
    }
    got = tried;
    previous = got.source;
    s.print('', ...scanLines(got.scan));
    const pp = partPeriod(s.wp, 'interim');
    const dr = got.scan.fingerprint.dateRange;
    if (pp && dr && (dr.earliest < pp.start || dr.latest > pp.end)) {
      s.print(...wrap(`Warning: the dates run from ${dr.earliest} to ${dr.latest}, outside the period ${pp.start} to ${pp.end}.`, 92, '  '));
    }
    if (got.scan.fingerprint.rowCount === 0) {
      s.print('  The population is empty: there is nothing to sample.');
      continue;
    }
    if (got.scan.validation.ok) break;
    const go = await a.confirm({
      id: 'plan.population.goOn',
      message: 'Go on with this population despite the problems listed?',
      help: 'If you go on, your reason is recorded in the workpaper and the memo.',
      default: false,
    });
    if (!go) {
      s.print('  Fix the population (or choose another) and answer again.');
      continue;
    }
    acceptedReason = await a.text({
      id: 'plan.population.acceptedReason',
      message: 'Why is it right to go on?',
      ...(old?.validation.acceptedReason ? { default: old.validation.acceptedReason } : {}),
      parse: requiredText('The reason'),
    });
    break;
  }
  const { source, scan } = got;
  const f = scan.fingerprint;
  const samplingUnit = await a.text({
    id: 'plan.population.samplingUnit',
    message: 'Sampling unit (what one row is)',
    help: 'E.g. "one supplier invoice paid in the period".',
    ...(old ? { default: old.samplingUnit } : {}),
    parse: requiredText('The sampling unit'),
  });
  const description = await a.text({
    id: 'plan.population.description',
    message: 'Description of the population (what it holds, where it came from)',
    ...(old ? { default: old.description } : {}),
    parse: requiredText('The description'),
  });

  s.heading('Completeness');
  s.print('  Agree the population to the ledger: enter the figures the ledger (or system report) shows.');
  const ledgerCount = await a.text({
    id: 'plan.population.ledgerCount',
    message: `Ledger count of items (the population has ${int(f.rowCount)}; ${old?.tieOut.ledgerCount !== undefined ? `${NONE_ANSWER}` : 'blank'} = not available)`,
    default: old?.tieOut.ledgerCount !== undefined ? String(old.tieOut.ledgerCount) : '',
    parse: optionalCount('The ledger count'),
  });
  const ledgerTotal =
    f.amountTotal !== undefined
      ? await a.text({
          id: 'plan.population.ledgerTotal',
          message: `Ledger total (the population totals ${groupDigits(f.amountTotal)}; ${old?.tieOut.ledgerTotal !== undefined ? `${NONE_ANSWER}` : 'blank'} = not available)`,
          default: old?.tieOut.ledgerTotal ?? '',
          parse: optionalDecimal('The ledger total'),
        })
      : undefined;
  const tieOut: Population['tieOut'] = {};
  const notes: string[] = [];
  if (ledgerCount !== undefined) {
    tieOut.ledgerCount = ledgerCount;
    tieOut.countDifference = f.rowCount - ledgerCount;
    notes.push(`Count: population ${int(f.rowCount)}, ledger ${int(ledgerCount)}, difference ${int(tieOut.countDifference)}`);
  }
  if (ledgerTotal !== undefined && f.amountTotal !== undefined) {
    tieOut.ledgerTotal = ledgerTotal;
    tieOut.totalDifference = decimalDifference(f.amountTotal, ledgerTotal);
    notes.push(`Total: population ${groupDigits(f.amountTotal)}, ledger ${groupDigits(ledgerTotal)}, difference ${groupDigits(tieOut.totalDifference)}`);
  }
  for (const n of notes) s.print(`  ${n}`);
  const differs = (tieOut.countDifference ?? 0) !== 0 || (tieOut.totalDifference !== undefined && !isZeroDecimal(tieOut.totalDifference));
  const missing = ledgerCount === undefined;
  if (differs || missing) {
    tieOut.explanation = await a.text({
      id: 'plan.population.tieOutExplanation',
      message: missing ? 'The population is not agreed to a ledger count. Why, and how is completeness shown?' : 'The population does not agree to the ledger. Explain the difference',
      ...(old?.tieOut.explanation ? { default: old.tieOut.explanation } : {}),
      parse: requiredText('The explanation'),
    });
  } else if (notes.length > 0) s.print('  The population agrees to the ledger.');
  if (ledgerCount !== undefined || ledgerTotal !== undefined) {
    const src = await a.text({
      id: 'plan.population.ledgerSource',
      message: 'Where the ledger figures come from (report, date run)',
      default: old?.tieOut.ledgerSource ?? '',
      parse: optionalText,
    });
    if (src) tieOut.ledgerSource = src;
  }
  const v = scan.validation;
  return {
    description,
    samplingUnit,
    source,
    fingerprint: {
      sha256: f.sha256,
      rowCount: f.rowCount,
      firstKey: f.firstKey,
      lastKey: f.lastKey,
      columns: f.columns,
      ...(f.amountTotal !== undefined ? { amountTotal: f.amountTotal } : {}),
      format: f.format,
      ...(f.sheet !== undefined ? { sheet: f.sheet } : {}),
      ...(f.monthTally ? { monthTally: f.monthTally } : {}),
    },
    validation: {
      ok: v.ok,
      messages: [...v.messages, ...v.notes.map((n) => `Note: ${n}`)],
      ...(acceptedReason ? { acceptedReason } : {}),
    },
    tieOut,
    scannedAt: s.now().toISOString(),
  };
}
