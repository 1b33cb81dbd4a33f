/** The layering DEVELOPERS.md states: a module under src/ imports only from its own layer or the ones below. */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

// Bottom up; folders on one line share a layer.
const LAYERS: string[][] = [
  ['errors'], ['csv', 'mesh', 'analysis', 'files'], ['exact', 'linalg'], ['codegen'], ['equation'], ['fem'], ['norms'], ['external', 'scheduler'], ['study'],
  ['report', 'fit', 'parallel'], ['gate'], ['cli'],
];
const rank = new Map(LAYERS.flatMap((names, i) => names.map((n) => [n, i] as const)));
const src = resolve(import.meta.dirname, '..', 'src');

function files(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) =>
    e.isDirectory() ? files(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : []);
}
const topOf = (file: string): string => relative(src, file).split('/')[0].replace(/\.ts$/, '');

describe('layers', () => {
  it('every folder of src/ has a layer', () => {
    const tops = new Set(files(src).map(topOf).filter((t) => t !== 'index'));
    expect([...tops].filter((t) => !rank.has(t))).toEqual([]);
  });

  it('no module imports from a layer above its own', () => {
    const upward: string[] = [];
    for (const file of files(src)) {
      const own = rank.get(topOf(file));
      if (own === undefined) continue; // src/index.ts, the public entry, may import anything
      for (const [, spec] of readFileSync(file, 'utf8').matchAll(/from '(\.[^']+)'/g)) {
        const target = resolve(dirname(file), spec);
        const layer = rank.get(topOf(target));
        if (layer !== undefined && layer > own) upward.push(`${relative(src, file)} → ${relative(src, target)}`);
      }
    }
    expect(upward).toEqual([]);
  });
});
