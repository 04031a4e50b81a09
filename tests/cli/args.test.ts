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

describe('how tolrate was started, for the commands it prints', () => {
  it('names the command the user can type again', async () => {
    const { invocation } = await import('../../src/cli/main.js');
    expect(invocation('/usr/local/bin/tolrate', '/home/a')).toBe('tolrate');
    expect(invocation('/root/.npm/_npx/1a2b/node_modules/.bin/tolrate', '/home/a')).toBe('npx tolrate');
    expect(invocation('/home/a/proj/node_modules/tolrate/dist/cli.js', '/home/a/proj')).toBe('npx tolrate');
    expect(invocation('/home/a/tolrate/dist/cli.js', '/home/a/tolrate')).toBe('node dist/cli.js');
    expect(invocation('/home/a/tolrate/dist/cli.js', '/tmp/work')).toBe('node /home/a/tolrate/dist/cli.js');
    expect(invocation(undefined, '/tmp')).toBe('tolrate');
  });
});
