#!/usr/bin/env node
// Launcher. An installed package runs its compiled JavaScript: the command as one file (dist/rungs-cli.mjs,
// scripts/bundle-cli.ts: 0.14–0.18 s sooner at work than the separate modules), or its separate modules
// (dist/cli/main.js) where that file was not built and for the version and help, which load only the command-line
// parser (0.07 s against 0.11 s for reading the whole one file); either registers tsx only when a command loads study
// files that need it. A checkout of the repository (src/ beside bin/; the package
// ships no src/) runs the TypeScript source, so that `npm start` and the tests always see the code as it is, never a
// stale build.
import { existsSync } from 'node:fs';

const source = new URL('../src/cli/main.ts', import.meta.url);
const oneFile = new URL('../dist/rungs-cli.mjs', import.meta.url);
if (existsSync(source)) {
  const { useSourceTree } = await import('./source-tree.mjs');
  useSourceTree();
  await import(source.href);
} else if (existsSync(oneFile) && !onlyVersionOrHelp(process.argv.slice(2))) {
  await import(oneFile.href);
} else {
  await import('../dist/cli/main.js');
}

/** No command, or only options (--version, --help) or `help`: what the command-line parser answers alone. */
function onlyVersionOrHelp(args) {
  return args.length === 0 || args[0].startsWith('-') || args[0] === 'help';
}
