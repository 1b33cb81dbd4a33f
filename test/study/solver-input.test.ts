import { describe, expect, it } from 'vitest';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { executeStudies } from '../../src/cli/execute.ts';

// Systems the solvers cannot or must not solve stop with one message naming the study and the level.
describe('solver bad input', async () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-solver-'));
  const { results, problems } = await executeStudies(['test/fixtures/solver'], { out, quiet: true });
  const msg = (file: string) => problems.find((p) => p.file.endsWith(file))?.message ?? `(no problem reported for ${file})`;
  it('reports every case and runs nothing to garbage', () => {
    expect(results).toHaveLength(0);
    expect(problems).toHaveLength(3);
  });
  it('a pure Neumann problem without a constraint', () => {
    expect(msg('pure-neumann.study.ts')).toMatch(/study 'fixture-pure-neumann'.*every boundary part is Neumann.*singular; give a Dirichlet or Robin part/);
  });
  it('a non-symmetric matrix sent to CG', () => {
    expect(msg('cg-nonsymmetric.study.ts')).toMatch(/study 'fixture-cg-nonsymmetric'\) level 1 \(n = 16\): .*'cg' needs a symmetric matrix; use 'gmres' or 'bicgstab'/);
  });
  it('a preconditioner setup that would divide by zero', () => {
    expect(msg('zero-diagonal.study.ts')).toMatch(/study 'fixture-zero-diagonal'\) level 1 \(n = 8\): amg: diagonal entry 0 .* is 0/);
  });
});
