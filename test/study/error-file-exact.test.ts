import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { executeStudies } from '../../src/cli/execute.ts';
import { readVtkFile } from '../../src/external/vtk/read.ts';

// The exact solution in a level's errors.vtu: on a P1 level large enough that I_h u is built before the solve (from
// 100,000 cells, where a sample of every second cell estimates its errors), its values at the vertices are taken from
// I_h u's coefficients instead of evaluating u again (src/study/discretizations/measure-scalar.ts, exactAtVertices).
// They must be u at each point of the file, in the file's order, and `error` must be u − u_h there.
const root = mkdtempSync(join(tmpdir(), 'rungs-error-file-exact-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

// The library by its path: a study in a temporary folder has no 'rungs' to resolve under the test runner.
const LIBRARY = new URL('../../src/index.ts', import.meta.url).href;
const STUDY = `import { defineStudy, rectangle, lagrange } from ${JSON.stringify(LIBRARY)};
export default defineStudy({
  name: 'rod-vertices', description: 'Kiln rod section, P1: the exact solution in the error file.',
  domain: rectangle([0, 1], [0, 1]), exact: 'sin(pi*x) * exp(y)',
  discretization: lagrange({ degree: 1 }),
  ladder: { n: [112, 224] }, norms: ['L2', 'H1semi'],
});
`;

describe('the exact solution written to a P1 level\'s error file', () => {
  it('is u at every point of the file (224² squares: 100,352 triangles), and error = u − u_h', async () => {
    writeFileSync(join(root, 'rod-vertices.study.ts'), STUDY);
    const out = join(root, 'out');
    const run = await executeStudies([join(root, 'rod-vertices.study.ts')], { out, quiet: true, jobs: 1 });
    expect(run.problems).toEqual([]);
    const grid = readVtkFile(join(out, 'rod-vertices', 'level-2', 'errors.vtu'));
    expect(grid.nCells).toBe(2 * 224 * 224);
    const array = (name: string): Float64Array => grid.pointData.find((a) => a.name === name)!.values;
    const u = array('u'), uh = array('u_h'), error = array('error');
    let worstU = 0, worstError = 0;
    for (let p = 0; p < grid.nPoints; p++) {
      const x = grid.points[3 * p]!, y = grid.points[3 * p + 1]!;
      const reference = Math.sin(Math.PI * x) * Math.exp(y);
      worstU = Math.max(worstU, Math.abs(u[p]! - reference) / Math.max(1, Math.abs(reference)));
      if (!Object.is(error[p], u[p]! - uh[p]!)) worstError++;
    }
    // Rounding of two evaluations of the same formula (the file's values are read back exactly: ASCII below 200k cells).
    expect(worstU).toBeLessThan(1e-14);
    expect(worstError).toBe(0);
  });
});
