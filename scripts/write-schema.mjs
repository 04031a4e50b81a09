// Writes schema/workpaper.schema.json, the JSON Schema of the workpaper file, from the zod schema
// in the built dist/. Run with `npm run schema`; tests/workpaper/json-schema.test.ts fails when
// the committed file is stale.
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { workpaperJsonSchemaText } from '../dist/workpaper/json-schema.js';

const out = fileURLToPath(new URL('../schema/workpaper.schema.json', import.meta.url));
writeFileSync(out, workpaperJsonSchemaText());
process.stdout.write(`wrote ${out}\n`);
