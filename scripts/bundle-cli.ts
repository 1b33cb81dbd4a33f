/**
 * Builds dist/rungs-cli.mjs: the command (dist/cli/bundle-entry.js and every module it imports, with the packages it
 * uses) as one ES module, which the launcher (bin/rungs.mjs) starts when the package has it. Node 20 loads the
 * compiled library's ~450 modules one by one (resolution, file reads, a compile per module): importing the run
 * command took 0.31–0.39 s, and the same code as one file 0.14–0.18 s less per run (a 3-level study 0.74–0.78 →
 * 0.52–0.62 s; AMD EPYC 2 cores, Node 20.20.2, alternating runs). `npm run build` runs this after tsc; so do the
 * benchmarks' installed layout and the package test (through npm pack's prepare).
 *
 * Each compiled module's `import.meta.url` is replaced by the URL its file has in dist/ (worker threads start from
 * files beside the modules, the version is read from the package.json above dist/), so the one file finds what the
 * separate modules found. Packages that find their own files at run time stay outside (esbuild its binary, tsx and
 * tinypool their loader and worker files) and so does playwright-core (7 MB, for --pdf only); mathjs is loaded by
 * createRequire (src/exact/mathjs.ts), which the bundler leaves alone. CommonJS packages bundled in (commander) get
 * `require` from createRequire.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build, type BuildOptions } from 'esbuild';

export const BUNDLE_FILE = 'rungs-cli.mjs';
export const WORKER_BUNDLE_FILE = 'rungs-worker.mjs';

/** Packages left outside the one file (see above). */
const OUTSIDE = ['esbuild', 'tsx', 'tinypool', 'playwright-core'];

/** Bundles `packageRoot`/dist (already compiled by tsc from `packageRoot`/src) into `packageRoot`/dist/rungs-cli.mjs,
 *  and the cell team's worker with every task module (the files named *-task.ts in src/) into dist/rungs-worker.mjs. */
export async function bundleCli(packageRoot: string): Promise<void> {
  const dist = join(packageRoot, 'dist');
  await build({ ...common(dist), entryPoints: [join(dist, 'cli', 'bundle-entry.js')], outfile: join(dist, BUNDLE_FILE) });
  // The worker's entry: each task module held under the URL its file has in dist/ (src/fem/team/task-registry.ts),
  // then the worker's message loop.
  // The task modules are those of src/ (dist/ may hold files of modules since removed: tsc does not delete them).
  const src = join(packageRoot, 'src');
  const tasks = findFiles(src, (name) => name.endsWith('-task.ts')).map((file) => relative(src, file).split(sep).join('/').replace(/\.ts$/, '.js'));
  const entry = [
    "import { holdTaskModules } from './fem/team/task-registry.js';",
    ...tasks.map((rel, i) => `import * as task${i} from ${JSON.stringify(`./${rel}`)};`),
    "import './fem/team/worker.js';",
    `holdTaskModules({ ${tasks.map((rel, i) => `[new URL(${JSON.stringify(rel)}, import.meta.url).href]: task${i}`).join(', ')} });`,
  ].join('\n');
  await build({ ...common(dist), stdin: { contents: entry, resolveDir: dist, sourcefile: 'worker-bundle-entry.js', loader: 'js' }, outfile: join(dist, WORKER_BUNDLE_FILE) });
}

/** The options both bundles share: one ES module for Node 20, the packages of OUTSIDE left out, `require` for the
 *  CommonJS packages bundled in, each module's import.meta.url replaced by its file's URL in dist/. */
function common(dist: string): BuildOptions {
  return {
    bundle: true, platform: 'node', format: 'esm', target: 'node20',
    external: OUTSIDE.flatMap((p) => [p, `${p}/*`]),
    banner: { js: "import { createRequire as bundleRequire } from 'node:module';\nconst require = bundleRequire(import.meta.url);" },
    logLevel: 'warning',
    plugins: [{
      name: 'module-urls',
      setup(b) {
        const inDist = new RegExp(`^${escape(dist + sep)}.*\\.js$`);
        b.onLoad({ filter: inDist }, (args) => {
          const rel = relative(dist, args.path).split(sep).join('/');
          const text = readFileSync(args.path, 'utf8').replaceAll('import.meta.url', `new URL(${JSON.stringify(rel)}, import.meta.url).href`);
          return { contents: text, loader: 'js' };
        });
      },
    }],
  };
}

/** Files under `dir` (recursively) whose name passes `keep`, sorted. */
function findFiles(dir: string, keep: (name: string) => boolean): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) out.push(...findFiles(path, keep));
    else if (keep(entry.name)) out.push(path);
  }
  return out.sort();
}

function escape(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) await bundleCli(join(fileURLToPath(import.meta.url), '..', '..'));
