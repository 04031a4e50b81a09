import { existsSync, statSync } from 'node:fs';
import { extname, isAbsolute, relative, resolve } from 'node:path';
import { parseFlags, str, type FlagSpec, type ParsedArgs } from '../args.js';
import { FileInputError, UsageError } from '../../errors.js';
import { describePeriods, findKeys, parseNonWorkingDays, parsePeriods, readRowsAt, scanPopulation } from '../../population/index.js';
import type { PeriodFrequency } from '../../population/periods.js';
import type { DateOrder, PopulationScan, PopulationSource, ProgressStream } from '../../population/types.js';
import {
  fieldworkItems,
  recordHaphazard,
  selectRandom,
  selectSystematic,
  writeFieldworkSheet,
  type HaphazardRecord,
  type Selection,
} from '../../selection/index.js';
import { parseCount } from '../../util/percent.js';
import type { CommandContext } from '../types.js';
import { readRegularText } from '../../io/read.js';
import { visible } from '../../io/text.js';
import { itemsText, populationText, selectionText, shellWord, validationText } from './report.js';

const SPEC: FlagSpec = {
  population: { type: 'string' },
  ranges: { type: 'string' },
  exclude: { type: 'string', multiple: true },
  every: { type: 'string' },
  from: { type: 'string' },
  to: { type: 'string' },
  except: { type: 'string', multiple: true },
  key: { type: 'string' },
  sheet: { type: 'string' },
  amount: { type: 'string' },
  date: { type: 'string' },
  delimiter: { type: 'string' },
  'decimal-comma': { type: 'boolean' },
  'date-order': { type: 'string' },
  size: { type: 'string' },
  method: { type: 'string' },
  seed: { type: 'string' },
  starts: { type: 'string' },
  spares: { type: 'string' },
  keys: { type: 'string' },
  'keys-file': { type: 'string' },
  'selected-by': { type: 'string' },
  how: { type: 'string' },
  out: { type: 'string' },
  attributes: { type: 'string' },
  force: { type: 'boolean' },
  'accept-issues': { type: 'boolean' },
  json: { type: 'boolean' },
};

const CAUTION =
  'The tool selects and computes; whether the sample is adequate and what the results mean are the\n' +
  "practitioner's judgements under the auditing standards that apply (e.g. AU-C 530, ISA 530, AS 2315)\n" +
  "and the firm's methodology.";

export function help(): string {
  return `tolrate select — select a reproducible sample and write the fieldwork sheet

Usage: tolrate select --population FILE --key COLUMN --size N --out SHEET.csv [options]
       tolrate select --ranges LIST [--exclude LIST] --size N --out SHEET.csv [options]
       tolrate select --every month|quarter|week|day --from DATE --to DATE --size N
                      --out SHEET.csv [options]

The population is read twice, streaming: once for its fingerprint (SHA-256, row count, first
and last key, columns, exact amount total) and validation, once for the selected rows only.
Rows are counted from 0 in file order (the header and blank lines are not rows); the same
population, seed, sizes and algorithm always give the same items in the same order.

Population:
  --population FILE     a CSV file, or an XLSX workbook (a name ending in .xlsx)
  --key COLUMN          the column that identifies each sampling unit (needed with --population)
  --sheet NAME          XLSX: the worksheet to read; needed when the workbook has more than one
                        visible sheet (default: the only visible one; hidden sheets are
                        read only when named)
  --amount COLUMN       amounts to total exactly, for the completeness tie-out
  --date COLUMN         dates to check; the earliest and latest are shown
  --delimiter C         CSV: the delimiter (default: found from the first lines); "tab" for TAB
  --decimal-comma       amounts are written with a decimal comma (1.234,56)
  --date-order dmy|mdy  how to read dates such as 03/04/2024 (default: found from the data)
  --ranges LIST         document numbers instead of a file, e.g. 40001-52650,60001-61200
  --exclude LIST        numbers or ranges to leave out of --ranges (e.g. voided documents);
                        may be given more than once
  --every UNIT          the occurrences of a periodic control instead of a file: one sampling
                        unit for each month, quarter, week (Monday to Sunday) or day (a working
                        day, Monday to Friday) of the period from --from to --to
  --from DATE           the first day of the period, YYYY-MM-DD (with --every)
  --to DATE             the last day of the period, YYYY-MM-DD (with --every)
  --except DATES        --every day: days the control does not run besides Saturdays and
                        Sundays (public holidays, closures), YYYY-MM-DD separated by commas;
                        may be given more than once

Selection:
  --size N              the sample size (haphazard: how many of the listed keys are the sample;
                        default all, the rest are spares)
  --method M            random (default), systematic, or haphazard
  --seed S              the seed (text); when left out one is drawn and shown: record it
  --starts R            systematic: the number of random starts (default 1; the sample size
                        must be a multiple of it)
  --spares K            extra items drawn after the sample, used in order to replace voided
                        items (default 0)
  --keys LIST           haphazard: the keys chosen, separated by commas
  --keys-file FILE      haphazard: the keys chosen, one a line
  --selected-by NAME    haphazard: who chose the items
  --how TEXT            haphazard: how they were chosen

Output:
  --out SHEET           the fieldwork sheet to write: .csv, or .xlsx
  --attributes LIST     result columns: a number (3 gives A1..A3) or ids (A1,A2); default one
                        "Result" column
  --force               replace SHEET if it exists
  --accept-issues       go on although the validation found problems (they are still shown)
  --json                print one machine-readable object instead of the text
  -h, --help            show this help

Validation problems (duplicate or blank keys, rows that do not match the header, unreadable
amounts or dates, an empty population) are listed and stop the command with exit code 2
unless --accept-issues is given. Nothing is dropped: rows with problems stay in the count.

Examples:
  tolrate select --population invoices.csv --key invoice_no --amount amount --size 60 \\
                 --spares 5 --out fieldwork.csv
  tolrate select --population invoices.xlsx --sheet "FY2024" --key "Invoice no" --size 25 \\
                 --method systematic --seed 48213 --out fieldwork.xlsx
  tolrate select --ranges 40001-52650,60001-61200 --exclude 40017,40233 --size 40 --out sheet.csv
  tolrate select --every month --from 2025-01-01 --to 2025-12-31 --size 2 --seed 7 --out months.csv
  tolrate select --every day --from 2025-01-01 --to 2025-12-31 --except 2025-01-01,2025-12-25 \
                 --size 25 --out days.csv

${CAUTION}
`;
}

