import { readdirSync, statSync, existsSync } from 'node:fs';
import { join, resolve, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import { RungsInputError } from '../errors.ts';
import type { StudyDeclaration } from './declaration.ts';
import { validateStudy } from './schema.ts';

export const STUDY_SUFFIX = '.study.ts';

/** Study files under the given files or folders (folders searched recursively for *.study.ts), sorted. */
export function findStudyFiles(paths: string[]): string[] {
  const out = new Set<string>();
  for (const p of paths) {
    if (!existsSync(p)) throw new RungsInputError(`${p}: no such file or folder; give study files (*${STUDY_SUFFIX}) or folders holding them`, p);
    const st = statSync(p);
    if (st.isDirectory()) walk(p, out);
    else out.add(resolve(p));
  }
  return [...out].sort();
}

function walk(dir: string, out: Set<string>): void {
  for (const name of readdirSync(dir).sort()) {
    if (name === 'node_modules' || name.startsWith('.')) continue;
    const p = join(dir, name);
    const st = statSync(p);
    if (st.isDirectory()) walk(p, out);
    else if (name.endsWith(STUDY_SUFFIX) || name.endsWith('.study.js') || name.endsWith('.study.mjs')) out.add(resolve(p));
  }
}

export interface LoadedStudy {
  file: string;
  declaration: StudyDeclaration;
}

/** Imports a study module and validates its default export. */
export async function loadStudy(file: string): Promise<LoadedStudy> {
  const shown = relative(process.cwd(), file) || file;
  let mod: Record<string, unknown>;
  try {
    mod = (await import(pathToFileURL(resolve(file)).href)) as Record<string, unknown>;
  } catch (err) {
    const msg = err instanceof Error ? err.message.split('\n')[0] : String(err);
    throw new RungsInputError(`${shown}: the study file threw while loading: ${msg}`, shown);
  }
  if (!('default' in mod) || mod.default === undefined) {
    throw new RungsInputError(`${shown}: no default export; a study file must \`export default defineStudy({ ... })\``, shown);
  }
  return { file: shown, declaration: validateStudy(mod.default, shown) };
}
