/** Population reading: CSV, XLSX and document-number ranges; fingerprint and validation. */
export { scanPopulation, readRowsAt, findKeys } from './scan.js';
export { parseAmount, amountText, groupDigits, AmountTotal } from './amount.js';
export type { ParsedAmount, AmountOptions } from './amount.js';
export { parseDate, ymdText, monthOfDate } from './date.js';
export { monthTallyDifferences } from './month-tally.js';
export { detectDelimiter, delimiterOption, delimiterName } from './csv.js';
export { parseRanges, RANGES_COLUMN } from './ranges.js';
export { parsePeriods, parseNonWorkingDays, describePeriods, PERIOD_FREQUENCIES, PERIOD_COLUMNS } from './periods.js';
export { cellText } from './cell-text.js';
export { nearestColumn } from './columns.js';
export { PROGRESS_DELAY_MS } from './progress.js';
export type {
  PopulationSource,
  CsvSource,
  XlsxSource,
  RangesSource,
  PeriodsSource,
  DateOrder,
  MonthTally,
  PopulationScan,
  PopulationFingerprint,
  PopulationValidation,
  ProblemCount,
  RowExample,
  DuplicateKeyExample,
  PopulationRow,
  KeyLookup,
  ScanProgress,
  ProgressStream,
  ReadOptions,
  ReadRowsOptions,
} from './types.js';