function usage(message: string, details: string[] = []): UsageError {
  return new UsageError(`tolrate select: ${message}`, [...details, 'See: tolrate select --help']);
}

function stderrStream(ctx: CommandContext): ProgressStream | false {
  const s = ctx.stderr as ProgressStream;
  return s.isTTY ? s : false;
}

function splitList(text: string): string[] {
  return text.split(',').map((s) => s.trim()).filter((s) => s !== '');
}

function attributesFlag(v: string | undefined): Array<{ id: string }> | undefined {
  if (v === undefined) return undefined;
  const t = v.trim();
  if (/^\d+$/.test(t)) {
    const n = parseCount(t, '--attributes', { min: 1, max: 50 });
    return Array.from({ length: n }, (_, i) => ({ id: `A${i + 1}` }));
  }
  const ids = splitList(t);
  const bad = ids.find((id) => !/^A\d+$/.test(id));
  if (bad !== undefined || ids.length === 0) throw usage(`--attributes takes a number or ids such as A1,A2; "${bad ?? v}" is not one.`);
  if (new Set(ids).size !== ids.length) throw usage('--attributes lists an id twice.');
  return ids.map((id) => ({ id }));
}

interface Plan {
  source: PopulationSource;
  label: string;
  out: string;
}

const EVERY: Record<string, PeriodFrequency> = {
  month: 'monthly', monthly: 'monthly', quarter: 'quarterly', quarterly: 'quarterly',
  week: 'weekly', weekly: 'weekly', day: 'daily', daily: 'daily',
};
const WORD: Record<PeriodFrequency, string> = { monthly: 'month', quarterly: 'quarter', weekly: 'week', daily: 'day' };

/** --every, --from, --to, --except: the periods of a periodic control (checked as the interview checks them). */
function periodsFrom(p: ParsedArgs): PopulationSource {
  const every = str(p, 'every')!;
  const frequency = EVERY[every.trim().toLowerCase()];
  if (!frequency) throw usage(`--every must be month, quarter, week or day, not "${every}".`);
  const from = str(p, 'from');
  const to = str(p, 'to');
  if (from === undefined || to === undefined) throw usage('--every needs the period: --from DATE and --to DATE (YYYY-MM-DD).');
  const except = (p.values.except as string[] | undefined) ?? [];
  if (except.length && frequency !== 'daily') throw usage(`--except applies to --every day; a ${WORD[frequency]} is one sampling unit whatever days it holds.`);
  const nonWorkingDays = except.length ? parseNonWorkingDays(except.join(',')) : [];
  const source: PopulationSource = { kind: 'periods', frequency, start: from.trim(), end: to.trim(), nonWorkingDays };
  // The dates and their order are checked here, before anything is read or written.
  parsePeriods(source);
  return source;
}

