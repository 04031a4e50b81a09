import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { workpaperJsonSchemaText } from '../../src/workpaper/json-schema.js';

describe('JSON Schema export', () => {
  it('schema/workpaper.schema.json matches the zod schema (run `npm run schema` after a change)', () => {
    const committed = readFileSync(new URL('../../schema/workpaper.schema.json', import.meta.url), 'utf8');
    expect(committed).toBe(workpaperJsonSchemaText());
  });
});
