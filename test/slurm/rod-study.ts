// The study file of the kiln rod whose levels the scheduler tests (Slurm and local) run as jobs, with the stand-in solver
// (test/slurm/fixtures/rod-solver.mjs); `extra` adds fields of external(), such as the scheduler.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

const LIB = pathToFileURL(resolve('src/index.ts')).href;
const ROD = resolve('test/slurm/fixtures/rod-solver.mjs');

export function rodStudy(dir: string, name: string, extra: string): string {
  mkdirSync(dir, { recursive: true });
  writeFileSync(join(dir, 'package.json'), '{ "type": "module" }\n');
  const file = join(dir, `${name}.study.ts`);
  writeFileSync(file, [
    `import { defineStudy, interval, external } from '${LIB}';`,
    'export default defineStudy({',
    `  name: '${name}', description: 'A kiln rod (invented data), solved by a stand-in code.',`,
    "  domain: interval(0, 1), exact: 'sin(x) + x',",
    `  discretization: external({ command: [${JSON.stringify(process.execPath)}, ${JSON.stringify(ROD)}, '--tasks', '{tasks}'], output: 'errors', degree: 1, ${extra} }),`,
    "  ladder: { n: [4, 8, 16, 32] }, norms: ['L2', 'H1semi'],",
    '});',
    '',
  ].join('\n'));
  return file;
}
