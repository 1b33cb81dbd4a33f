// The memory budget of a level: its estimate before meshing, the refusal naming the ladder value and the budget, and
// a run in which one study asks for an 8000² level while another still runs. Budgets here are small (64 MB), so
// nothing large is ever allocated: the point is that the large level is refused before it is built.
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { defineStudy, interval, lagrange, lShape, rectangle, customDomain } from '../../src/index.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { checkLevelMemory, estimateDofs, levelBytes, PIPELINE_BYTES_PER_DOF } from '../../src/study/memory-budget.ts';
import { lagrangeSpace } from '../../src/fem/dofmap/dofmap.ts';
import { prepareStudy } from '../../src/study/runner.ts';
import { runLevel } from '../../src/study/level.ts';
import { executeStudies } from '../../src/cli/execute.ts';
import { RungsInputError } from '../../src/errors.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import type { DomainSpec, StudyDeclaration } from '../../src/study/declaration.ts';

const study = (domain: DomainSpec, degree: number, n: number[], memoryBudgetMB?: number): StudyDeclaration =>
  validateStudy(defineStudy({
    name: 'kiln-wall', domain, exact: 'sin(x) * exp(y)', discretization: lagrange({ degree }), ladder: { n }, ...(memoryBudgetMB ? { memoryBudgetMB } : {}),
  }), 'kiln-wall.study.ts');

function refusal(f: () => unknown): string {
  try { f(); } catch (err) {
    if (err instanceof RungsInputError) return err.message;
    throw err;
  }
  throw new Error('expected a RungsInputError');
}

describe('the unknowns of a level, before meshing', () => {
  it('are exact on intervals, rectangles of triangles or quadrilaterals, and the L-shape', () => {
    // Compared with the dofs rungs's own space numbers on the meshed level (independent code: the dof map).
    const cases: [DomainSpec, number][] = [
      [interval(0, 2), 1], [interval(0, 2), 3],
      [rectangle([0, 2], [0, 1]), 1], [rectangle([0, 2], [0, 1]), 2], [rectangle([0, 1], [0, 1], { cells: 'quadrilaterals' }), 2],
    ];
    const misses: string[] = [];
    for (const [domain, k] of cases) {
      for (const n of [3, 8, 13]) {
        const actual = lagrangeSpace(domain.mesh(n), k).nDofs;
        const est = estimateDofs(study(domain, k, [n, n + 1]), n, k);
        if (est !== actual) misses.push(`${domain.label} P${k} n=${n}: ${est} vs ${actual}`);
      }
    }
    for (const k of [1, 2]) {
      for (const n of [8, 16]) {
        const actual = lagrangeSpace(lShape().mesh(n), k).nDofs;
        const est = estimateDofs(study(lShape(), k, [n, n + 1]), n, k)!;
        if (est !== actual) misses.push(`L-shape P${k} n=${n}: ${est} vs ${actual}`);
      }
    }
    expect(misses).toEqual([]);
  });

  it('are left to the mesh on custom domains', () => {
    const custom = customDomain({ dim: 2, tags: [], bbox: [[0, 1], [0, 1]], label: 'tile', mesh: (n) => rectangleMesh({ x: [0, 1], y: [0, 1], nx: n, ny: n, cells: 'triangles' }) });
    expect(estimateDofs(study(custom, 1, [2, 4]), 4, 1)).toBeNull();
  });
});

