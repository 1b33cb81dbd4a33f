/** The WebAssembly kernels (src/linalg/kernels/sparse.wat) and the multigrid cycle that runs them, checked against
 *  the TypeScript loops they transcribe. Both do the same IEEE 754 binary64 operations in the same order, so the
 *  results must agree bit for bit (WebAssembly does not contract a·b + c, nor does JavaScript; WebAssembly 1.0
 *  spec §4.3.3, from memory). The TypeScript loops themselves are checked against ml-matrix and the banded direct
 *  solver in csr.test.ts and amg.test.ts; the product here once more against ml-matrix. */
import { readFileSync } from 'node:fs';
import { Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { assembleKernels, kernelModuleText } from '../../scripts/assemble-kernels.ts';
import { packHierarchy, SPARE_VECTORS } from '../../src/linalg/amg/pack.ts';
import { wasmCyclePreconditioner } from '../../src/linalg/amg/wasm-cycle.ts';
import { amgSetup } from '../../src/linalg/amg/setup.ts';
import {
  backwardSweep, backwardSweepWithProduct, forwardSweep, forwardSweepFromZero, forwardSweepFromZeroWithResidual,
  forwardSweepWithResidual, prolongAndAdd, residualInto,
} from '../../src/linalg/amg/smoother.ts';
import { vCyclePreconditioner } from '../../src/linalg/amg/vcycle.ts';
import { cg } from '../../src/linalg/cg.ts';
import { spmvDot } from '../../src/linalg/cg-steps.ts';
import { csrFromDense, diagonalPositions, spmv } from '../../src/linalg/csr.ts';
import { arenaBytes, createArena, MAX_ARENA_BYTES, type Arena } from '../../src/linalg/kernels/arena.ts';
import type { Csr } from '../../src/linalg/types.ts';
import { convectionDiffusion } from './helpers/convection.ts';
import { mulberry32 } from '../../src/mesh/random.ts';
import { checkerboard, lagrangeGridStiffness } from './helpers/lagrange-grid.ts';
import { randomDiagonallyDominant, randomSpd, randomVector } from './helpers/random-matrices.ts';

const same = (a: Float64Array, b: Float64Array): void => { expect(Array.from(a)).toEqual(Array.from(b)); };

function intoArena(arena: Arena, A: Csr): Csr {
  const rowPtr = arena.i32(A.rowPtr.length); rowPtr.set(A.rowPtr);
  const colIdx = arena.i32(A.colIdx.length); colIdx.set(A.colIdx);
  const values = arena.f64(A.values.length); values.set(A.values);
  return { nRows: A.nRows, nCols: A.nCols, rowPtr, colIdx, values };
}
function vec(arena: Arena, v: Float64Array): Float64Array { const a = arena.f64(v.length); a.set(v); return a; }

describe('the committed WebAssembly binary', () => {
  it('is exactly what sparse.wat assembles to (regenerate with npm run kernels)', async () => {
    const text = readFileSync(new URL('../../src/linalg/kernels/sparse.wat', import.meta.url), 'utf8');
    const committed = readFileSync(new URL('../../src/linalg/kernels/sparse-wasm.ts', import.meta.url), 'utf8');
    expect(committed).toBe(kernelModuleText(await assembleKernels(text)));
  });
});

describe('arena', () => {
  it('hands out aligned, disjoint views of its own memory and refuses to overflow', () => {
    const arena = createArena(arenaBytes([80, 40, 8]))!;
    expect(arena).not.toBeNull();
    const a = arena.f64(10), b = arena.i32(10), c = arena.f64(1);
    for (const v of [a, b, c]) { expect(arena.owns(v)).toBe(true); expect(v.byteOffset % 64).toBe(0); expect(v.byteOffset).toBeGreaterThan(0); }
    expect(b.byteOffset).toBeGreaterThanOrEqual(a.byteOffset + 80);
    expect(c.byteOffset).toBeGreaterThanOrEqual(b.byteOffset + 40);
    expect(arena.owns(new Float64Array(3))).toBe(false);
    expect(() => arena.f64(arena.remaining() / 8 + 1)).toThrow(/arena/);
  });

  it('never hands out overlapping blocks, and zeroed ones are zero after any reuse (seeded random use)', () => {
    // Checked in plain code and asserted once: an expect per step and block made this test take over a minute on a
    // busy two-core machine (1.6 million expect calls).
    const rand = mulberry32(7);
    const arena = createArena(1 << 21)!;
    const live: Float64Array[] = [];
    const problems: string[] = [];
    let allocations = 0;
    for (let step = 1; step <= 5000 && problems.length === 0; step++) {
      const op = rand();
      if (op < 0.5 || live.length === 0) {
        const n = Math.floor(rand() * 1500);
        if (!arena.fits(8 * n)) continue;
        const zeroed = rand() < 0.5;
        const a = arena.f64(n, zeroed);
        allocations++;
        if (zeroed && !a.every((v) => v === 0)) problems.push(`step ${step}: a zeroed block of ${n} holds non-zero values`);
        a.fill(step); // dirty it for whoever gets this memory next
        live.push(a);
      } else if (op < 0.8) {
        const i = Math.floor(rand() * live.length);
        arena.free(live[i]);
        live.splice(i, 1);
      } else {
        const i = Math.floor(rand() * live.length);
        live[i] = arena.shrink(live[i], Math.floor(rand() * (live[i].length + 1)));
      }
      const spans = live.map((a) => [a.byteOffset, a.byteOffset + a.byteLength]).sort((x, y) => x[0] - y[0]);
      for (let k = 1; k < spans.length; k++) {
        if (spans[k][0] < spans[k - 1][1]) problems.push(`step ${step}: block at ${spans[k][0]} overlaps the one ending at ${spans[k - 1][1]}`);
      }
    }
    expect(problems).toEqual([]);
    expect(allocations).toBeGreaterThan(1000); // the sequence really exercised the allocator
  });

  it('declines sizes beyond 32-bit addressing instead of failing later', () => {
    expect(createArena(MAX_ARENA_BYTES + 1)).toBeNull();
  });
});

describe('each kernel equals its TypeScript loop bit for bit', () => {
  const cases: [string, number[][]][] = [
    ['SPD', randomSpd(120, 0.05, 11)],
    ['non-symmetric', randomDiagonallyDominant(120, 0.05, 12)],
  ];
  for (const [name, dense] of cases) {
    it(`${name} random matrix`, () => {
      const A = csrFromDense(dense);
      const n = A.nRows;
      const arena = createArena(1 << 20)!;
      const W = intoArena(arena, A);
      const dp = arena.i32(n); dp.set(diagonalPositions(A));
      const inv = arena.f64(n); for (let i = 0; i < n; i++) inv[i] = 1 / A.values[dp[i]];
      const b = vec(arena, randomVector(n, 1)), x0 = randomVector(n, 2);
      const k = arena.kernels;
      const args = [n, W.rowPtr.byteOffset, W.colIdx.byteOffset, W.values.byteOffset] as const;
      const sweep = [...args, dp.byteOffset, inv.byteOffset] as const;

      // y = A x against ml-matrix (to round-off) and against spmv (bit for bit)
      const x = vec(arena, x0), y = arena.f64(n), yRef = new Float64Array(n);
      k.spmv(...args, x.byteOffset, y.byteOffset);
      spmv(A, x0, yRef);
      same(y, yRef);
      const ml = new Matrix(dense).mmul(Matrix.columnVector(Array.from(x0))).getColumn(0);
      for (let i = 0; i < n; i++) expect(y[i]).toBeCloseTo(ml[i], 12);

      const yd = arena.f64(n), ydRef = new Float64Array(n);
      expect(k.spmvDot(...args, x.byteOffset, yd.byteOffset)).toBe(spmvDot(A, x0, ydRef));
      same(yd, ydRef);

      const r = arena.f64(n), rRef = new Float64Array(n);
      k.residual(...args, b.byteOffset, x.byteOffset, r.byteOffset);
      residualInto(A, b, x0, rRef);
      same(r, rRef);

      const xs = vec(arena, x0), xRef = Float64Array.from(x0);
      k.multiplyAdd(...args, y.byteOffset, xs.byteOffset);
      prolongAndAdd(A, y, xRef);
      same(xs, xRef);

      const runs: [string, (x: Float64Array, r: Float64Array) => void, (x: Float64Array, r: Float64Array) => void][] = [
        ['forwardSweepFromZero', (x) => k.forwardSweepFromZero(...sweep, b.byteOffset, x.byteOffset),
          (x) => forwardSweepFromZero(A, dp, inv, b, x)],
        ['forwardSweepFromZeroWithResidual', (x, r) => k.forwardSweepFromZeroWithResidual(...sweep, b.byteOffset, x.byteOffset, r.byteOffset),
          (x, r) => forwardSweepFromZeroWithResidual(A, dp, inv, b, x, r)],
        ['forwardSweepWithResidual', (x, r) => k.forwardSweepWithResidual(...sweep, b.byteOffset, x.byteOffset, r.byteOffset),
          (x, r) => forwardSweepWithResidual(A, dp, inv, b, x, r)],
        ['forwardSweep', (x) => k.forwardSweep(...sweep, b.byteOffset, x.byteOffset), (x) => forwardSweep(A, dp, inv, b, x)],
        ['backwardSweep', (x) => k.backwardSweep(...sweep, b.byteOffset, x.byteOffset), (x) => backwardSweep(A, dp, inv, b, x)],
        ['backwardSweepWithProduct', (x, r) => { r[0] = k.backwardSweepWithProduct(...sweep, b.byteOffset, x.byteOffset, r.byteOffset); },
          (x, r) => { r[0] = backwardSweepWithProduct(A, dp, inv, b, x, r); }],
      ];
      for (const [label, wasm, ts] of runs) {
        const xw = vec(arena, x0), rw = arena.f64(n), xt = Float64Array.from(x0), rt = new Float64Array(n);
        wasm(xw, rw);
        ts(xt, rt);
        expect(Array.from(xw), label).toEqual(Array.from(xt));
        if (label !== 'backwardSweepWithProduct') expect(Array.from(rw), label).toEqual(Array.from(rt));
        else {
          expect(rw[0], label).toBe(rt[0]); // b·x
          expect(Array.from(rw.subarray(1)), label).toEqual(Array.from(rt.subarray(1)));
        }
      }
      const xa = vec(arena, x0), ya = vec(arena, y);
      k.addInto(n, xa.byteOffset, ya.byteOffset);
      for (let i = 0; i < n; i++) expect(xa[i]).toBe(x0[i] + y[i]);
    });
  }
});

describe('the multigrid cycle in WebAssembly', () => {
  const problems: [string, () => Csr, boolean][] = [
    ['P2 stiffness, 1000:1 checkerboard', () => lagrangeGridStiffness('triangle', 2, 24, checkerboard(1000)).A, true],
    ['P1 stiffness', () => lagrangeGridStiffness('triangle', 1, 48).A, true],
    ['upwind convection–diffusion (non-symmetric)', () => convectionDiffusion(40, 20, -10), false],
  ];
  for (const [name, build, symmetric] of problems) {
    it(`gives the TypeScript cycle's bits: ${name}`, () => {
      const A = build();
      const { hierarchy, preconditioner, stats } = amgSetup(A, { symmetric, maxCoarseSize: 40 });
      expect(stats.kernels).toBe('wasm');
      expect(stats.levels).toBeGreaterThanOrEqual(3); // the W-cycle below level 1 is exercised
      const ts = vCyclePreconditioner(hierarchy);
      const r = randomVector(A.nRows, 5);
      const zw = new Float64Array(A.nRows), zt = new Float64Array(A.nRows);
      preconditioner.apply(r, zw);
      ts.apply(r, zt);
      same(zw, zt);
      // The fused form exists when the finest level dropped only exact zeros (P1 here; P2's round-off entries
      // make the cycle's A z differ from the caller's).
      expect(preconditioner.withProduct !== undefined).toBe(symmetric && hierarchy.exactProducts);
      if (preconditioner.withProduct) {
        // the fused form, once with the caller's arrays (copied through staging) and once with arena vectors
        const ww = new Float64Array(A.nRows), wt = new Float64Array(A.nRows);
        const bw = preconditioner.withProduct!.apply(r, zw, ww), bt = ts.withProduct!.apply(r, zt, wt);
        expect(bw).toBe(bt);
        same(zw, zt); same(ww, wt);
        const ra = preconditioner.vector!(A.nRows), za = preconditioner.vector!(A.nRows), wa = preconditioner.vector!(A.nRows);
        ra.set(r);
        expect(preconditioner.withProduct!.apply(ra, za, wa)).toBe(bt);
        same(za, zt); same(wa, wt);
      }
    });
  }

  it('builds the same hierarchy, bit for bit, as the TypeScript setup (strength graph, prolongator, products)', () => {
    for (const A of [lagrangeGridStiffness('triangle', 2, 24, checkerboard(1000)).A, lagrangeGridStiffness('square', 2, 20).A]) {
      const w = amgSetup(A, { kernels: 'wasm' }).hierarchy, t = amgSetup(A, { kernels: 'javascript' }).hierarchy;
      expect(w.levels.length).toBe(t.levels.length);
      for (let l = 0; l < w.levels.length; l++) {
        const [a, b] = [w.levels[l], t.levels[l]];
        for (const key of ['rowPtr', 'colIdx', 'values'] as const) {
          expect(Array.from(a.A[key]), `level ${l} A.${key}`).toEqual(Array.from(b.A[key]));
          if (a.P && b.P) expect(Array.from(a.P[key]), `level ${l} P.${key}`).toEqual(Array.from(b.P[key]));
        }
        expect(Array.from(a.invDiag)).toEqual(Array.from(b.invDiag));
      }
    }
  });

  it('hands a Krylov solver arena vectors, plain ones once they run out, and the same again once given back', () => {
    const A = lagrangeGridStiffness('triangle', 1, 20).A;
    const { preconditioner } = amgSetup(A);
    const got = Array.from({ length: SPARE_VECTORS + 1 }, () => preconditioner.vector!(A.nRows));
    const arenaBuffer = got[0].buffer;
    expect(got.slice(0, SPARE_VECTORS).every((v) => v.buffer === arenaBuffer)).toBe(true);
    expect(got[SPARE_VECTORS].buffer === arenaBuffer).toBe(false);
    // given back, they are handed out again (a second solve with the same preconditioner copies nothing either)
    for (const v of got) preconditioner.release!(v);
    expect(preconditioner.vector!(A.nRows).buffer === arenaBuffer).toBe(true);
    expect(preconditioner.vector!(7).length).toBe(7);
  });

  it('a hierarchy built on the heap and copied into an arena (the fallback when the reserved arena is too small) cycles to the same bits', () => {
    const A = lagrangeGridStiffness('triangle', 2, 20).A;
    const { hierarchy } = amgSetup(A, { kernels: 'javascript' });
    const packed = packHierarchy(hierarchy)!;
    expect(packed.hierarchy.levels.every((L) => packed.arena.owns(L.A.values) && packed.arena.owns(L.invDiag))).toBe(true);
    const r = randomVector(A.nRows, 6);
    const zw = new Float64Array(A.nRows), zt = new Float64Array(A.nRows);
    wasmCyclePreconditioner(packed).apply(r, zw);
    vCyclePreconditioner(hierarchy).apply(r, zt);
    same(zw, zt);
  });

  it('a disposed preconditioner hands its memory to the next setup, which still gives the same bits', () => {
    const A = lagrangeGridStiffness('triangle', 1, 40, checkerboard(1000)).A;
    const b = randomVector(A.nRows, 4);
    const solve = (): { x: Float64Array; buffer: ArrayBufferLike; iterations: number } => {
      const { preconditioner } = amgSetup(A);
      const x = new Float64Array(A.nRows);
      const s = cg(A, b, x, { relTol: 1e-10, preconditioner });
      expect(s.converged).toBe(true);
      const buffer = preconditioner.vector!(A.nRows).buffer;
      preconditioner.dispose!();
      return { x, buffer, iterations: s.iterations };
    };
    const first = solve(), second = solve();
    expect(second.buffer).toBe(first.buffer); // the same (already written) memory
    expect(second.iterations).toBe(first.iterations);
    same(second.x, first.x);
    const reference = new Float64Array(A.nRows);
    cg(A, b, reference, { relTol: 1e-10, preconditioner: amgSetup(A, { kernels: 'javascript' }).preconditioner });
    same(second.x, reference);
  });

  it('with keepMemory: false a disposed preconditioner keeps no memory: the next setup gets a fresh one', () => {
    const A = lagrangeGridStiffness('triangle', 1, 24).A;
    const buffer = (opts: { keepMemory?: boolean }): ArrayBufferLike => {
      const { preconditioner } = amgSetup(A, opts);
      const got = preconditioner.vector!(A.nRows).buffer;
      preconditioner.dispose!();
      return got;
    };
    const kept = buffer({}), reused = buffer({ keepMemory: false }), fresh = buffer({});
    expect(reused).toBe(kept); // the default kept it, and this setup took it
    expect(fresh).not.toBe(reused); // this one was given back
  });

  it('PCG with either kernels takes the same iterations to the same solution', () => {
    const A = lagrangeGridStiffness('triangle', 2, 32, checkerboard(1000)).A;
    const b = randomVector(A.nRows, 3);
    const solve = (kernels: 'wasm' | 'javascript') => {
      const { preconditioner, stats, hierarchy } = amgSetup(A, { kernels });
      expect(stats.kernels).toBe(kernels);
      // round-off entries dropped from the finest level (a P2 matrix): CG's products with A go through the
      // arena's copy of A, and must give the same iterates as CG's own
      expect(hierarchy.exactProducts).toBe(false);
      expect(preconditioner.product !== undefined).toBe(kernels === 'wasm');
      const x = new Float64Array(A.nRows);
      return { x, s: cg(A, b, x, { relTol: 1e-10, preconditioner }) };
    };
    const w = solve('wasm'), t = solve('javascript');
    expect(w.s.converged).toBe(true);
    expect(w.s.iterations).toBe(t.s.iterations);
    same(w.x, t.x);
  });
});
