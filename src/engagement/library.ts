/**
 * The firm's library of standard controls: one JSON file per control in a folder (the shipped one
 * is templates/library/; a firm copies it and names its copy in the engagement folder file). Each
 * gives the control's description, objective, owner, frequency and nature and its attributes with
 * their deviation definitions, to pick from when planning instead of typing them. Every problem of
 * every file is named on load.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import * as z from 'zod';
import { FileInputError } from '../errors.js';
import { readRegularText } from '../io/read.js';
import { jsonErrorWhere } from '../io/messages.js';
import { FREQUENCIES, NATURES, type Control } from '../workpaper/schema.js';
import { pctPlain } from '../util/format.js';

const text = z.string().trim().min(1, 'must not be empty');

export const LibraryControl = z.object({
  $comment: z.string().optional(),
  id: text,
  /** A short name shown in the list. */
  title: text,
  description: text,
  objective: text,
  owner: text,
  frequency: z.enum(FREQUENCIES, { error: `must be one of ${FREQUENCIES.join(', ')}` }),
  nature: z.enum(NATURES, { error: `must be one of ${NATURES.join(', ')}` }),
  key: z.boolean({ error: 'must be true or false' }),
  attributes: z
    .array(
      z.object({
        description: text,
        deviationDefinition: text,
        /** A fraction (0.05), only when the attribute has a rate of its own. */
        tolerableRate: z.number().gt(0, 'must be above 0').lt(0.5, 'must be below 0.5 (50%)').optional(),
      }),
    )
    .min(1, 'give at least one attribute'),
});
export type LibraryControl = z.infer<typeof LibraryControl>;

/** The library shipped with tolrate. */
export function shippedLibraryDir(): string {
  return join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'templates', 'library');
}

/** Load every `*.json` of a library folder; all problems of all files are reported together. */
export function loadLibrary(dir: string): LibraryControl[] {
  let names: string[];
  try {
    names = readdirSync(dir).filter((n) => n.endsWith('.json')).sort();
  } catch (e) {
    throw new FileInputError(dir, `Cannot read the control library ${dir}: ${(e as Error).message}`);
  }
  const out: LibraryControl[] = [];
  const problems: string[] = [];
  for (const n of names) {
    let data: unknown;
    let raw = '';
    try {
      raw = readRegularText(join(dir, n), 'A library file').replace(/^\uFEFF/, '');
      data = JSON.parse(raw);
    } catch (e) {
      problems.push(`${n}: ${e instanceof SyntaxError ? `not valid JSON: ${jsonErrorWhere(e, raw)}` : (e as Error).message}`);
      continue;
    }
    const r = LibraryControl.safeParse(data);
    if (!r.success) {
      for (const i of r.error.issues) problems.push(`${n}: ${i.path.map(String).join('.') || '(top level)'}: ${i.message}`);
      continue;
    }
    if (out.some((c) => c.id === r.data.id)) problems.push(`${n}: id ${r.data.id} is used by another file`);
    else out.push(r.data);
  }
  if (problems.length > 0) throw new FileInputError(dir, `The control library ${dir} has ${problems.length} problem(s):`, problems);
  if (out.length === 0) throw new FileInputError(dir, `The control library ${dir} has no control files (*.json).`);
  return out;
}

type Answers = Record<string, string | boolean>;

/** A control (from the library, or recorded last year) as the answers to the control questions, by question id. */
export function controlAnswers(c: Pick<Control, 'id' | 'description' | 'objective' | 'owner' | 'frequency' | 'nature' | 'key'>): Answers {
  return {
    'plan.control.id': c.id,
    'plan.control.description': c.description,
    'plan.control.objective': c.objective,
    'plan.control.owner': c.owner,
    'plan.control.frequency': c.frequency,
    'plan.control.nature': c.nature,
    'plan.control.key': c.key,
  };
}

/** Attributes, in order, as the answers to the attribute questions (ids A1, A2, ... unless given). */
export function attributeAnswers(attrs: ReadonlyArray<{ id?: string; description: string; deviationDefinition: string; tolerableRate?: number | undefined }>): Answers {
  const a: Answers = {};
  attrs.forEach((x, i) => {
    const id = x.id ?? `A${i + 1}`;
    a[`plan.attributes.${id}.description`] = x.description;
    a[`plan.attributes.${id}.deviation`] = x.deviationDefinition;
    a[`plan.attributes.${id}.tolerableRate`] = x.tolerableRate !== undefined ? pctPlain(x.tolerableRate) : '';
    a[`plan.attributes.more.${id}`] = i < attrs.length - 1;
  });
  return a;
}

/** A library control as answers to the control and attribute questions, by question id. */
export function libraryAnswers(c: LibraryControl): Answers {
  return { ...controlAnswers(c), ...attributeAnswers(c.attributes) };
}
