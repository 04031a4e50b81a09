import { describe, expect, it } from 'vitest';
import { editDistance, nearest, parseFlags } from '../../src/commands/args.js';
import { UsageError } from '../../src/errors.js';

describe('argument parsing', () => {
  it('suggests the nearest flag, preferring the longer common prefix on a tie', () => {
    expect(editDistance('kitten', 'sitting')).toBe(3);
    expect(nearest('sede', ['size', 'seed', 'spares'])).toBe('seed');
    expect(nearest('tolerble', ['tolerable', 'expected'])).toBe('tolerable');
    expect(nearest('zzzzzz', ['size', 'seed'])).toBeUndefined();
  });

  it('unknown flags and missing values are usage errors with a hint', () => {
    const spec = { size: { type: 'string' as const }, seed: { type: 'string' as const } };
    expect(() => parseFlags('select', ['--sede', '1'], spec)).toThrowError(UsageError);
    expect(() => parseFlags('select', ['--sede', '1'], spec)).toThrowError(/Did you mean --seed\?/);
    expect(() => parseFlags('select', ['--size'], spec)).toThrowError(/--size needs a value/);
    expect(() => parseFlags('select', ['extra'], spec)).toThrowError(/unexpected argument: extra/);
    expect(parseFlags('select', ['--size', '5'], spec).values.size).toBe('5');
  });
});