function sourceFrom(p: ParsedArgs, ctx: CommandContext): Plan {
  const file = str(p, 'population');
  const ranges = str(p, 'ranges');
  const every = str(p, 'every');
  const excludes = (p.values.exclude as string[] | undefined) ?? [];
  const given = [file !== undefined && '--population', ranges !== undefined && '--ranges', every !== undefined && '--every'].filter(Boolean);
  if (given.length > 1) throw usage(`give one population: ${given.join(' or ')}, not ${given.length === 2 ? 'both' : 'several'}.`);
  if (given.length === 0) throw usage('--population FILE (or --ranges LIST, or --every UNIT --from DATE --to DATE) is required.');
  if (every === undefined) {
    const extra = (['from', 'to', 'except'] as const).find((f) => p.values[f] !== undefined);
    if (extra) throw usage(`--${extra} applies to --every (a periodic control's occurrences).`);
  }
  const outRaw = str(p, 'out');
  if (outRaw === undefined || outRaw === '') throw usage('--out SHEET is required (the fieldwork sheet to write, .csv or .xlsx).');
  const out = resolve(ctx.cwd, outRaw);
  const fileOnly = ['key', 'sheet', 'amount', 'date', 'delimiter', 'decimal-comma', 'date-order'] as const;
  if (every !== undefined) {
    const extra = fileOnly.find((f) => p.values[f] !== undefined) ?? (excludes.length ? 'exclude' : undefined);
    if (extra) throw usage(`--${extra} applies to a population file${extra === 'exclude' ? ' or ranges' : ''}, not to --every.`);
    const source = periodsFrom(p);
    return { source, label: `periods: ${describePeriods(source as Extract<PopulationSource, { kind: 'periods' }>)}`, out };
  }
  if (ranges !== undefined) {
    const extra = fileOnly.find((f) => p.values[f] !== undefined);
    if (extra) throw usage(`--${extra} applies to a population file, not to --ranges.`);
    return { source: { kind: 'ranges', ranges, exclusions: excludes }, label: `document-number ranges ${ranges}`, out };
  }
  if (excludes.length) throw usage('--exclude applies to --ranges; to leave rows out of a file, say so in the workpaper instead.');
  const key = str(p, 'key');
  if (key === undefined || key.trim() === '') throw usage('--key COLUMN is required: the column that identifies each sampling unit.');
  const path = resolve(ctx.cwd, file!);
  if (!existsSync(path)) throw new FileInputError(path, `Population file not found: ${path}`);
  if (statSync(path).isDirectory()) throw new FileInputError(path, `${path} is a folder, not a population file.`);
  if (path === out) throw usage('--out must not be the population file.');
  const ext = extname(path).toLowerCase();
  if (ext === '.xls') throw new FileInputError(path, `${file} is an old Excel (.xls) workbook.`, ['Save it as .xlsx or CSV UTF-8.']);
  const order = str(p, 'date-order');
  if (order !== undefined && order !== 'dmy' && order !== 'mdy') throw usage('--date-order must be dmy or mdy.');
  const common = {
    path,
    keyColumn: key,
    ...(str(p, 'amount') !== undefined ? { amountColumn: str(p, 'amount')! } : {}),
    ...(str(p, 'date') !== undefined ? { dateColumn: str(p, 'date')! } : {}),
    ...(p.values['decimal-comma'] ? { decimalComma: true } : {}),
    ...(order !== undefined ? { dateOrder: order as DateOrder } : {}),
  };
  if (ext === '.xlsx' || ext === '.xlsm') {
    if (str(p, 'delimiter') !== undefined) throw usage('--delimiter applies to CSV files, not to a workbook.');
    const sheet = str(p, 'sheet');
    return { source: { kind: 'xlsx', ...common, ...(sheet !== undefined ? { sheet } : {}) }, label: file!, out };
  }
  if (str(p, 'sheet') !== undefined) throw usage('--sheet applies to XLSX workbooks; this file is read as CSV.');
  const delimiter = str(p, 'delimiter');
  return { source: { kind: 'csv', ...common, ...(delimiter !== undefined ? { delimiter } : {}) }, label: file!, out };
}

function haphazardKeys(p: ParsedArgs, ctx: CommandContext): string[] {
  const list = str(p, 'keys');
  const file = str(p, 'keys-file');
  if (list === undefined && file === undefined) throw usage('a haphazard selection needs --keys LIST or --keys-file FILE.');
  const keys: string[] = [];
  if (list !== undefined) keys.push(...splitList(list));
  if (file !== undefined) {
    const path = resolve(ctx.cwd, file);
    const text = readRegularText(path, 'The keys file');
    keys.push(...text.split(/\r\n|\r|\n/).map((s) => s.trim()).filter((s) => s !== ''));
  }
  return keys;
}

