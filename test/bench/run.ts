/**
 * `npm run bench [-- <name> … | all] [--out <file>]`: runs benchmarks of test/bench one after another, each in a
 * fresh process (so that none inherits another's warmed JIT, arena or memory), streams their output, and writes a
 * record that names the machine they ran on: CPU model, logical cores, total memory, Node version, and the load
 * average before and after each benchmark (the machines this project runs on are shared, and a figure without its
 * load is not reproducible). Default: the quick set below; `all` runs every *.bench.ts (an hour or more on 2 cores).
 * The record goes to --out (default reports/bench-<ISO date>.md) as Markdown: the machine, then per benchmark its
 * command, wall seconds, exit status, load averages and its own printed output, from which the README's performance
 * table is copied with the machine named.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { cpus, loadavg, totalmem } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
/** The quick set: the kernels, a solve, the error densities and the start-up (minutes, not hours). */
const QUICK = ['kernels', 'fe-solve', 'error-densities', 'startup'];

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
const named = args.filter((_a, i) => outAt < 0 || (i !== outAt && i !== outAt + 1));
const available = readdirSync(here).filter((f) => f.endsWith('.bench.ts')).map((f) => f.slice(0, -'.bench.ts'.length)).sort();
const chosen = named.length === 0 ? QUICK : named.includes('all') ? available : named;
const unknown = chosen.filter((n) => !available.includes(n));
if (unknown.length) {
  process.stderr.write(`npm run bench: no benchmark named ${unknown.map((n) => `'${n}'`).join(', ')}; valid: ${available.join(', ')}, or all\n`);
  process.exit(2);
}

const lines = ['# rungs benchmarks', '', ...machine(), ''];
process.stdout.write(lines.join('\n') + '\n');
let failed = 0;
for (const name of chosen) {
  const before = loadavg()[0]!;
  const t0 = performance.now();
  process.stdout.write(`\n== ${name} ==\n`);
  const r = spawnSync(process.execPath, ['--import', 'tsx', join(here, `${name}.bench.ts`)], { encoding: 'utf8', stdio: ['ignore', 'pipe', 'pipe'], maxBuffer: 256 << 20 });
  const wall = (performance.now() - t0) / 1000;
  process.stdout.write(r.stdout ?? '');
  if (r.status !== 0) { failed++; process.stderr.write(r.stderr ?? ''); }
  lines.push(`## ${name}`, '', `\`npx tsx test/bench/${name}.bench.ts\`: ${wall.toFixed(1)} s wall, exit ${r.status ?? r.signal}, load average ${before.toFixed(2)} → ${loadavg()[0]!.toFixed(2)}`, '', '```', (r.stdout ?? '').trimEnd(), '```', '');
}
mkdirSync(dirname(out), { recursive: true });
writeFileSync(out, lines.join('\n') + '\n');
process.stdout.write(`\nrecord written: ${out}${failed ? ` (${failed} benchmark${failed > 1 ? 's' : ''} failed)` : ''}\n`);
process.exit(failed ? 1 : 0);
