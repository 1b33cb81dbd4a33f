// Compiled formulas (src/exact/compile.ts) against mathjs compile().evaluate(scope), point by point.
// Run: npx tsx test/bench/exact.bench.ts   (RUNGS_BENCH_POINTS overrides the 1e6 points per pass)
import { Bench } from 'tinybench';
import { parse } from 'mathjs';
import { manufacture } from '../../src/equation/manufactured.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

const N = Number(process.env.RUNGS_BENCH_POINTS ?? 1_000_000);
// A typical study: smooth u and a variable conductivity (heat spreading in a tile).
const solution = manufacture({ dim: 2, u: 'exp(-x) * sin(3*y) + x*y', k: '1 + 0.25*x*y' });

const random = mulberry32(99);
const points = new Float64Array(2 * N);
for (let i = 0; i < points.length; i++) points[i] = random();

const scope = { x: 0, y: 0 };
let sink = 0;

function compiledPass(fn: (x: number, y: number, z: number) => number): void {
  let s = 0;
  for (let i = 0; i < N; i++) s += fn(points[2 * i], points[2 * i + 1], 0);
  sink += s;
}

function mathjsPass(code: { evaluate: (scope: object) => unknown }): void {
  let s = 0;
  for (let i = 0; i < N; i++) {
    scope.x = points[2 * i];
    scope.y = points[2 * i + 1];
    s += code.evaluate(scope) as number;
  }
  sink += s;
}

const uMathjs = parse(solution.formulas.u).compile();
const fMathjs = parse(solution.formulas.f).compile();

const bench = new Bench({ iterations: 2, time: 0, warmupIterations: 1 });
bench
  .add('u compiled', () => compiledPass(solution.u))
  .add('u mathjs evaluate', () => mathjsPass(uMathjs))
  .add('f compiled', () => compiledPass(solution.f))
  .add('f mathjs evaluate', () => mathjsPass(fMathjs));

await bench.run();

const meanMs = (name: string): number => {
  const result = bench.getTask(name)?.result as { latency?: { mean: number } } | undefined;
  return result?.latency?.mean ?? NaN;
};
console.log(`exact: ${N} points per pass, f = ${solution.formulas.f}`);
for (const q of ['u', 'f']) {
  const compiled = meanMs(`${q} compiled`);
  const mathjs = meanMs(`${q} mathjs evaluate`);
  console.log(
    `${q}: compiled ${((compiled * 1e6) / N).toFixed(1)} ns/point, mathjs ${((mathjs * 1e6) / N).toFixed(1)} ns/point, ` +
      `ratio ${(mathjs / compiled).toFixed(1)}x`,
  );
}
if (!Number.isFinite(sink)) console.log('(checksum not finite)');
