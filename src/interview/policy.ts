/**
 * The firm's non-statistical sampling policy: a JSON file giving the number of items to test by
 * control frequency and reliance level, with the assumptions behind the sizes. The default is
 * templates/sampling-policy.json; a firm's own copy is passed with `--policy FILE`. The file is
 * validated on load and every problem is named.
 */
import { readRegularText } from '../io/read.js';
import { jsonErrorWhere } from '../io/messages.js';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as z from 'zod';
import { FileInputError } from '../errors.js';
import { FREQUENCIES, type Frequency } from '../workpaper/schema.js';

const percent = (what: string) =>
  z.number({ error: `${what} must be a number (a percentage, e.g. 90)` }).gt(0, `${what} must be above 0`).lt(100, `${what} must be below 100`);
const size = z.number({ error: 'must be a whole number of items' }).int('must be a whole number of items').positive('must be at least 1');

const RelianceLevel = z.object({
  id: z.string().regex(/^[a-z][a-z0-9-]*$/, 'must be a short lowercase name such as "moderate"'),
  label: z.string().trim().min(1, 'must not be empty'),
  description: z.string().optional(),
  /** The tolerable deviation rate the size is meant for (offered as the default). */
  tolerableRatePercent: percent('tolerableRatePercent'),
});

export const SamplingPolicy = z
  .object({
    $comment: z.string().optional(),
    name: z.string().trim().min(1, 'must not be empty'),
    version: z.string().optional(),
    assumptions: z.object({
      confidencePercent: percent('confidencePercent'),
      expectedDeviations: z.literal(0, { error: 'must be 0: the policy sizes assume no expected deviations' }),
      text: z.string().trim().min(1, 'must not be empty'),
    }),
    relianceLevels: z.array(RelianceLevel).min(1, 'at least one reliance level is needed'),
    /** sizes[frequency][relianceLevel.id] = items to test. */
    sizes: z.partialRecord(z.enum(FREQUENCIES), z.record(z.string(), size)),
    /** Optional wording of the usual range per frequency, shown beside the size. */
    ranges: z.partialRecord(z.enum(FREQUENCIES), z.string()).optional(),
  })
  .superRefine((p, ctx) => {
    const ids = p.relianceLevels.map((r) => r.id);
    if (new Set(ids).size !== ids.length) ctx.addIssue({ code: 'custom', message: 'reliance level ids must be unique', path: ['relianceLevels'] });
    for (const f of FREQUENCIES) {
      const row = p.sizes[f];
      if (!row) {
        ctx.addIssue({ code: 'custom', message: `no sizes for the frequency "${f}"`, path: ['sizes', f] });
        continue;
      }
      for (const id of ids) {
        if (row[id] === undefined) ctx.addIssue({ code: 'custom', message: `no size for reliance level "${id}"`, path: ['sizes', f, id] });
      }
      for (const k of Object.keys(row)) {
        if (!ids.includes(k)) ctx.addIssue({ code: 'custom', message: `"${k}" is not one of the reliance levels (${ids.join(', ')})`, path: ['sizes', f, k] });
      }
    }
  });

export type SamplingPolicy = z.infer<typeof SamplingPolicy>;

/** The policy file shipped with tolrate. */
export function defaultPolicyPath(): string {
  const here = dirname(fileURLToPath(import.meta.url));
  return join(here, '..', '..', 'templates', 'sampling-policy.json');
}

export function loadPolicy(path = defaultPolicyPath()): SamplingPolicy {
  let raw: string;
  try {
    raw = readRegularText(path, 'The sampling policy');
  } catch (e) {
    if ((e as { errno?: string }).errno === 'ENOENT') throw new FileInputError(path, `No sampling policy file at ${path}.`);
    throw e;
  }
  let data: unknown;
  try {
    data = JSON.parse(raw);
  } catch (e) {
    throw new FileInputError(path, `The sampling policy ${path} is not valid JSON: ${jsonErrorWhere(e, raw)}.`);
  }
  const r = SamplingPolicy.safeParse(data);
  if (!r.success) {
    const details = r.error.issues.map((i) => `${i.path.map(String).join('.') || '(top level)'}: ${i.message}`);
    throw new FileInputError(path, `The sampling policy ${path} is not valid:`, details);
  }
  return r.data;
}

/** The policy's size for a control frequency and reliance level. */
export function policySize(policy: SamplingPolicy, frequency: Frequency, reliance: string): number {
  const v = policy.sizes[frequency]?.[reliance];
  if (v === undefined) throw new FileInputError('policy', `The sampling policy has no size for ${frequency} controls at reliance "${reliance}".`);
  return v;
}
