import { afterEach, describe, expect, it, vi } from 'vitest';
import { scanPopulation, type ScanProgress } from '../../src/population/index.js';
import { makeReporter, PROGRESS_DELAY_MS, TerminalBar } from '../../src/population/progress.js';
import { tempDir } from './helpers.js';

const { file } = tempDir('tolrate-progress-');

describe('progress', () => {
  afterEach(() => vi.useRealTimers());

  it('calls onProgress with the bytes read, ending at the file size', async () => {
    const lines = ['id'];
    for (let i = 0; i < 300_000; i++) lines.push(`ID-${i}`);
    const p = file('p.csv', lines.join('\n') + '\n');
    const seen: ScanProgress[] = [];
    await scanPopulation({ kind: 'csv', path: p, keyColumn: 'id' }, { onProgress: (x) => seen.push(x) });
    expect(seen.length).toBeGreaterThan(0);
    const last = seen[seen.length - 1]!;
    expect(last).toMatchObject({ phase: 'reading', rows: 300_000 });
    expect(last.bytesDone).toBe(last.bytesTotal);
  });

  it('draws nothing on a stream that is not a terminal', () => {
    const out: string[] = [];
    const r = makeReporter({ progress: { isTTY: false, write: (s: string) => out.push(s) } });
    r.update({ phase: 'reading', bytesDone: 1, bytesTotal: 2, rows: 1 });
    r.done();
    expect(out).toEqual([]);
  });

  it('on a terminal, draws only after the delay, and clears its line at the end', () => {
    vi.useFakeTimers();
    const out: string[] = [];
    const bar = new TerminalBar({ isTTY: true, columns: 60, write: (s: string) => out.push(s) });
    bar.update({ phase: 'reading', bytesDone: 10, bytesTotal: 100, rows: 5 });
    expect(out).toEqual([]);
    vi.advanceTimersByTime(PROGRESS_DELAY_MS + 1);
    bar.update({ phase: 'reading', bytesDone: 50, bytesTotal: 100, rows: 500 });
    expect(out).toHaveLength(1);
    expect(out[0]).toMatch(/^\r\[#+\.+\]  50%  500 rows  reading the population$/);
    expect(out[0]!.length).toBeLessThanOrEqual(60);
    bar.done();
    expect(out[1]).toMatch(/^\r +\r$/);
  });
});
