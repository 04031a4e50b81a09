import { parseArgs } from 'node:util';
import { UsageError } from '../errors.js';
import { editDistance, nearest } from '../util/text.js';

export type FlagSpec = Record<string, { type: 'string' | 'boolean'; short?: string; multiple?: boolean }>;

export { editDistance, nearest };

export interface ParsedArgs {
  values: Record<string, string | boolean | string[] | undefined>;
  positionals: string[];
}

/**
 * Parse a command's arguments. Every command also accepts --help/-h. Unknown flags and missing
 * values become a UsageError (exit 2) that suggests the nearest known flag.
 */
export function parseFlags(command: string, args: string[], spec: FlagSpec, maxPositionals = 0): ParsedArgs {
  const options = { help: { type: 'boolean' as const, short: 'h' }, ...spec };
  let parsed: ParsedArgs;
  try {
    parsed = parseArgs({ args, options, allowPositionals: true, strict: true }) as ParsedArgs;
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    const unknown = /Unknown option '(-{1,2}[^']+)'/.exec(msg);
    if (unknown) {
      const flag = unknown[1]!.replace(/^-+/, '').split('=')[0]!;
      const guess = nearest(flag, Object.keys(options));
      throw new UsageError(
        `tolrate ${command}: unknown option --${flag}.${guess ? ` Did you mean --${guess}?` : ''}`,
        [`See: tolrate ${command} --help`],
      );
    }
    const missing = /Option '(-\w, )?(--[\w-]+)[^']*' argument missing/.exec(msg);
    if (missing) {
      throw new UsageError(`tolrate ${command}: ${missing[2]} needs a value.`, [`See: tolrate ${command} --help`]);
    }
    const noValue = /Option '(--[\w-]+)' does not take an argument/.exec(msg);
    if (noValue) {
      throw new UsageError(`tolrate ${command}: ${noValue[1]} does not take a value.`, [`See: tolrate ${command} --help`]);
    }
    throw new UsageError(`tolrate ${command}: ${msg}`, [`See: tolrate ${command} --help`]);
  }
  if (!parsed.values.help && parsed.positionals.length > maxPositionals) {
    const extra = parsed.positionals.slice(maxPositionals).join(' ');
    throw new UsageError(`tolrate ${command}: unexpected argument: ${extra}`, [`See: tolrate ${command} --help`]);
  }
  return parsed;
}

/** A string flag's value, or undefined. */
export function str(p: ParsedArgs, name: string): string | undefined {
  const v = p.values[name];
  return typeof v === 'string' ? v : undefined;
}

/** A string flag that must be present. */
export function required(command: string, p: ParsedArgs, name: string): string {
  const v = str(p, name);
  if (v === undefined || v === '') {
    throw new UsageError(`tolrate ${command}: --${name} is required.`, [`See: tolrate ${command} --help`]);
  }
  return v;
}
