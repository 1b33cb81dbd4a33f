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
import { readFileSync } from 'node:fs';
import { join, relative, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { build } from 'esbuild';

export const BUNDLE_FILE = 'rungs-cli.mjs';

/** Packages left outside the one file (see above). */
const OUTSIDE = ['esbuild', 'tsx', 'tinypool', 'playwright-core'];

/** Bundles `packageRoot`/dist (already compiled by tsc) into `packageRoot`/dist/rungs-cli.mjs. */
export async function bundleCli(packageRoot: string): Promise<void> {
  const dist = join(packageRoot, 'dist');
  await build({
    entryPoints: [join(dist, 'cli', 'bundle-entry.js')],
    outfile: join(dist, BUNDLE_FILE),
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
  });
}

function escape(text: string): string {
  return text.replace(/[.*+?^${}()|[\]\\/]/g, '\\$&');
}

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) await bundleCli(join(fileURLToPath(import.meta.url), '..', '..'));
