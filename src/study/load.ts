import { readdirSync, readFileSync, statSync, existsSync } from 'node:fs';
import { dirname, join, resolve, relative } from 'node:path';
import { pathToFileURL } from 'node:url';
import { createRequire, register } from 'node:module';
import { RungsInputError } from '../errors.ts';
import type { StudyDeclaration } from './declaration.ts';
import { validateStudy } from './schema.ts';
import { resolveStudyPaths } from '../external/study-paths.ts';
import { heldLibraryUrl } from './library.ts';
import { COMPILED } from './study-compiler.ts';

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

/** The entry point study files get for `import ... from 'rungs'`: the rungs that is running them (src/index.ts run
 *  from the source, dist/index.js in the compiled package; the command run as one file answers it with the library
 *  that file holds, heldLibraryUrl). */
const RUNGS_ENTRY = new URL(import.meta.url.endsWith('.ts') ? '../index.ts' : '../index.js', import.meta.url).href;

let resolverRegistered = false;

/**
 * Lets a study file anywhere (a temporary folder, another project) import 'rungs'. Node resolves the bare name from
 * the study's own folder upwards (a node_modules/rungs there, or this package itself for files inside it), and that
 * answer is kept; only when that finds nothing is 'rungs' taken to mean the rungs that runs the study. This package's
 * own entry is answered by the library the one-file command holds, when it runs as one (library.ts). Registered once
 * per thread (workers load study files too).
 */
function ensureRungsResolvable(): void {
  if (resolverRegistered || typeof register !== 'function') return;
  resolverRegistered = true;
  const hooks = [
    `const entry = ${JSON.stringify(RUNGS_ENTRY)};`,
    `const held = ${JSON.stringify(heldLibraryUrl())};`,
    'export async function resolve(specifier, context, next) {',
    '  let found;',
    '  try { found = await next(specifier, context); }',
    "  catch (err) { if (specifier === 'rungs' && err && err.code === 'ERR_MODULE_NOT_FOUND') return { url: held ?? entry, format: 'module', shortCircuit: true }; throw err; }",
    // The command run as one file: this package's entry is answered by the library that file holds (library.ts).
    "  if (held !== null && found.url === entry) return { url: held, format: 'module', shortCircuit: true };",
    // A study file is an ES module (it must `export default`), also where no package.json says "type": "module".
    "  if (/\\.study\\.(ts|js)$/.test(found.url.split('?')[0]) && found.format === 'commonjs') return { ...found, format: 'module' };",
    '  return found;',
    '}',
  ].join('\n');
  try {
    register(`data:text/javascript,${encodeURIComponent(hooks)}`);
  } catch {
    // Without loader hooks (an embedding that forbids them) the message of loadStudy says where studies may live.
  }
}

const ANSI = /\u001b\[[0-9;]*m/g;

export interface LoadErrorPlace {
  line: number;
  column: number;
  /** True for a syntax error (the file could not be compiled), false for an error thrown while it ran. */
  syntax: boolean;
  /** The one-line reason. */
  reason: string;
}

/** Where in the study file a load error happened, from a transform error (esbuild under tsx, oxc under vitest), a
 *  Node SyntaxError or the stack of an error the file threw; null when its text does not locate it there. */
export function locateLoadError(err: unknown, absFile: string): LoadErrorPlace | null {
  if (!(err instanceof Error)) return null;
  const text = `${err.message}\n${err.stack ?? ''}`.replace(ANSI, '');
  const base = absFile.split(/[\\/]/).pop()!;
  const escaped = base.replace(/[.*+?^${}()|[\]\\]/g, '\\$&');
  const syntax = /^Transform failed/.test(err.message) || err.name === 'SyntaxError' || err.name === 'TransformError';
  // path:line:column as transformers and stack frames print it ("/x/a.study.ts:4:15: ERROR: ...", "[ a.study.ts:4:16 ]").
  const at = new RegExp(`(?:^|[\\s\\[(/\\\\])${escaped}:(\\d+):(\\d+)`, 'm').exec(text);
  if (at) return { line: Number(at[1]), column: Number(at[2]), syntax, reason: explain(err, text) };
  // Node's own SyntaxError for .study.js / .mjs: "file:///x/a.study.mjs:4" then the source line and a caret line.
  const node = new RegExp(`${escaped}:(\\d+)\\n(.*)\\n(\\s*)\\^`).exec(text);
  if (node) return { line: Number(node[1]), column: node[3].length + 1, syntax: true, reason: err.message.split('\n')[0] };
  return null;
}

/** The one-line reason of a transform error: its "ERROR: ..." or "[PARSE_ERROR] ..." text, else the first line. */
function explain(err: Error, text: string): string {
  const esbuild = /:\d+:\d+: ERROR: (.*)/.exec(text);
  if (esbuild) return esbuild[1].trim();
  const oxc = /\[PARSE_ERROR\]\s*(.*)/.exec(text);
  if (oxc) return oxc[1].trim();
  return err.message.split('\n')[0];
}


let typeScriptLoader: Promise<void> | null = null;

/** Registers tsx's loader for study files (compiled package; once). Registered only when a study file needs it, once
 *  the command's own modules are loaded: registered earlier, every one of the hundreds of modules of mathjs and the
 *  numerics would be resolved and loaded through the loader's thread, which costs seconds. */
function ensureTypeScriptLoader(): Promise<void> {
  typeScriptLoader ??= import('tsx/esm/api').then(({ register }) => { register(); });
  return typeScriptLoader;
}

/** Static imports and re-exports of a compiled study module as esbuild prints them, each at the start of a line:
 *  `import ... from "x";`, `export ... from "x";`, `import "x";` (a string that merely contains such words is not at
 *  the start of a statement's line). */
const IMPORT_SPECIFIERS = /^(?:(?:import|export)\s[^;]*?\bfrom\s*|import\s*)"([^"]+)";/gm;

