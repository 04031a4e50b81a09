import { TolrateInputError } from '../errors.js';
import { EXAMPLES } from './checker.js';
import type { DuplicateKeyExample, KeyLookup, PopulationRow } from './types.js';

/** Collects the rows at wanted positions during one pass in file order. */
export class RowPicker {
  private readonly want: number[];
  private i = 0;
  private readonly got = new Map<number, PopulationRow>();

  constructor(readonly positions: readonly number[]) {
    for (const p of positions) {
      if (!Number.isSafeInteger(p) || p < 0) {
        throw new TolrateInputError(`Row position ${String(p)} is not a whole number from 0 up.`, 'INVALID_POSITION');
      }
    }
    this.want = [...new Set(positions)].sort((a, b) => a - b);
  }

  /** The highest position asked for, or -1. */
  get max(): number {
    return this.want.length ? this.want[this.want.length - 1]! : -1;
  }

  get sorted(): readonly number[] {
    return this.want;
  }

  get finished(): boolean {
    return this.i >= this.want.length;
  }

  /** The next position wanted, or -1 when none is left. */
  get next(): number {
    return this.i < this.want.length ? this.want[this.i]! : -1;
  }

  /** Positions arrive in increasing order, one call per data row. */
  wants(position: number): boolean {
    return this.want[this.i] === position;
  }

  take(row: PopulationRow): void {
    this.got.set(row.position, row);
    this.i++;
  }

  /** The rows in the order the positions were given; refuses positions past the end. */
  result(rowCount: number): PopulationRow[] {
    const missing = this.want.filter((p) => !this.got.has(p));
    if (missing.length) {
      throw new TolrateInputError(
        `Row position${missing.length > 1 ? 's' : ''} ${missing.slice(0, 5).join(', ')}${missing.length > 5 ? ', ...' : ''} ` +
          `${missing.length > 1 ? 'are' : 'is'} beyond the population, which has ${rowCount.toLocaleString('en-US')} rows ` +
          '(positions count from 0). Has the file changed since the selection?',
        'POSITION_OUT_OF_RANGE',
      );
    }
    return this.positions.map((p) => this.got.get(p)!);
  }
}

/** Collects the rows of listed keys during one pass. */
export class KeyFinder {
  private readonly order: string[] = [];
  private readonly firstRow = new Map<string, PopulationRow | null>();
  private readonly more = new Map<string, { n: number; rows: number[] }>();
  private readonly repeated: string[] = [];
  private blank = 0;

  constructor(keys: readonly string[]) {
    for (const raw of keys) {
      const k = String(raw).trim();
      if (k === '') {
        this.blank++;
        continue;
      }
      if (this.firstRow.has(k)) {
        if (!this.repeated.includes(k)) this.repeated.push(k);
        continue;
      }
      this.firstRow.set(k, null);
      this.order.push(k);
    }
  }

  get size(): number {
    return this.order.length;
  }

  wants(key: string): boolean {
    return this.firstRow.has(key);
  }

  found(row: PopulationRow): void {
    const prev = this.firstRow.get(row.key);
    if (prev === undefined) return;
    if (prev === null) {
      this.firstRow.set(row.key, row);
      return;
    }
    const m = this.more.get(row.key) ?? { n: 1, rows: [prev.row] };
    m.n++;
    if (m.rows.length < EXAMPLES) m.rows.push(row.row);
    this.more.set(row.key, m);
  }

  result(rowCount: number): KeyLookup {
    const found: PopulationRow[] = [];
    const unknown: string[] = [];
    for (const k of this.order) {
      const r = this.firstRow.get(k);
      if (r) found.push(r);
      else unknown.push(k);
    }
    const ambiguous: DuplicateKeyExample[] = [...this.more].map(([key, m]) => ({ key, occurrences: m.n, rows: m.rows }));
    return { found, unknown, repeated: this.repeated, blankEntries: this.blank, ambiguous, rowCount };
  }
}
