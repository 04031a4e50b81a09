import { parseFlags, required, str, type FlagSpec } from '../args.js';
import { TolrateInputError, UsageError } from '../../errors.js';
import {
  DEFAULT_EXPECTED_RATES,
  DEFAULT_TOLERABLE_RATES,
  LARGE_SAMPLE_SIZE,
  MAX_SAMPLE_SIZE,
  planningTable,
  type PlanningTableResult,
} from '../../stats/index.js';
import { int, pctPlain } from '../../util/format.js';
import { isBareFraction, parsePercent } from '../../util/percent.js';
import type { CommandContext } from '../types.js';
import { CAUTION, modelFlag, modelNote, populationFlag, wrap } from '../size/common.js';
import { printResult } from '../output.js';

const SPEC: FlagSpec = {
  confidence: { type: 'string' },
  tolerable: { type: 'string' },
  expected: { type: 'string' },
  population: { type: 'string' },
  model: { type: 'string' },
  json: { type: 'boolean' },
};

const list = (rates: readonly number[]): string => rates.map((r) => pctPlain(r).replace('%', '')).join(',');

export function help(): string {
  return `tolrate table — planning table of sample sizes over tolerable and expected deviation rates

Usage: tolrate table --confidence PCT [--tolerable LIST] [--expected LIST] [--population N]
                     [--model binomial|hypergeometric|poisson] [--json]

Options:
  --confidence PCT   confidence level, e.g. 95 or 90
  --tolerable LIST   columns: tolerable deviation rates in percent, separated by commas
                     (default ${list(DEFAULT_TOLERABLE_RATES)})
  --expected LIST    rows: expected deviation rates in percent, separated by commas
                     (default ${list(DEFAULT_EXPECTED_RATES)})
  --population N     number of units in the population (default model becomes hypergeometric)
  --model NAME       binomial (default without --population), hypergeometric, or poisson
  --json             print the table object instead of the text
  -h, --help         show this help

Rates are percentages with a decimal point (the comma separates them). A list whose rates are
all below 1 needs % signs (0.25%,0.5%): typed bare, 0.02,0.05 is refused, since it may have
meant 2% and 5%.

Each cell is "size (k_e)": the smallest sample size whose risk of overreliance at k_e
expected deviations does not exceed 100% - confidence. A dash marks a cell where no practical
size exists (the expected rate is not below the tolerable rate, or more than
${int(MAX_SAMPLE_SIZE)} items would be needed; for a known population, more than the population).
A star marks sizes above ${LARGE_SAMPLE_SIZE}, far more than tests of controls usually use (common practice).

Example:
  tolrate table --confidence 95
  tolrate table --confidence 90 --tolerable 5,6,10 --expected 0,1,2 --population 2500

${CAUTION}
`;
}

function rateList(command: string, text: string, flag: string, allowZero: boolean): number[] {
  const parts = text.split(',').map((s) => s.trim());
  if (parts.length === 0 || parts.some((s) => s === '')) {
    throw new UsageError(`tolrate ${command}: ${flag} needs percentages separated by commas, e.g. 2,3,5.`, [
      `See: tolrate ${command} --help`,
    ]);
  }
  const rates = parts.map((s) => parsePercent(s, flag, { allowZero }));
  // A list whose every rate is between 0 and 1 with no % sign may be fractions (0.02,0.05 meant
  // as 2% and 5%); a list with any rate of 1 or more, or any % sign, reads plainly as percentages.
  const bare = parts.filter((s) => isBareFraction(s));
  if (bare.length > 0 && !parts.some((s) => s.endsWith('%')) && rates.every((r) => r < 0.01)) {
    const as = (t: string): string => String(Number((Number(t) * 100).toPrecision(12)));
    throw new TolrateInputError(
      `${flag}: ${bare.join(', ')} ${bare.length === 1 ? 'is' : 'are'} read as ${bare.map((t) => `${t}%`).join(', ')}; write ${bare.map(as).join(',')} for ${bare.map((t) => `${as(t)}%`).join(', ')}, or add a % sign (${bare[0]}%) if you mean percentages below 1.`,
      'AMBIGUOUS_RATE',
    );
  }
  return rates;
}

export async function run(args: string[], ctx: CommandContext): Promise<number> {
  const p = parseFlags('table', args, SPEC);
  if (p.values.help) {
    ctx.stdout.write(help());
    return 0;
  }
  const confidence = parsePercent(required('table', p, 'confidence'), '--confidence', { refuseBareFraction: true });
  const tol = str(p, 'tolerable');
  const exp = str(p, 'expected');
  const populationSize = populationFlag(p);
  const model = modelFlag('table', p, populationSize);
  const result = planningTable({
    confidence,
    ...(tol !== undefined ? { tolerableRates: rateList('table', tol, '--tolerable', false) } : {}),
    ...(exp !== undefined ? { expectedRates: rateList('table', exp, '--expected', true) } : {}),
    ...(populationSize !== undefined ? { populationSize } : {}),
    ...(model !== undefined ? { model } : {}),
  });
  printResult(ctx, p.values.json === true, result, render);
  return 0;
}

function render(t: PlanningTableResult): string {
  const lines: string[] = [];
  lines.push(`Sample sizes at ${pctPlain(t.confidence)} confidence (risk of overreliance ${pctPlain(1 - t.confidence)})`);
  lines.push(`Model: ${modelNote(t.model, t.populationSize)}${t.populationSize !== undefined ? `; population ${int(t.populationSize)}` : ''}`);
  lines.push('Each cell: sample size (expected deviations k_e). Rows: expected rate. Columns: tolerable rate.');
  lines.push('');
  const header = ['Expected', ...t.tolerableRates.map((r) => pctPlain(r))];
  const body = t.rows.map((row) => [
    pctPlain(row.expectedRate),
    ...row.cells.map((c) => (c.sampleSize === null ? '-' : `${int(c.sampleSize)} (${c.expectedDeviations})${c.sizeRemark ? '*' : ''}`)),
  ]);
  const widths = header.map((h, i) => Math.max(h.length, ...body.map((r) => r[i]!.length)));
  const fmt = (cells: string[]): string =>
    cells.map((c, i) => (i === 0 ? c.padEnd(widths[i]!) : c.padStart(widths[i]!))).join('  ').trimEnd();
  lines.push(fmt(header));
  lines.push(widths.map((w) => '-'.repeat(w)).join('  '));
  for (const r of body) lines.push(fmt(r));
  lines.push('');
  const cap = t.model === 'hypergeometric' ? 'the population' : `${int(MAX_SAMPLE_SIZE)} items`;
  lines.push(...wrap(`-  no practical size: the expected rate is not below the tolerable rate, or more than ${cap} would be needed.`));
  if (t.rows.some((r) => r.cells.some((c) => c.sizeRemark))) {
    lines.push(...wrap(`*  more than ${LARGE_SAMPLE_SIZE} items: far more than tests of controls usually use (common practice); the test may not be cost-effective.`));
  }
  lines.push('');
  lines.push(CAUTION);
  return lines.join('\n') + '\n';
}
