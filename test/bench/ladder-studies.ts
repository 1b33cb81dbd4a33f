/** The studies of study.bench.ts as declarations, in one place: that benchmark runs them in its own process, and
 *  peers.bench.ts runs the P1 one as a whole `rungs run` (a study file in a temporary folder imports it from here)
 *  against the Python script peers/p1_ladder.py, which states the same problem in NumPy. */
import { defineStudy, rectangle, lagrange } from '../../src/index.ts';

export const LADDERS = {
  p1: { degree: 1, n: [16, 32, 64, 128, 256, 512, 1024], k: undefined },
  p2: { degree: 2, n: [8, 16, 32, 64, 128, 256, 512], k: undefined },
  // Conductivity rising from 1 to 1000 across a layer of width ~0.05 at x = 0.5 (a glaze over a porous body):
  // smooth, so the manufactured source exists, but a 1000:1 contrast for the solver.
  contrast: { degree: 1, n: [64, 128, 256, 512, 1024], k: '1 + 999 * (0.5 + 0.5 * tanh(20 * (x - 0.5)))' },
  constant: { degree: 1, n: [64, 128, 256, 512, 1024], k: '1' },
} as const;

export type LadderName = keyof typeof LADDERS;

/** The manufactured solution, the square's sides and the norms of every ladder. */
const EXACT = 'sin(pi*x) * sin(pi*y)';
const SIDE = [0, 1] as const;
const NORMS = ['L2', 'H1semi'] as const;

/** −Δu = f (or −∇·(k∇u) = f) on the unit square in right-diagonal triangles, u = sin(πx) sin(πy) on the whole
 *  boundary (the default Dirichlet sides), L2 and H1 seminorm errors. */
export function ladderStudy(which: LadderName) {
  const s = LADDERS[which];
  return defineStudy({
    name: `bench-${which}`,
    domain: rectangle([...SIDE], [...SIDE]),
    exact: EXACT,
    ...(s.k ? { coefficients: { k: s.k }, solver: { errorFraction: 0, relTol: 1e-10 } } : {}),
    discretization: lagrange({ degree: s.degree }),
    ladder: { n: [...s.n] },
    norms: [...NORMS],
  });
}

/** The same study as the text of a study file that imports 'rungs' as a user's does (rungs resolves it to itself), for
 *  runs of the command as installed (peers.bench.ts); `name` and `n` replace the ladder's own. */
export function ladderStudyFile(which: LadderName, name: string, n: readonly number[] = LADDERS[which].n): string {
  const s = LADDERS[which];
  return [
    `// ${name}: the ${which} ladder of rungs's test/bench/ladder-studies.ts.`,
    `import { defineStudy, rectangle, lagrange } from 'rungs';`,
    `export default defineStudy({`,
    `  name: ${JSON.stringify(name)},`,
    `  domain: rectangle(${JSON.stringify(SIDE)}, ${JSON.stringify(SIDE)}),`,
    `  exact: ${JSON.stringify(EXACT)},`,
    ...(s.k ? [`  coefficients: { k: ${JSON.stringify(s.k)} },`, `  solver: { errorFraction: 0, relTol: 1e-10 },`] : []),
    `  discretization: lagrange({ degree: ${s.degree} }),`,
    `  ladder: { n: [${n.join(', ')}] },`,
    `  norms: ${JSON.stringify(NORMS)},`,
    `});`,
    '',
  ].join('\n');
}
