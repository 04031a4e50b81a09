import { FileInputError, TolrateInputError } from '../errors.js';
import { findCsvKeys, readCsvRowsAt, scanCsv } from './csv.js';
import { KeyFinder, RowPicker } from './pick.js';
import { makeReporter } from './progress.js';
import { rangesFindKeys, rangesRowsAt, scanRanges } from './ranges.js';
import { periodsFindKeys, periodsRowsAt, scanPeriods } from './periods.js';
import type { KeyLookup, PopulationRow, PopulationScan, PopulationSource, ReadOptions, ReadRowsOptions } from './types.js';

/** The workbook reader, loaded only when a workbook is read (it is not needed for CSV). */
const xlsx = () => import('./xlsx.js');

function check(source: PopulationSource): void {
  if (!source || typeof source !== 'object') throw new TolrateInputError('No population source was given.', 'INVALID_SOURCE');
  const kind = (source as { kind?: unknown }).kind;
  if (kind === 'ranges' || kind === 'periods') return;
  if (kind !== 'csv' && kind !== 'xlsx') {
    throw new TolrateInputError(`Unknown population source kind ${JSON.stringify(kind)}; use csv, xlsx, ranges or periods.`, 'INVALID_SOURCE');
  }
  const s = source as { path?: unknown; keyColumn?: unknown };
  if (typeof s.path !== 'string' || s.path.trim() === '') {
    throw new TolrateInputError('The population file path is missing.', 'INVALID_SOURCE');
  }
  if (typeof s.keyColumn !== 'string' || s.keyColumn.trim() === '') {
    throw new TolrateInputError('Name the key column: the column that identifies each sampling unit.', 'INVALID_SOURCE');
  }
}

/**
 * Pass 1: read the whole population once, streaming, and return its fingerprint (SHA-256, row
 * count, first and last key, columns, exact amount total) and the validation report. Problems
 * are reported, never dropped: rows with problems stay in the count. The caller decides whether
 * to go on. Missing or unreadable files and unknown column names throw a FileInputError.
 */
export async function scanPopulation(source: PopulationSource, opts: ReadOptions = {}): Promise<PopulationScan> {
  check(source);
  if (source.kind === 'ranges') return scanRanges(source);
  if (source.kind === 'periods') return scanPeriods(source);
  const report = makeReporter(opts);
  try {
    return source.kind === 'csv' ? await scanCsv(source, report) : await (await xlsx()).scanXlsx(source, report);
  } finally {
    report.done();
  }
}

function verifier(path: string, expect: string | undefined): ((sha: string) => void) | undefined {
  if (expect === undefined) return undefined;
  return (sha) => {
    if (sha.toLowerCase() !== expect.trim().toLowerCase()) {
      throw new FileInputError(path, `${path} is not the file that was recorded: its SHA-256 is ${sha}, the record says ${expect}.`);
    }
  };
}

/**
 * Pass 2: fetch the rows at the given 0-based positions, in the order given (a position given
 * twice comes back twice). Reading stops after the last position needed unless `expectSha256`
 * asks for the whole file to be checked. A position past the end throws a TolrateInputError.
 */
export async function readRowsAt(
  source: PopulationSource,
  positions: readonly number[],
  opts: ReadRowsOptions = {},
): Promise<PopulationRow[]> {
  check(source);
  if (source.kind === 'ranges') return rangesRowsAt(source, positions);
  if (source.kind === 'periods') return periodsRowsAt(source, positions);
  const picker = new RowPicker(positions);
  if (picker.sorted.length === 0 && opts.expectSha256 === undefined) return [];
  const report = makeReporter(opts);
  try {
    const verify = verifier(source.path, opts.expectSha256);
    const rows =
      source.kind === 'csv' ? await readCsvRowsAt(source, picker, report, verify) : await (await xlsx()).readXlsxRowsAt(source, picker, report, verify);
    return picker.result(rows);
  } finally {
    report.done();
  }
}

/**
 * Find the rows of the given keys (for a haphazard selection): the rows found in the order given,
 * keys not in the population, keys listed twice, and keys the population holds more than once.
 */
export async function findKeys(source: PopulationSource, keys: readonly string[], opts: ReadOptions = {}): Promise<KeyLookup> {
  check(source);
  if (source.kind === 'ranges') return rangesFindKeys(source, keys);
  if (source.kind === 'periods') return periodsFindKeys(source, keys);
  const finder = new KeyFinder(keys);
  const report = makeReporter(opts);
  try {
    return source.kind === 'csv' ? await findCsvKeys(source, finder, report) : await (await xlsx()).findXlsxKeys(source, finder, report);
  } finally {
    report.done();
  }
}