describe('a level above its budget', () => {
  it('is refused with the ladder value, the estimate and the budget, and levels within it pass', () => {
    const decl = study(rectangle([0, 1], [0, 1]), 1, [4, 8, 8000], 64);
    expect(() => checkLevelMemory(decl, 0)).not.toThrow();
    expect(() => checkLevelMemory(decl, 1)).not.toThrow();
    const msg = refusal(() => checkLevelMemory(decl, 2));
    // 8001² = 64 016 001 P1 unknowns on the unit square.
    expect(msg).toContain('ladder.n[2]: the ladder value n = 8000 would give about 64,016,001 unknowns (degree 1)');
    expect(msg).toContain(`more than the memory budget of 64 MB (memoryBudgetMB: 64)`);
    expect(msg).toContain('the level was not meshed');
    expect(msg).toMatch(/a ladder value of at most about \d+ for this budget/);
  });

  it('suggests a ladder value that fits and whose successor does not', () => {
    const decl = study(rectangle([0, 1], [0, 1]), 2, [4, 4000], 256);
    const fits = Number(/at most about (\d+)/.exec(refusal(() => checkLevelMemory(decl, 1)))![1]);
    const withN = (n: number) => study(rectangle([0, 1], [0, 1]), 2, [2, n], 256);
    expect(() => checkLevelMemory(withN(fits), 1)).not.toThrow();
    expect(() => checkLevelMemory(withN(Math.ceil(fits * 1.05) + 1), 1)).toThrow(RungsInputError);
  });

  it('without memoryBudgetMB, is judged against the memory available (an 8000² P3 level needs far more than any test machine has free)', () => {
    const decl = study(rectangle([0, 1], [0, 1]), 3, [4, 8000]);
    // (3·8000 + 1)² ≈ 5.8e8 unknowns at 1000 bytes each: about 580 GB.
    expect(levelBytes(576_048_001, 3, 2)).toBeGreaterThan(5e11);
    expect(refusal(() => checkLevelMemory(decl, 1))).toMatch(/more than the memory budget of [\d,]+ MB \(the memory available on this machine/);
  });

  it('is refused by the level runner before the domain is meshed, naming the study file, the level and n', async () => {
    const calls: number[] = [];
    const base = rectangle([0, 1], [0, 1]);
    const domain: DomainSpec = { ...base, mesh: (n) => { calls.push(n); return base.mesh(n); } };
    const decl = study(domain, 1, [4, 8, 8000], 64);
    const prepared = prepareStudy({ file: 'kiln-wall.study.ts', declaration: decl });
    const p = await prepared;
    const first = await runLevel(decl, 'kiln-wall.study.ts', p.problem, 0, p.norms, p.solver);
    expect(first.dofs).toBe(25);
    let caught: unknown = null;
    try { await runLevel(decl, 'kiln-wall.study.ts', p.problem, 2, p.norms, p.solver); } catch (err) { caught = err; }
    expect(caught).toBeInstanceOf(RungsInputError);
    expect((caught as Error).message).toMatch(/^kiln-wall\.study\.ts \(study 'kiln-wall'\) level 3 \(n = 8000\): ladder\.n\[2\]: the ladder value n = 8000/);
    expect(calls).toContain(4);
    expect(calls).not.toContain(8000);
  });

  it('a schema error names the field and what is valid', () => {
    expect(() => validateStudy({ ...study(rectangle([0, 1], [0, 1]), 1, [4, 8]), memoryBudgetMB: -64 }, 'kiln-wall.study.ts'))
      .toThrow(/kiln-wall\.study\.ts \(study 'kiln-wall'\): memoryBudgetMB: expected a positive number of megabytes/);
  });
});

describe('a run with an 8000² level under a small budget', () => {
  it('records one problem for that study, keeps its first levels, and runs the other study to its end', async () => {
    const out = mkdtempSync(join(tmpdir(), 'rungs-memory-'));
    try {
      const run = await executeStudies(['test/fixtures/memory'], { out, quiet: true });
      expect(run.problems).toHaveLength(1);
      const [problem] = run.problems;
      expect(problem!.study).toBe('fixture-kiln-wall-huge');
      expect(problem!.message).toMatch(/level 3 \(n = 8000\): ladder\.n\[2\]: the ladder value n = 8000 would give about 64,016,001 unknowns/);
      expect(problem!.message).toContain('the memory budget of 64 MB (memoryBudgetMB: 64)');
      const small = run.results.find((r) => r.study === 'fixture-tile-small');
      expect(small?.levels.map((l) => l.n)).toEqual([2, 4, 8]);
      const huge = run.results.find((r) => r.study === 'fixture-kiln-wall-huge');
      // Whether or not the runner reports a study cut short, it must not hold a level it never ran.
      expect((huge?.levels ?? []).map((l) => l.n)).not.toContain(8000);
    } finally {
      rmSync(out, { recursive: true, force: true });
    }
  });
});

it('the figures per unknown rise with the degree', () => {
  expect(PIPELINE_BYTES_PER_DOF[1]! < PIPELINE_BYTES_PER_DOF[2]! && PIPELINE_BYTES_PER_DOF[2]! < PIPELINE_BYTES_PER_DOF[3]!).toBe(true);
});
