import { workpaperJsonSchema } from './schema.js';

/** The JSON Schema of the workpaper file as the text committed in schema/workpaper.schema.json. */
export function workpaperJsonSchemaText(): string {
  const schema = workpaperJsonSchema() as Record<string, unknown>;
  return `${JSON.stringify({ title: 'tolrate workpaper file (*.tolrate.json)', ...schema }, null, 2)}\n`;
}