/**
 * A study file whose only imports are 'rungs' and Node's own modules (every bundled study), in the compiled package:
 * compiled to JavaScript by esbuild (the compiler tsx runs too) in this thread and imported from a data: URL, its
 * 'rungs' resolved as ensureRungsResolvable resolves it (from the study's folder upwards, else the rungs that runs
 * it). No loader thread is started: tsx's registration and the study's load through it took about 0.1 s of every run
 * (a third of a 3-level run's own work, measured with rod-p1). Null when the file needs more (other imports,
 * import.meta, require, a dynamic import) or fails in any way here: loadStudy then loads it through tsx as before,
 * so its errors read as they always have.
 */
async function importCompiledStudy(abs: string): Promise<Record<string, unknown> | null> {
  if (!COMPILED || !abs.endsWith(STUDY_SUFFIX)) return null;
  try {
    let rungs: string;
    try { rungs = pathToFileURL(createRequire(abs).resolve('rungs')).href; } catch { rungs = RUNGS_ENTRY; }
    if (rungs === RUNGS_ENTRY) rungs = heldLibraryUrl() ?? rungs;
    const js = await compiledStudyModule(readFileSync(abs, 'utf8'), abs, rungs);
    if (js === null) return null;
    return (await import(`data:text/javascript;base64,${Buffer.from(js).toString('base64')}`)) as Record<string, unknown>;
  } catch {
    return null;
  }
}

/** A study file's text as a module that needs no loader (importCompiledStudy): compiled by esbuild, 'rungs' replaced
 *  by the URL `rungs`; null when it needs more than 'rungs' and Node's own modules (another import, import.meta,
 *  require, a dynamic import). Throws esbuild's error for a file that does not compile. */
export async function compiledStudyModule(text: string, abs: string, rungs: string): Promise<string | null> {
  if (/\bimport\.meta\b|\brequire\s*\(|\bimport\s*\(/.test(text)) return null;
  const { transform } = await import('esbuild');
  const { code } = await transform(text, { loader: 'ts', format: 'esm', target: 'node20', sourcefile: abs });
  let eligible = true;
  const js = code.replace(IMPORT_SPECIFIERS, (all: string, spec: string) => {
    if (spec === 'rungs') return all.replace('"rungs"', JSON.stringify(rungs));
    if (!spec.startsWith('node:')) eligible = false;
    return all;
  });
  return eligible ? js : null;
}

/** Imports a study module and validates its default export. */
export async function loadStudy(file: string): Promise<LoadedStudy> {
  const shown = relative(process.cwd(), file) || file;
  const abs = resolve(file);
  let mod: Record<string, unknown> | null = await importCompiledStudy(abs);
  if (!mod) {
    if (COMPILED) await ensureTypeScriptLoader();
    ensureRungsResolvable();
  }
  try {
    mod ??= (await import(pathToFileURL(abs).href)) as Record<string, unknown>;
  } catch (err) {
    const msg = err instanceof Error ? err.message.split('\n')[0] : String(err);
    const code = (err as NodeJS.ErrnoException | null)?.code;
    if (code === 'ERR_MODULE_NOT_FOUND' && /['"]rungs['"]/.test(msg)) {
      throw new RungsInputError(
        `${shown}: import 'rungs' could not be resolved from ${dirname(abs)}; run study files with the rungs command ` +
        `(which lends them its own copy wherever they live), or install rungs in a node_modules folder above the study`, shown);
    }
    const place = locateLoadError(err, abs);
    if (place?.syntax) {
      throw new RungsInputError(`${shown}:${place.line}:${place.column}: syntax error at line ${place.line}, column ${place.column}: ${place.reason}; fix the study file there`, shown);
    }
    const where = place ? ` (at line ${place.line}, column ${place.column})` : '';
    throw new RungsInputError(`${shown}: the study file threw while loading: ${msg}${where}`, shown);
  }
  if (!('default' in mod) || mod.default === undefined) {
    throw new RungsInputError(`${shown}: no default export; a study file must \`export default defineStudy({ ... })\``, shown);
  }
  const declaration = validateStudy(mod.default, shown);
  // Paths in an external command (./solver.py, ../bin/tool) and a relative cwd are the study file's, not the shell's.
  if (declaration.discretization.kind === 'external') {
    declaration.discretization = resolveStudyPaths(declaration.discretization, dirname(abs), `${shown} (study '${declaration.name}'): discretization`);
  }
  return { file: shown, declaration };
}
