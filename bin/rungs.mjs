#!/usr/bin/env node
// Launcher. An installed package runs its compiled JavaScript (dist/), which registers tsx only when a command loads
// study files. A checkout of the repository (src/ beside bin/; the package ships no src/) runs the TypeScript source,
// so that `npm start` and the tests always see the code as it is, never a stale build.
import { existsSync } from 'node:fs';

const source = new URL('../src/cli/main.ts', import.meta.url);
if (existsSync(source)) {
  const { useSourceTree } = await import('./source-tree.mjs');
  useSourceTree();
  await import(source.href);
} else {
  await import('../dist/cli/main.js');
}
