// Start-up of the installed command (targets: `rungs --version` within 0.2 s of `node -e 1`; `rungs run` of the
// smallest bundled study, rod-p1, under 1 s wall on an idle machine). The package is laid out as npm installs it —
// package.json, bin/ and a fresh build in dist/, no src/ — in a temporary folder whose node_modules is this
// checkout's; the commands run interleaved, so a change of load touches all of them alike. The run from the source
// (a checkout's bin/rungs.mjs: tsx compiling src/) is timed too, for comparison.
// Run: npx tsx test/bench/startup.bench.ts [rounds, default 9]
import { spawnSync } from 'node:child_process';
import { cpSync, mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { cpus, loadavg, tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { printFigure } from './figures.ts';
import { installedLayout } from './installed.ts';

const rounds = Number(process.argv[2] ?? 9);
const repo = resolve('.');
const root = mkdtempSync(join(tmpdir(), 'rungs-startup-'));
const bin = await installedLayout(repo, root);
const study = join(root, 'studies', 'rod-p1.study.ts');
mkdirSync(join(root, 'studies'));
cpSync(join(repo, 'studies', 'rod-p1.study.ts'), study);

const commands: Record<string, string[]> = {
  'node -e 1': ['-e', '1'],
  'rungs --version': [bin, '--version'],
  'rungs --help': [bin, '--help'],
  'rungs run rod-p1': [bin, 'run', study, '--out', join(root, 'reports'), '--quiet'],
  'from source: rungs --version': [join(repo, 'bin', 'rungs.mjs'), '--version'],
  'from source: rungs run rod-p1': [join(repo, 'bin', 'rungs.mjs'), 'run', study, '--out', join(root, 'reports-source'), '--quiet'],
};
const times: Record<string, number[]> = Object.fromEntries(Object.keys(commands).map((k) => [k, []]));
const load0 = loadavg()[0];
for (let r = 0; r < rounds; r++) {
  for (const [name, args] of Object.entries(commands)) {
    const t0 = performance.now();
    const p = spawnSync(process.execPath, args, { cwd: root, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
    const ms = performance.now() - t0;
    if (p.status !== 0) throw new Error(`${name} failed (${p.status}): ${p.stderr}`);
    times[name].push(ms);
  }
}
const load1 = loadavg()[0];
const median = (a: number[]) => [...a].sort((x, y) => x - y)[Math.floor(a.length / 2)];
const min = (a: number[]) => Math.min(...a);

console.log(`${cpus()[0]?.model ?? 'unknown CPU'}, ${cpus().length} cores, Node ${process.versions.node}; ` +
  `load average ${load0.toFixed(2)} before, ${load1.toFixed(2)} after; ${rounds} rounds, wall ms`);
for (const [name, t] of Object.entries(times)) console.log(`  ${name.padEnd(32)} median ${median(t).toFixed(0).padStart(5)}  min ${min(t).toFixed(0).padStart(5)}`);
const node = median(times['node -e 1']);
const version = median(times['rungs --version']) - node;
const run = median(times['rungs run rod-p1']);
console.log(`rungs --version − node -e 1: ${version.toFixed(0)} ms (target ≤ 200)  ${version <= 200 ? 'met' : 'NOT met'}`);
console.log(`rungs run rod-p1: ${run.toFixed(0)} ms (target < 1000 on an idle machine)  ${run < 1000 ? 'met' : 'NOT met'}`);
const fromSource = median(times['from source: rungs run rod-p1']);
const loads = `load ${load0.toFixed(2)} → ${load1.toFixed(2)}, ${rounds} rounds`;
printFigure({ name: 'start-up: `rungs --version` above `node -e 1` (installed layout)', value: version, unit: 'ms', target: '≤ 200 ms', met: version <= 200, note: `median; ${loads}` });
printFigure({ name: '`rungs run` of rod-p1 (installed layout)', value: run, unit: 'ms', target: '< 1000 ms on an idle machine', met: run < 1000, note: `median, min ${min(times['rungs run rod-p1']).toFixed(0)} ms; from the checkout's source ${fromSource.toFixed(0)} ms; ${loads}` });
if (Math.max(load0, load1) > cpus().length / 2) console.log('note: the machine was busy (load average above half the cores); the wall times are not those of an idle machine');
rmSync(root, { recursive: true, force: true });
