// Running rungs from its TypeScript source (a checkout) or from its compiled package, for the launcher and for every
// worker thread's entry. From the source, tsx compiles src/ on the fly, and the condition `rungs-source` makes
// `import ... from 'rungs'` (the bundled studies, a test's study) resolve to src/index.ts like the running code, not
// to dist/ (package.json "exports"): one copy of the library, so error classes and registries are shared between the
// code and the studies it loads. On Node 20 loader hooks do not reach worker threads, so each worker calls this too.
import { existsSync } from 'node:fs';
import { register } from 'node:module';
import { register as registerTsx } from 'tsx/esm/api';

export const SOURCE_CONDITION = 'rungs-source';

/** Registers tsx and the source condition in this thread (bin/rungs.mjs in a checkout). */
export function useSourceTree() {
  registerTsx();
  const hook = [
    `const condition = ${JSON.stringify(SOURCE_CONDITION)};`,
    'export async function resolve(specifier, context, next) {',
    '  if (context.conditions.includes(condition)) return next(specifier, context);',
    '  return next(specifier, { ...context, conditions: [...context.conditions, condition] });',
    '}',
  ].join('\n');
  register(`data:text/javascript,${encodeURIComponent(hook)}`);
}

/**
 * For a worker thread's entry, a plain .mjs file beside its module (`stem`.ts in src/, `stem`.js once compiled into
 * dist/): imports that module as the tree it lives in requires. From the source, with useSourceTree; compiled, with
 * tsx's loader only when the worker may load study files, which are TypeScript (a level pool's worker: studies true);
 * the cell team's and the load worker's tasks are rungs's own compiled modules, and registering tsx would delay
 * their first part by about 0.1 s.
 */
export async function importWorkerModule(entryUrl, stem, { studies = true } = {}) {
  const source = new URL(`./${stem}.ts`, entryUrl);
  if (existsSync(source)) {
    useSourceTree();
    return import(source.href);
  }
  if (studies) registerTsx();
  return import(new URL(`./${stem}.js`, entryUrl).href);
}
