import type { ProgressStream, ReadOptions, ScanProgress } from './types.js';

/** Time before a bar appears, and between redraws. */
export const PROGRESS_DELAY_MS = 500;
const REDRAW_MS = 100;

export interface Reporter {
  update(p: ScanProgress): void;
  done(): void;
}

const PHASE_LABEL: Record<ScanProgress['phase'], string> = {
  reading: 'reading the population',
  'checking duplicates': 'checking duplicate keys',
  'fetching rows': 'fetching the selected rows',
  'finding keys': 'finding the listed keys',
};

/** A one-line bar for a terminal, drawn only after PROGRESS_DELAY_MS and cleared at the end. */
export class TerminalBar implements Reporter {
  private readonly t0 = Date.now();
  private last = 0;
  private drawn = false;
  constructor(private readonly out: ProgressStream) {}

  update(p: ScanProgress): void {
    const now = Date.now();
    if (now - this.t0 < PROGRESS_DELAY_MS || now - this.last < REDRAW_MS) return;
    this.last = now;
    const cols = Math.max(40, Math.min(this.out.columns || 80, 120));
    const known = p.bytesTotal > 0;
    const frac = known ? Math.min(1, p.bytesDone / p.bytesTotal) : 0;
    const rows = `${p.rows.toLocaleString('en-US')} rows`;
    let label = `${known ? ` ${String(Math.floor(frac * 100)).padStart(3)}%` : ''}  ${rows}  ${PHASE_LABEL[p.phase]}`;
    if (label.length + 14 > cols) label = `${known ? ` ${String(Math.floor(frac * 100)).padStart(3)}%` : ''}  ${rows}`;
    const width = Math.max(10, cols - label.length - 3);
    let bar: string;
    if (known) {
      const full = Math.round(frac * width);
      bar = '#'.repeat(full) + '.'.repeat(width - full);
    } else {
      // Size unknown (a workbook): a block that moves back and forth.
      const span = Math.max(1, width - 3);
      const step = Math.floor((now - this.t0) / REDRAW_MS) % (2 * span);
      const at = step < span ? step : 2 * span - step;
      bar = '.'.repeat(at) + '###' + '.'.repeat(width - 3 - at);
    }
    const line = `[${bar}]${label}`.slice(0, cols - 1);
    this.out.write(`\r${line}`);
    this.drawn = true;
  }

  done(): void {
    if (this.drawn) {
      const cols = Math.max(40, Math.min(this.out.columns || 80, 120));
      this.out.write(`\r${' '.repeat(cols - 1)}\r`);
      this.drawn = false;
    }
  }
}

/** Calls the user's callback at most every REDRAW_MS (and always for the final figures). */
class CallbackReporter implements Reporter {
  private last = 0;
  private latest: ScanProgress | undefined;
  private sentLatest = true;
  constructor(private readonly fn: (p: ScanProgress) => void) {}
  update(p: ScanProgress): void {
    this.latest = p;
    const now = Date.now();
    if (now - this.last >= REDRAW_MS) {
      this.last = now;
      this.sentLatest = true;
      this.fn(p);
    } else this.sentLatest = false;
  }
  done(): void {
    if (this.latest && !this.sentLatest) this.fn(this.latest);
    this.sentLatest = true;
  }
}

const NONE: Reporter = { update() {}, done() {} };

/** The reporter for the options: a bar only when the stream is a terminal; else nothing. */
export function makeReporter(opts: ReadOptions = {}): Reporter {
  const list: Reporter[] = [];
  if (opts.onProgress) list.push(new CallbackReporter(opts.onProgress));
  const stream: ProgressStream | undefined = opts.progress === true ? process.stderr : opts.progress || undefined;
  if (stream && stream.isTTY) list.push(new TerminalBar(stream));
  if (list.length === 0) return NONE;
  if (list.length === 1) return list[0]!;
  return {
    update: (p) => list.forEach((r) => r.update(p)),
    done: () => list.forEach((r) => r.done()),
  };
}
