/**
 * `npm run bench [-- <name> … | all] [--out <file>] [--readme]`: runs benchmarks of test/bench one after another, each in a
 * fresh process (so that none inherits another's warmed JIT, arena or memory), streams their output, and writes a
 * record that names the machine they ran on: CPU model, logical cores, total memory, Node version, and the load
 * average before and after each benchmark (the machines this project runs on are shared, and a figure without its
 * load is not reproducible). Default: the quick set below; `all` runs every *.bench.ts (an hour or more on 2 cores).
 * The record goes to --out (default reports/bench-<ISO date>.md) as Markdown: the machine, then per benchmark its
 * command, wall seconds, exit status, load averages and its own printed output, from which the README's performance
 * table is copied with the machine named.
 * Every benchmark prints its figures as `figure:` lines (figures.ts; systems.bench.ts's table is read instead); at the
 * end they are gathered into one summary table, one row per figure with its target and the load average around its
 * benchmark, printed and written at the head of the record as Markdown under a line naming the machine, ready to
 * paste into the README's performance table; with --readme it replaces the README's summary block (between its two
 * marker lines) itself, and without names runs the quick set and `peers`. `peers` (rungs against NumPy/SciPy/pyamg scripts, whole processes; it
 * needs python3 with those) is run by name, not in the quick set.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, totalmem } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { README_BEGIN, README_END, figureTable, parseFigures, replaceBetween, systemsFigures, type FigureRow } from './figures.ts';

const here = dirname(fileURLToPath(import.meta.url));
/** The quick set: the kernels, the multigrid cycle against the memory-bandwidth bound, a solve, the error densities
 *  and the start-up (minutes, not hours). */
const QUICK = ['kernels', 'vcycle-bandwidth', 'fe-solve', 'error-densities', 'startup'];
/** `--readme` without names: the quick set and the peers (the figures the README's table carries). */
const README_SET = [...QUICK, 'peers'];

/** The machine in one line, for the summary's heading (and the README's table). */
function machineLine(): string {
  const c = cpus();
  return `${c[0]?.model.trim() ?? 'unknown CPU'}, ${c.length} logical cores, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Node ${process.version}`;
}

function machine(): string[] {
  const c = cpus();
  return [
    `- CPU: ${c[0]?.model.trim() ?? 'unknown'}, ${c.length} logical cores`,
    `- memory: ${(totalmem() / 2 ** 30).toFixed(1)} GiB`,
    `- Node ${process.version} on ${process.platform} ${process.arch}`,
    `- load average at start (1/5/15 min): ${loadavg().map((x) => x.toFixed(2)).join(' / ')}`,
  ];
}

const args = process.argv.slice(2);
const outAt = args.indexOf('--out');
const out = outAt >= 0 ? args[outAt + 1]! : join('reports', `bench-${new Date().toISOString().slice(0, 19).replace(/:/g, '-')}.md`);
const readme = args.includes('--readme');
const named = args.filter((a, i) => a !== '--readme' && (outAt < 0 || (i !== outAt && i !== outAt + 1)));
const available = readdirSync(here).filter((f) => f.endsWith('.bench.ts')).map((f) => f.slice(0, -'.bench.ts'.length)).sort();
const chosen = named.length === 0 ? (readme ? README_SET : QUICK) : named.includes('all') ? available : named;
const readmePath = join(here, '..', '..', 'README.md');
if (readme) {
  if (replaceBetween(readFileSync(readmePath, 'utf8'), README_BEGIN, README_END, '') === null) {
    process.stderr.write(`npm run bench --readme: ${readmePath} has no bench summary block (the lines ${README_BEGIN} and ${README_END}, once each and in that order); add them where the table belongs\n`);
    process.exit(2);
  }
}
const unknown = chosen.filter((n) => !available.includes(n));
if (unknown.length) {
  process.stderr.write(`npm run bench: no benchmark named ${unknown.map((n) => `'${n}'`).join(', ')}; valid: ${available.join(', ')}, or all\n`);
  process.exit(2);
}

const lines = ['# rungs benchmarks', '', ...machine(), ''];
const headEnd = lines.length;
process.stdout.write(lines.join('\n') + '\n');
let failed = 0;
const figures: FigureRow[] = [];
const loadRange = [Infinity, -Infinity];
const started = new Date();
for (const name of chosen) {
  const before = loadavg()[0]!;
  const t0 = performance.now();
  process.stdout.write(`\n== ${name} ==\n`);
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(here, `${name}.bench.ts`)], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], maxBuffer: 256 << 20 });
  const wall = (performance.now() - t0) / 1000;
  process.stdout.write(r.stdout ?? '');
  if (r.status !== 0) { failed++; process.stderr.write(r.stderr ?? ''); }
  const after = loadavg()[0]!;
  loadRange[0] = Math.min(loadRange[0]!, before, after);
  loadRange[1] = Math.max(loadRange[1]!, before, after);
  const found = name === 'systems' ? systemsFigures(r.stdout ?? '') : parseFigures(r.stdout ?? '');
  for (const figure of found) figures.push({ bench: name, figure, load: `${before.toFixed(2)} → ${after.toFixed(2)}` });
  lines.push(`## ${name}`, '', `\`npx tsx test/bench/${name}.bench.ts\`: ${wall.toFixed(1)} s wall, exit ${r.status ?? r.signal}, load average ${before.toFixed(2)} → ${loadavg()[0]!.toFixed(2)}`, '', '```', (r.stdout ?? '').trimEnd(), '```', '');
}
const heading = `Measured ${started.toISOString().slice(0, 10)} with \`npm run bench -- ${chosen.join(' ')}${readme ? ' --readme' : ''}\` on ${machineLine()}; ` +
  `load average (1 min) ${loadRange[0]!.toFixed(1)}–${loadRange[1]!.toFixed(1)}.`;
const summary = ['## Summary', '', heading, '', ...figureTable(figures), ''];
if (figures.length === 0) summary.splice(4, summary.length - 4, 'No benchmark printed a figure.', '');
process.stdout.write(`\n${summary.join('\n')}`);
// The summary goes right after the machine, before each benchmark's own output.
lines.splice(headEnd, 0, ...summary);
if (readme && figures.length > 0) {
  // The README's table is this run's summary: the block between the markers is replaced whole (rows of several runs
  // would mix machines and loads under one heading).
  writeFileSync(readmePath, replaceBetween(readFileSync(readmePath, 'utf8'), README_BEGIN, README_END, [heading, '', ...figureTable(figures)].join('\n'))!);
  process.stdout.write(`\nREADME.md's bench summary replaced by this run's (${figures.length} figures)\n`);
}
mkdirSync(dirname(out), { recursive: true });
writeFileSync(out, lines.join('\n') + '\n');
process.stdout.write(`\nrecord written: ${out}${failed ? ` (${failed} benchmark${failed > 1 ? 's' : ''} failed)` : ''}\n`);
process.exit(failed ? 1 : 0);
