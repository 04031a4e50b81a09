import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadWorkpaper, newWorkpaper, saveWorkpaper, verifyLog, replay, diff, canonicalJson } from '../../src/workpaper/index.js';

function tmp(): string {
  return mkdtempSync(join(tmpdir(), 'tolrate-wp-'));
}

const engagement = {
  entity: 'Example Co', periodStart: '2026-01-01', periodEnd: '2026-12-31', reference: 'C-1', preparer: 'P. Preparer', reviewer: 'R. Reviewer',
};

describe('workpaper change log', () => {
  it('diff then replay rebuilds the value', () => {
    const a = { x: 1, y: { z: [1, 2, 3], w: 'a' }, gone: true };
    const b = { x: 2, y: { z: [1, 5, 3], w: 'a', v: null }, list: [1] };
    const changes = diff(a, b);
    expect(changes.map((c) => c.path.join('.'))).toEqual(['gone', 'list', 'x', 'y.v', 'y.z.1']);
    expect(canonicalJson(replay([{ changes: diff({}, a) } as never, { changes } as never]))).toBe(canonicalJson(b));
  });

  it('a workpaper saved by the tool verifies, and an outside edit is named', () => {
    const dir = tmp();
    const file = join(dir, 't.tolrate.json');
    let wp = saveWorkpaper(file, newWorkpaper('0.0.0'), { by: 'P. Preparer', step: 'start' });
    wp = saveWorkpaper(file, { ...wp, engagement }, { by: 'P. Preparer', step: 'plan.engagement' });
    expect(wp.log).toHaveLength(2);
    expect(verifyLog(loadWorkpaper(file))).toEqual([]);

    // Saving with nothing changed adds no entry.
    const again = saveWorkpaper(file, loadWorkpaper(file), { by: 'P. Preparer', step: 'noop' });
    expect(again.log).toHaveLength(2);

    const raw = JSON.parse(readFileSync(file, 'utf8'));
    raw.engagement.reference = 'C-2';
    writeFileSync(file, JSON.stringify(raw));
    const problems = verifyLog(loadWorkpaper(file));
    expect(problems).toHaveLength(1);
    expect(problems[0]!.where).toBe('engagement.reference');
    expect(problems[0]!.message).toContain('"C-1"');
  });

  it('an edited or removed log entry breaks the chain', () => {
    const dir = tmp();
    const file = join(dir, 't.tolrate.json');
    let wp = saveWorkpaper(file, newWorkpaper('0.0.0'), { by: 'a', step: 'start' });
    wp = saveWorkpaper(file, { ...wp, engagement }, { by: 'a', step: 'plan.engagement' });
    wp = saveWorkpaper(file, { ...wp, engagement: { ...engagement, preparer: 'Q' } }, { by: 'a', step: 'plan.engagement' });
    const edited = JSON.parse(JSON.stringify(wp));
    edited.log[1].by = 'someone else';
    expect(verifyLog(edited).some((p) => p.where === 'log entry 2' && /edited/.test(p.message))).toBe(true);
    const removed = JSON.parse(JSON.stringify(wp));
    removed.log.splice(1, 1);
    expect(verifyLog(removed).length).toBeGreaterThan(0);
  });

  it('an invalid file names the field and why', () => {
    const dir = tmp();
    const file = join(dir, 'bad.tolrate.json');
    const wp = newWorkpaper('0.0.0');
    writeFileSync(file, JSON.stringify({ ...wp, engagement: { ...engagement, periodStart: '2026-13-01' } }));
    expect(() => loadWorkpaper(file)).toThrowError(/not a valid workpaper/);
    try {
      loadWorkpaper(file);
    } catch (e) {
      expect((e as { details: string[] }).details.join('\n')).toMatch(/engagement\.periodStart: must be a date/);
    }
    writeFileSync(file, '{ not json');
    expect(() => loadWorkpaper(file)).toThrowError(/not valid JSON/);
    expect(() => loadWorkpaper(join(dir, 'missing.json'))).toThrowError(/No workpaper file/);
  });
});