/** The command line that draws the same items again. */
function againCommand(plan: Plan, sel: Selection, ctx: CommandContext): string {
  const words = ['tolrate', 'select'];
  const rel = (abs: string) => {
    const r = relative(ctx.cwd, abs);
    return r && !r.startsWith('..') && !isAbsolute(r) ? r : abs;
  };
  const s = plan.source;
  if (s.kind === 'ranges') {
    words.push('--ranges', s.ranges);
    for (const e of s.exclusions ?? []) words.push('--exclude', e);
  } else if (s.kind === 'periods') {
    words.push('--every', WORD[s.frequency], '--from', s.start, '--to', s.end);
    if (s.nonWorkingDays?.length) words.push('--except', s.nonWorkingDays.join(','));
  } else {
    words.push('--population', rel(s.path), '--key', s.keyColumn);
    if (s.kind === 'xlsx' && s.sheet !== undefined) words.push('--sheet', s.sheet);
    if (s.kind === 'csv' && s.delimiter !== undefined) words.push('--delimiter', s.delimiter === '\t' ? 'tab' : s.delimiter);
  }
  words.push('--size', String(sel.sampleSize));
  if (sel.method !== 'random') words.push('--method', sel.method);
  if (sel.starts && sel.starts.length > 1) words.push('--starts', String(sel.starts.length));
  if (sel.spares) words.push('--spares', String(sel.spares));
  if (sel.seed !== undefined) words.push('--seed', sel.seed);
  words.push('--out', 'SHEET.csv');
  return words.map(shellWord).join(' ');
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('select', args, SPEC);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const plan = sourceFrom(p, ctx);
  const method = (str(p, 'method') ?? 'random').trim().toLowerCase();
  if (!['random', 'systematic', 'haphazard'].includes(method)) throw usage(`--method must be random, systematic or haphazard, not "${str(p, 'method')}".`);
  const sizeText = str(p, 'size');
  if (sizeText === undefined && method !== 'haphazard') throw usage('--size N is required (the sample size).');
  const size = sizeText !== undefined ? parseCount(sizeText, '--size', { min: 1 }) : undefined;
  const spares = str(p, 'spares') !== undefined ? parseCount(str(p, 'spares')!, '--spares', { min: 0 }) : 0;
  const starts = str(p, 'starts') !== undefined ? parseCount(str(p, 'starts')!, '--starts', { min: 1 }) : undefined;
  if (starts !== undefined && method !== 'systematic') throw usage('--starts applies to --method systematic.');
  const hapFlags = ['keys', 'keys-file', 'selected-by', 'how'] as const;
  if (method !== 'haphazard') {
    const extra = hapFlags.find((f) => p.values[f] !== undefined);
    if (extra) throw usage(`--${extra} applies to --method haphazard.`);
  } else {
    if (str(p, 'seed') !== undefined) throw usage('a haphazard selection has no seed (the items are chosen by a person).');
    if (str(p, 'spares') !== undefined) throw usage('for a haphazard selection, list the spares after the sample in --keys and give --size.');
    if (!str(p, 'selected-by')?.trim()) throw usage('a haphazard selection needs --selected-by NAME (who chose the items).');
    if (!str(p, 'how')?.trim()) throw usage('a haphazard selection needs --how TEXT (how the items were chosen).');
  }
  const attributes = attributesFlag(str(p, 'attributes'));
  if (existsSync(plan.out) && !p.values.force) {
    throw new FileInputError(plan.out, `${plan.out} already exists.`, ['Give another --out, or --force to replace it.']);
  }
  const json = Boolean(p.values.json);
  const accept = Boolean(p.values['accept-issues']);
  const progress = stderrStream(ctx);
  const out: string[] = [];
  const flush = () => {
    // Keys and values come from the file: their control characters are shown, not sent (src/io/text.ts).
    if (!json && out.length) ctx.stdout.write(`${visible(out.join('\n'), { keepLines: true })}\n`);
    out.length = 0;
  };

  if (plan.source.kind === 'xlsx' && plan.source.sheet === undefined) {
    // A hidden sheet is never read by default, and with several visible sheets the user names one.
    const { listSheets, sheetLabel } = await import('../../population/workbook.js');
    const sheets = await listSheets(plan.source.path);
    const visible = sheets.filter((x) => !x.hidden);
    if (visible.length > 1) {
      throw usage(`${plan.label} has ${visible.length} visible sheets; name the one to read with --sheet NAME.`, [
        `Sheets: ${sheets.map(sheetLabel).join(', ')}`,
      ]);
    }
  }

  // Pass 1: fingerprint and validation.
  const scan: PopulationScan = await scanPopulation(plan.source, { progress });
  out.push(...populationText(scan, plan.label), '', ...validationText(scan));
  if (!scan.validation.ok && !accept) {
    flush();
    if (json) ctx.stdout.write(`${JSON.stringify({ ok: false, source: plan.source, fingerprint: scan.fingerprint, validation: scan.validation }, null, 2)}\n`);
    ctx.stderr.write(
      `tolrate select: the population has ${scan.validation.messages.length} validation problem${scan.validation.messages.length === 1 ? '' : 's'} (listed ${json ? 'in the output' : 'above'}). ` +
        'Fix the population, or give --accept-issues to go on with it as it is.\n',
    );
    return 2;
  }
  if (scan.validation.emptyPopulation) {
    flush();
    ctx.stderr.write('tolrate select: the population is empty; there is nothing to select.\n');
    return 2;
  }

  // Selection.
  let selection: Selection;
  let hap: HaphazardRecord | undefined;
  const N = scan.fingerprint.rowCount;
  if (method === 'haphazard') {
    const lookup = await findKeys(plan.source, haphazardKeys(p, ctx), { progress });
    hap = recordHaphazard({
      lookup,
      selectedBy: str(p, 'selected-by')!,
      how: str(p, 'how')!,
      ...(size !== undefined ? { sampleSize: size } : {}),
    });
    selection = hap.selection;
  } else if (method === 'systematic') {
    selection = selectSystematic({ populationSize: N, sampleSize: size!, spares, ...(str(p, 'seed') !== undefined ? { seed: str(p, 'seed')! } : {}), ...(starts !== undefined ? { starts } : {}) });
  } else {
    selection = selectRandom({ populationSize: N, sampleSize: size!, spares, ...(str(p, 'seed') !== undefined ? { seed: str(p, 'seed')! } : {}) });
  }
  out.push('', ...selectionText(selection));
  if (hap && !hap.ok) {
    out.push('  Problems with the list of keys:');
    for (const m of hap.problems) out.push(`  - ${m}`);
    if (!accept) {
      flush();
      if (json) ctx.stdout.write(`${JSON.stringify({ ok: false, source: plan.source, fingerprint: scan.fingerprint, validation: scan.validation, selection, listProblems: hap.problems }, null, 2)}\n`);
      ctx.stderr.write('tolrate select: the list of keys has problems (listed above). Correct the list, or give --accept-issues to go on with the keys found.\n');
      return 2;
    }
  }

  // Pass 2: the selected rows only; then the sheet.
  const rows = await readRowsAt(plan.source, selection.positions, { progress });
  const items = fieldworkItems(selection, rows);
  const notes = [
    `Fieldwork sheet written by tolrate select on ${new Date().toISOString()}.`,
    `Population: ${plan.label}; SHA-256 ${scan.fingerprint.sha256}; ${scan.fingerprint.rowCount} rows.`,
    `Selection: ${selection.method}; ${selection.sampleSize} items + ${selection.spares} spares${selection.seed !== undefined ? `; seed ${selection.seed}` : ''}.`,
    `Algorithm: ${selection.algorithm}`,
  ];
  if (selection.note) notes.push(selection.note);
  await writeFieldworkSheet(plan.out, { columns: scan.fingerprint.columns, items, ...(attributes ? { attributes } : {}), notes });

  if (json) {
    ctx.stdout.write(
      `${JSON.stringify(
        {
          ok: true,
          acceptedIssues: !scan.validation.ok || (hap !== undefined && !hap.ok),
          source: plan.source,
          fingerprint: scan.fingerprint,
          validation: scan.validation,
          selection,
          ...(hap ? { listProblems: hap.problems } : {}),
          items: items.map((it, i) => ({ ...it, position: selection.positions[i] })),
          sheet: plan.out,
        },
        null,
        2,
      )}\n`,
    );
    return 0;
  }
  out.push('', ...itemsText(items), '');
  out.push(`Fieldwork sheet written: ${plan.out} (${items.length} rows)`);
  if (selection.method !== 'haphazard') out.push(`To draw the same items again: ${againCommand(plan, selection, ctx)}`);
  if (!scan.validation.ok) out.push('The validation problems above were accepted (--accept-issues): record why in the workpaper.');
  out.push('', CAUTION);
  flush();
  return 0;
}
