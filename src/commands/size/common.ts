/**
 * Helpers shared by the calculator commands (size, limit, table): flag parsing for the model and
 * the population, key–value blocks, and the closing caution.
 */
import { nearest, str, type ParsedArgs } from '../args.js';
import { UsageError } from '../../errors.js';
import { MODELS, type Model } from '../../stats/index.js';
import { parseCount } from '../../util/percent.js';
import { wrap as wrapText } from '../../util/text.js';

/** The caution every calculator prints: the tool computes, the practitioner judges. */
export const CAUTION =
  'The tool computes; whether the control can be relied on, and how severe any deficiency is, are the\n' +
  "practitioner's judgements under the auditing standards that apply (e.g. AU-C 530, ISA 530, AS 2315)\n" +
  "and the firm's methodology.";

/** --model, checked against the known names (with a suggestion for a near miss). */
export function modelFlag(command: string, p: ParsedArgs, populationSize: number | undefined): Model | undefined {
  const v = str(p, 'model');
  if (v === undefined) return undefined;
  const m = v.trim().toLowerCase();
  if (!(MODELS as readonly string[]).includes(m)) {
    const guess = nearest(m, MODELS);
    throw new UsageError(
      `tolrate ${command}: --model "${v}" is not known; use ${MODELS.join(', ')}.${guess ? ` Did you mean ${guess}?` : ''}`,
      [`See: tolrate ${command} --help`],
    );
  }
  if (m === 'hypergeometric' && populationSize === undefined) {
    throw new UsageError(`tolrate ${command}: --model hypergeometric needs --population (the number of units in the population).`, [
      `See: tolrate ${command} --help`,
    ]);
  }
  return m as Model;
}

/** --population N, a whole number ≥ 1, or undefined. */
export function populationFlag(p: ParsedArgs): number | undefined {
  const v = str(p, 'population');
  return v === undefined ? undefined : parseCount(v, '--population', { min: 1 });
}

export { block } from '../output.js';

/** Why the model was chosen, in a few words. */
export function modelNote(model: Model, populationSize: number | undefined): string {
  switch (model) {
    case 'hypergeometric':
      return 'hypergeometric (exact for a known population, sampling without replacement)';
    case 'binomial':
      return populationSize === undefined
        ? 'binomial (population large or not given)'
        : 'binomial (chosen; ignores the finite population)';
    case 'poisson':
      return 'poisson (the factor approximation)';
  }
}

/** Wrap at 96 columns by default (words are never split). */
export function wrap(text: string, width = 96, indent = ''): string[] {
  return wrapText(text, width, indent);
}
