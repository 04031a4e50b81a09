/**
 * The layers of src/ and the one direction their imports may point (DEVELOPERS.md, "Layers"):
 *
 *   errors, util, io  <-  stats  <-  workpaper, population, selection  <-  control-test
 *   <-  memo, reperform, engagement  <-  interview, commands  <-  cli (and the entry points cli.ts, index.ts)
 *
 * A module may import from its own layer or any layer below it, never from a layer above. This
 * test reads every import of every source file (static and dynamic), so a new upward import fails
 * `npm test` with the file and the import named.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';

const SRC = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'src');

const LAYERS: ReadonlyArray<readonly string[]> = [
  ['errors.ts', 'util', 'io'],
  ['stats'],
  ['workpaper', 'population', 'selection'],
  ['control-test'],
  ['memo', 'reperform', 'engagement'],
  ['interview', 'commands'],
  ['cli', 'cli.ts', 'index.ts'],
];

function layerOf(file: string): number {
  const top = relative(SRC, file).split(/[\\/]/)[0]!.replace(/\.js$/, '.ts');
  const i = LAYERS.findIndex((l) => l.includes(top));
  if (i < 0) throw new Error(`${relative(SRC, file)} is in no layer: add its folder to LAYERS (and to DEVELOPERS.md)`);
  return i;
}

function sources(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    return statSync(p).isDirectory() ? sources(p) : p.endsWith('.ts') ? [p] : [];
  });
}

/** Relative import specifiers of a source text: `from '...'`, `import '...'` and `import('...')`. */
export function importsOf(text: string): string[] {
  const out: string[] = [];
  const re = /(?:\bfrom\s*|\bimport\s*\(\s*(?:\/\*[^*]*\*\/\s*)?|\bimport\s+)['"`](\.{1,2}\/[^'"`$]*)['"`]/g;
  for (let m = re.exec(text); m; m = re.exec(text)) out.push(m[1]!);
  // Template-literal dynamic imports of a folder (`../commands/${name}/index.js`): the fixed part.
  const tre = /\bimport\s*\(\s*(?:\/\*[^*]*\*\/\s*)?`(\.{1,2}\/[^`$]*)\$\{/g;
  for (let m = tre.exec(text); m; m = tre.exec(text)) out.push(`${m[1]!}x.js`);
  return out;
}

describe('layering of src/', () => {
  const files = sources(SRC);

  it('finds the imports it checks (the check itself works)', () => {
    expect(importsOf(`import { a } from '../stats/index.js';\nconst m = await import('../memo/index.js');\nimport('./x.js');\nawait import(/* @vite-ignore */ \`../commands/\${name}/index.js\`);`)).toEqual([
      '../stats/index.js',
      '../memo/index.js',
      './x.js',
      '../commands/x.js',
    ]);
    expect(files.length).toBeGreaterThan(50);
  });

  it('no module imports from a layer above its own', () => {
    const upward: string[] = [];
    for (const f of files) {
      const from = layerOf(f);
      for (const spec of importsOf(readFileSync(f, 'utf8'))) {
        const target = resolve(dirname(f), spec);
        const to = layerOf(target);
        if (to > from) upward.push(`${relative(SRC, f)} imports ${spec} (layer ${LAYERS[to]!.join('/')} is above ${LAYERS[from]!.join('/')})`);
      }
    }
    expect(upward).toEqual([]);
  });

  it('stats imports nothing of ours but errors.ts', () => {
    const bad: string[] = [];
    for (const f of files.filter((x) => relative(SRC, x).startsWith('stats'))) {
      for (const spec of importsOf(readFileSync(f, 'utf8'))) {
        const target = relative(SRC, resolve(dirname(f), spec));
        if (!target.startsWith('stats') && target !== 'errors.js') bad.push(`${relative(SRC, f)} imports ${spec}`);
      }
    }
    expect(bad).toEqual([]);
  });
});
