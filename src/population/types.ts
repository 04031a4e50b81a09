/** Public types of the population reader. */

/** Order of day and month in dates such as 03/04/2024. */
export type DateOrder = 'dmy' | 'mdy';

interface ColumnsPart {
  /** The column that identifies the sampling unit (its name in the header). */
  keyColumn: string;
  /** Optional column of amounts, summed exactly for the completeness tie-out. */
  amountColumn?: string;
  /** Optional column of dates, checked and summarised (earliest, latest). */
  dateColumn?: string;
  /** Amounts use a comma as decimal mark (1.234,56). Default: point (1,234.56). */
  decimalComma?: boolean;
  /** How to read dates such as 03/04/2024; found from the data when not given. */
  dateOrder?: DateOrder;
}

export interface CsvSource extends ColumnsPart {
  kind: 'csv';
  path: string;
  /** One character; detected from the first lines when not given. `\t` or 'tab' for TAB. */
  delimiter?: string;
}

export interface XlsxSource extends ColumnsPart {
  kind: 'xlsx';
  path: string;
  /** Sheet name; the first sheet of the workbook when not given. */
  sheet?: string;
}

export interface RangesSource {
  kind: 'ranges';
  /** Document-number ranges, e.g. '40001-52650,60001-61200' (single numbers allowed). */
  ranges: string;
  /** Numbers (or ranges) to leave out, e.g. voided documents: ['40017,40233']. */
  exclusions?: string[];
}

/** The occurrences of a periodic control: each month, quarter, week or working day of the period (periods.ts). */
export interface PeriodsSource {
  kind: 'periods';
  frequency: 'monthly' | 'quarterly' | 'weekly' | 'daily';
  /** The period, YYYY-MM-DD. */
  start: string;
  end: string;
  /** Daily: days that are not working days besides Saturdays and Sundays (public holidays, closures). */
  nonWorkingDays?: string[];
}

export type PopulationSource = CsvSource | XlsxSource | RangesSource | PeriodsSource;

/** The population by month of its date column, counted when it was read (month-tally.ts). */
export interface MonthTally {
  /** The column the months come from; absent when the population has no dates (ranges, no date column). */
  dateColumn?: string;
  /** How dates such as 03/04/2024 were read, when the column has any. */
  dateOrder?: DateOrder;
  /** Every month holding at least one row, in order: its rows and, with an amount column, the exact total of their readable amounts. */
  months: Array<{ month: string; count: number; amountTotal?: string }>;
  /** Rows with no readable date (blank, not a date, or not a date in the order found). */
  undated: number;
  /** With an amount column: the exact total of those rows' readable amounts. */
  undatedAmountTotal?: string;
}

/** What a reviewer needs to see that the population read is the one tested, and complete. */
export interface PopulationFingerprint {
  /** SHA-256 (hex) of the file's bytes; for ranges, of `canonical`. */
  sha256: string;
  /** Number of sampling units (data rows; the header and blank lines are not counted). */
  rowCount: number;
  /** Key of the first and last data row in file order ('' when the population is empty). */
  firstKey: string;
  lastKey: string;
  /** Column names as read from the header (blank names shown as "(column N)"). */
  columns: string[];
  /** Exact total of the amount column as a decimal string ('-1234.50'), when one was given. */
  amountTotal?: string;
  /** Number of amounts that could be read and added to the total. */
  amountCount?: number;
  format: 'csv' | 'xlsx' | 'ranges' | 'periods';
  /** Worksheet read (xlsx). */
  sheet?: string;
  /** Delimiter used (csv), as a character ('\t' for TAB). */
  delimiter?: string;
  /** Size of the file in bytes (csv, xlsx). */
  bytes?: number;
  /** The file name as given (csv, xlsx). */
  file?: string;
  keyColumn: string;
  amountColumn?: string;
  dateColumn?: string;
  /** Earliest and latest date in the date column (ISO yyyy-mm-dd), when one was given. */
  dateRange?: { earliest: string; latest: string };
  /** How dates such as 03/04/2024 were read, when the file has any. */
  dateOrder?: DateOrder;
  /** Ranges: the canonical text that was hashed. */
  canonical?: string;
  /** Ranges: how many numbers the exclusions removed. */
  excludedCount?: number;
  /** The rows by month of the date column (every row undated when there is none). */
  monthTally?: MonthTally;
}

