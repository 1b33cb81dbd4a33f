import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { boxMesh } from '../../../src/mesh/box.ts';
import { lagrangeSpace } from '../../../src/fem/dofmap/dofmap.ts';
import { assembleSystem } from '../../../src/fem/assemble/system.ts';
import { cellParts } from '../../../src/fem/assemble/cell-parts.ts';
import { defer, deferredBuffer, replay } from '../../../src/fem/assemble/deferred.ts';
import type { FormCoefficients } from '../../../src/fem/assemble/types.ts';
import { compileFormula } from '../../../src/exact/formula.ts';
import { cellTeam, setTeamThreads, setWorkersFirst, teamThreads } from '../../../src/fem/team/team.ts';
import { bitDifferences } from '../team/helpers.ts';

describe('deferred additions (src/fem/assemble/deferred.ts)', () => {
  it('b −= x replayed as the addition of −x gives the same bits, signed zeros and subnormals included', () => {
    // IEEE 754-2019 §5.4.1: subtraction x − y is x + (−y); negation is exact (§5.5.1).
    const vals = [0, -0, 1, -1, 0.1, -0.3, 1e-310, -1e-310, 5e-324, 1.7976931348623157e308, Math.PI, -Math.E, 3e-17, 1 / 3];
    const sub = new Float64Array(vals.length * vals.length), rep = new Float64Array(sub.length);
    const d = deferredBuffer(2); // small, so that it grows
    for (let i = 0; i < vals.length; i++) {
      for (let j = 0; j < vals.length; j++) {
        const k = i * vals.length + j;
        sub[k] = vals[i]; sub[k] -= vals[j];
        rep[k] = vals[i]; defer(d, -1 - k, -vals[j]);
      }
    }
    replay(d, new Float64Array(0), rep);
    expect(d.length).toBe(0);
    expect(bitDifferences(sub, rep)).toBe(0);
  });
});

describe('a shared assembly whose rows take entries from several later parts', () => {
  const before = teamThreads();
  beforeAll(() => { setTeamThreads(2); setWorkersFirst(true); });
  afterAll(() => { setWorkersFirst(false); setTeamThreads(before); });

  it('P1 on Kuhn tetrahedra, parts of 5 cells: the bits of one thread', () => {
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 4, ny: 3, nz: 3, cells: 'tetrahedra' });
    const space = lagrangeSpace(mesh, 1);
    // The case the deferred replay orders: rows whose cells lie in three parts or more (checked from the definition).
    const cp = cellParts(mesh.nCells, 4, space.cellDofs, space.nDofs, 5);
    const partsOf = Array.from({ length: space.nDofs }, () => new Set<number>());
    for (let c = 0; c < mesh.nCells; c++) for (let i = 0; i < 4; i++) partsOf[space.cellDofs[c * 4 + i]].add(Math.floor(c / 5));
    expect(partsOf.filter((s) => s.size >= 3).length).toBeGreaterThan(10);
    expect(cp.parts).toBeGreaterThan(20);
    const coef: FormCoefficients = { k: compileFormula('1 + x*y*z', 'k', 3), c: compileFormula('1 + z', 'c', 3), f: compileFormula('exp(x - y) * cos(z)', 'f', 3), hints: { k: 3, c: 1, f: null } };
    const bc = { dirichlet: { tags: ['left', 'front'], value: compileFormula('sin(x + 2*y - z)', 'g', 3) } };
    setTeamThreads(1);
    const serial = assembleSystem(space, coef, bc, { partCells: 5 });
    setTeamThreads(2);
    const elsewhere = cellTeam().partsElsewhere;
    const shared = assembleSystem(space, coef, bc, { partCells: 5 });
    expect(cellTeam().partsElsewhere).toBeGreaterThan(elsewhere);
    expect(shared.A.values.buffer instanceof SharedArrayBuffer).toBe(true);
    expect([bitDifferences(shared.A.values, serial.A.values), bitDifferences(shared.b, serial.b)]).toEqual([0, 0]);
  });

  it('P1 spaces read the mesh\'s cell array as their unknowns per cell (the same numbers, no copy)', () => {
    const mesh = boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 2, ny: 2, nz: 2, cells: 'tetrahedra' });
    expect(lagrangeSpace(mesh, 1).cellDofs).toBe(mesh.cells);
    expect(lagrangeSpace(mesh, 2).cellDofs).not.toBe(mesh.cells);
  });
});
