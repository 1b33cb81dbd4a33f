/** rungs laid out as npm installs it, for benchmarks that time the command a user runs: package.json, bin/ and a
 *  fresh build in dist/ (tsc, then the one-file command: scripts/bundle-cli.ts, as `npm run build` does), no src/ (the package ships none, so bin/rungs.mjs runs dist/ and nothing is compiled on the
 *  fly), in a temporary folder whose node_modules is this checkout's. Used by startup.bench.ts and peers.bench.ts. */
import { execFileSync } from 'node:child_process';
import { cpSync, mkdirSync, rmSync, symlinkSync } from 'node:fs';
import { join } from 'node:path';
import { bundleCli } from '../../scripts/bundle-cli.ts';

/** Builds the layout in `root`/rungs from the checkout at `repo`; returns the path of its bin/rungs.mjs. */
export async function installedLayout(repo: string, root: string): Promise<string> {
  const pkg = join(root, 'rungs');
  mkdirSync(pkg);
  for (const f of ['package.json', 'tsconfig.json', 'tsconfig.build.json', 'bin', 'src']) cpSync(join(repo, f), join(pkg, f), { recursive: true });
  symlinkSync(join(repo, 'node_modules'), join(pkg, 'node_modules'), 'dir');
  execFileSync(process.execPath, [join(repo, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(pkg, 'tsconfig.build.json')], { stdio: 'inherit' });
  await bundleCli(pkg);
  for (const f of ['src', 'tsconfig.json', 'tsconfig.build.json']) rmSync(join(pkg, f), { recursive: true });
  return join(pkg, 'bin', 'rungs.mjs');
}