/** A row (or line) with a problem, for the report. */
export interface RowExample {
  /** 1-based row/line number in the source as a user sees it. */
  row: number;
  /** What is wrong, in a few words. */
  reason: string;
  /** The offending value, when there is one. */
  value?: string;
}

export interface ProblemCount {
  count: number;
  /** The first few cases, in file order. */
  examples: RowExample[];
}

export interface DuplicateKeyExample {
  key: string;
  /** Number of rows holding this key. */
  occurrences: number;
  /** Row numbers of the first few of them. */
  rows: number[];
}

export interface PopulationValidation {
  /** True when nothing below is a problem (notes do not count). */
  ok: boolean;
  /** Keys held by more than one row: count = number of such keys; rows = rows involved. */
  duplicateKeys: { count: number; rows: number; examples: DuplicateKeyExample[] };
  blankKeys: ProblemCount;
  /** Rows whose number of fields differs from the header, or whose quoting is broken. */
  badRows: ProblemCount;
  badAmounts: ProblemCount;
  badDates: ProblemCount;
  /** Rows (lines) holding bytes that are not valid UTF-8 (csv). */
  badEncoding: ProblemCount;
  emptyPopulation: boolean;
  /** Other problems (e.g. exclusions outside every range). */
  otherProblems: string[];
  /** One sentence per problem, for the report. Empty when ok. */
  messages: string[];
  /** Facts worth recording that are not problems (delimiter detected, blank lines, date order). */
  notes: string[];
}

export interface PopulationScan {
  fingerprint: PopulationFingerprint;
  validation: PopulationValidation;
}

/** One row fetched by position. */
export interface PopulationRow {
  /** 0-based position among the data rows. */
  position: number;
  /** 1-based row/line number in the source as a user sees it (ranges: position + 1). */
  row: number;
  key: string;
  /** The row's fields by column name, as written in the file. */
  values: Record<string, string>;
}

export interface ScanProgress {
  phase: 'reading' | 'checking duplicates' | 'fetching rows' | 'finding keys';
  /** Bytes read so far and the file size; both 0 while unknown (a workbook reports rows only). */
  bytesDone: number;
  bytesTotal: number;
  /** Data rows seen so far. */
  rows: number;
}

/** Where a progress bar may be drawn: only used when it is a terminal (isTTY). */
export interface ProgressStream {
  write(text: string): unknown;
  isTTY?: boolean;
  columns?: number;
}

export interface ReadOptions {
  /**
   * Draw a progress bar when reading takes more than about half a second: true means on
   * process.stderr; or give the stream. Nothing is drawn when the stream is not a terminal.
   */
  progress?: boolean | ProgressStream;
  /** Called as reading goes on (at most about every 100 ms, and once at the end). */
  onProgress?: (p: ScanProgress) => void;
}

export interface ReadRowsOptions extends ReadOptions {
  /** Refuse (FileInputError) when the file's SHA-256 differs; the whole file is then read. */
  expectSha256?: string;
}

export interface KeyLookup {
  /** The keys found, in the order given (first occurrence in the population). */
  found: PopulationRow[];
  /** Keys given that are not in the population. */
  unknown: string[];
  /** Keys given more than once (kept once, at their first place). */
  repeated: string[];
  /** Entries of the list that were blank (ignored). */
  blankEntries: number;
  /** Keys given that the population holds more than once (the first row was taken). */
  ambiguous: DuplicateKeyExample[];
  /** Data rows in the population. */
  rowCount: number;
}
