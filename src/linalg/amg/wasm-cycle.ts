/** The cycle of vcycle.ts on a hierarchy packed into a WebAssembly arena (pack.ts), with the sweeps, residuals and
 *  grid transfers run by the kernels of src/linalg/kernels/sparse.wat: the same operations in the same order, so
 *  the same bits, 3.7× as fast as the TypeScript cycle on the 1M P1 matrix (measured, test/bench/kernels.bench.ts).
 *  Vectors the caller passes from outside the arena are copied through staging vectors; a Krylov solver avoids
 *  that by taking its vectors from Preconditioner.vector. Nothing is allocated per cycle but, with a team, the small
 *  descriptor of each phase it shares (seam-ordered sweeps and prolongation: seams.ts, seam-task.ts). */
import { javascriptCgSteps, residualInto, spmvDot } from '../cg-steps.ts';
import type { Csr, PartTeam, Preconditioner } from '../types.ts';
import type { AmgLevel } from './types.ts';
import type { PackedHierarchy } from './pack.ts';
import type { SeamLayout } from './seams.ts';
import { releaseArenaMemory, SEAM_TASK, seamPart, type SeamOp, type SeamPhase } from './seam-task.ts';
import { memoryId } from '../kernels/arena.ts';

/** Byte offsets of a level's arrays inside the arena. */
interface LevelPointers {
  n: number; rp: number; ci: number; va: number; dp: number; inv: number;
  b: number; x: number; r: number; rc: number; dx: number;
  /** The prolongator to the next finer level (its transpose restricts), null on the finest. */
  P: CsrPointers | null;
  /** Its transpose when kept (AmgLevel.R): the restriction to this level in parts of its rows. */
  R: CsrPointers | null;
  sweeps: number; visits: number;
  seams: SeamLayout | null;
}
interface CsrPointers { n: number; rp: number; ci: number; va: number }

const csrPointers = (A: Csr): CsrPointers =>
  ({ n: A.nRows, rp: A.rowPtr.byteOffset, ci: A.colIdx.byteOffset, va: A.values.byteOffset });

function levelPointers(L: AmgLevel): LevelPointers {
  return {
    ...csrPointers(L.A), dp: L.diagPos.byteOffset, inv: L.invDiag.byteOffset,
    b: L.b.byteOffset, x: L.x.byteOffset, r: L.r.byteOffset, rc: L.rc.byteOffset, dx: L.dx.byteOffset,
    P: L.P && csrPointers(L.P), R: L.R ? csrPointers(L.R) : null, sweeps: L.sweeps, visits: L.coarseVisits, seams: L.seams ?? null,
  };
}

export function wasmCyclePreconditioner(packed: PackedHierarchy, team?: PartTeam, keepMemory = true): Preconditioner {
  const { hierarchy: h, arena, staging, spares } = packed;
  const k = arena.kernels;
  const { coarse, symmetric } = h;
  const levels = h.levels.map(levelPointers);
  const last = levels.length - 1;
  const coarsest = h.levels[last];
  const view = (ptr: number, n: number): Float64Array => new Float64Array(arena.memory.buffer, ptr, n);
  // Views of the coarsest level's own b and x (empty when the finest level is the coarsest: then the caller's).
  const own = coarsest.b.length > 0;

  const solveCoarsest = (L: LevelPointers, b: number, x: number): void => {
    if (coarse.kind === 'gauss-seidel') {
      k.forwardSweepFromZero(L.n, L.rp, L.ci, L.va, L.dp, L.inv, b, x);
      k.backwardSweep(L.n, L.rp, L.ci, L.va, L.dp, L.inv, b, x);
      for (let s = 1; s < coarse.sweeps; s++) {
        k.forwardSweep(L.n, L.rp, L.ci, L.va, L.dp, L.inv, b, x);
        k.backwardSweep(L.n, L.rp, L.ci, L.va, L.dp, L.inv, b, x);
      }
      return;
    }
    // The dense factor works on typed arrays; the coarsest level's b and x are views of the arena.
    if (own && b === L.b && x === L.x) coarse.factor.solve(coarsest.b, coarsest.x);
    else coarse.factor.solve(view(b, L.n), view(x, L.n));
  };

  // Seam-ordered levels (seams.ts): the interiors go to the team's threads as parts (this thread takes parts too),
  // the seams follow here. Each phase is one job of the team; its descriptor is the only allocation of a cycle.
  const mem = memoryId(arena.memory);
  const sums = new Float64Array(new SharedArrayBuffer(8 * Math.max(1, ...levels.map((L) => (L.seams ? L.seams.interiors.length / 2 : 0)))));
  const interiors = (L: LevelPointers, op: SeamOp, b: number, x: number, v: number): void => {
    const f: SeamPhase = {
      memoryId: mem, memory: arena.memory, op, rp: L.rp, ci: L.ci, va: L.va, dp: L.dp, inv: L.inv, b, x, v,
      interiors: L.seams!.interiors, sums,
    };
    runParts(f);
  };
  const runParts = (f: SeamPhase): void => {
    const op = f.op;
    const parts = f.interiors.length / 2;
    const here = (p: number): void => { const bx = seamPart(k, f, p); if (op === 'product') sums[p] = bx; };
    if (team && team.workers > 0) team.run(SEAM_TASK, f, parts, here, { light: true });
    else for (let p = 0; p < parts; p++) here(p);
  };
  /** Equal runs of rows of each seam-ordered level, for the prolongation's parts. */
  const rowParts = levels.map((L) => (L.seams ? equalParts(L.n, L.seams.interiors.length / 2) : null));
  /** Equal runs of the rows of each level restricted to by parts (AmgLevel.R). */
  const restrictParts = levels.map((L, l) => (L.R && l > 0 && levels[l - 1]!.seams ? equalParts(L.n, levels[l - 1]!.seams!.interiors.length / 2) : null));
  const seamForward = (L: LevelPointers, b: number, x: number): void => {
    const { seams } = L.seams!;
    for (let s = 0; s < seams.length; s += 2) k.zeroRows(seams[s], seams[s + 1], x);
    interiors(L, 'forward', b, x, L.r);
    for (let s = 0; s < seams.length; s += 2) k.seamSweepWithResidualRows(seams[s], seams[s + 1], L.rp, L.ci, L.va, L.dp, L.inv, b, x, L.r);
  };
  const seamBackward = (L: LevelPointers, b: number, x: number): void => {
    const { seams } = L.seams!;
    for (let s = seams.length - 2; s >= 0; s -= 2) k.backwardSweepRows(seams[s], seams[s + 1], L.rp, L.ci, L.va, L.dp, L.inv, b, x);
    interiors(L, 'backward', b, x, 0);
  };
  const seamBackwardWithProduct = (L: LevelPointers, b: number, x: number, w: number): number => {
    const { seams, interiors: parts } = L.seams!;
    let bx = 0;
    for (let s = seams.length - 2; s >= 0; s -= 2) bx += k.backwardSweepWithProductRows(seams[s], seams[s + 1], 0, L.rp, L.ci, L.va, L.dp, L.inv, b, x, w);
    interiors(L, 'product', b, x, w);
    for (let p = parts.length / 2 - 1; p >= 0; p--) bx += sums[p];
    return bx;
  };

  const preSmooth = (L: LevelPointers, b: number, x: number): void => {
    const { n, rp, ci, va, dp, inv, sweeps } = L;
    if (symmetric && sweeps === 1) {
      if (L.seams) seamForward(L, b, x);
      else k.forwardSweepFromZeroWithResidual(n, rp, ci, va, dp, inv, b, x, L.r);
      return;
    }
    k.forwardSweepFromZero(n, rp, ci, va, dp, inv, b, x);
    if (symmetric) {
      for (let s = 2; s < sweeps; s++) k.forwardSweep(n, rp, ci, va, dp, inv, b, x);
      k.forwardSweepWithResidual(n, rp, ci, va, dp, inv, b, x, L.r);
    } else {
      for (let s = 1; s < sweeps; s++) k.forwardSweep(n, rp, ci, va, dp, inv, b, x);
      k.residual(n, rp, ci, va, b, x, L.r);
    }
  };

  const coarseCorrection = (l: number, x: number): void => {
    const C = levels[l + 1];
    const P = C.P!;
    if (team && team.workers > 0 && levels[l].seams && C.R) {
      // b_c = R r row by row: each row of R = Pᵀ sums its terms in increasing fine row, as P's scatter adds them.
      runParts({
        memoryId: mem, memory: arena.memory, op: 'restrict', rp: C.R.rp, ci: C.R.ci, va: C.R.va, dp: 0, inv: 0, b: levels[l].r, x: C.b, v: 0,
        interiors: restrictParts[l + 1]!, sums,
      });
    } else k.restrictByTranspose(P.n, P.rp, P.ci, P.va, levels[l].r, C.n, C.b);
    cycle(l + 1, C.b, C.x);
    if (levels[l].visits > 1) {
      k.residual(C.n, C.rp, C.ci, C.va, C.b, C.x, C.rc);
      cycle(l + 1, C.rc, C.dx);
      k.addInto(C.n, C.x, C.dx);
    }
    if (team && team.workers > 0 && levels[l].seams) {
      // x += P x_c row by row, so parts of rows give the same bits wherever they run.
      runParts({
        memoryId: mem, memory: arena.memory, op: 'prolong', rp: P.rp, ci: P.ci, va: P.va, dp: 0, inv: 0, b: C.x, x, v: 0,
        interiors: rowParts[l]!, sums,
      });
    } else k.multiplyAdd(P.n, P.rp, P.ci, P.va, C.x, x);
  };

  const cycle = (l: number, b: number, x: number): void => {
    const L = levels[l];
    if (l === last) { solveCoarsest(L, b, x); return; }
    preSmooth(L, b, x);
    coarseCorrection(l, x);
    if (L.seams) seamBackward(L, b, x); // seam order only with one sweep
    else for (let s = 0; s < L.sweeps; s++) k.backwardSweep(L.n, L.rp, L.ci, L.va, L.dp, L.inv, b, x);
  };

  const cycleWithProduct = (b: number, x: number, w: number): number => {
    const L = levels[0];
    if (last === 0) {
      solveCoarsest(L, b, x);
      k.spmv(L.n, L.rp, L.ci, L.va, x, w);
      const bv = view(b, L.n), xv = view(x, L.n);
      let bx = 0;
      for (let i = 0; i < L.n; i++) bx += bv[i] * xv[i];
      return bx;
    }
    preSmooth(L, b, x);
    coarseCorrection(0, x);
    for (let s = 1; s < L.sweeps; s++) k.backwardSweep(L.n, L.rp, L.ci, L.va, L.dp, L.inv, b, x);
    return L.seams ? seamBackwardWithProduct(L, b, x, w) : k.backwardSweepWithProduct(L.n, L.rp, L.ci, L.va, L.dp, L.inv, b, x, w);
  };

  /** The caller's vector as an arena offset: its own when it lives there, else the staging copy. */
  const input = (r: Float64Array, stage: Float64Array): number => {
    if (arena.owns(r)) return r.byteOffset;
    stage.set(r);
    return stage.byteOffset;
  };
  const output = (z: Float64Array, stage: Float64Array): number => (arena.owns(z) ? z.byteOffset : stage.byteOffset);
  const copyOut = (z: Float64Array, stage: Float64Array): void => { if (!arena.owns(z)) z.set(stage); };

  // CG's products with A and its true residuals run as kernels on a matrix in the arena with A's products: the copy
  // of A when the finest operator dropped round-off entries, else the finest operator itself (only exact zeros
  // dropped, which change no product: see FinestOperator.exactProducts).
  const productMatrix: Csr | undefined = packed.operatorCopy ?? (h.exactProducts ? h.levels[0].A : undefined);

  return {
    name: 'amg',
    apply(r: Float64Array, z: Float64Array): void {
      cycle(0, input(r, staging.b), output(z, staging.x));
      copyOut(z, staging.x);
    },
    cgSteps: {
      update: (alpha, p, q, x, r) => (arena.owns(p) && arena.owns(q) && arena.owns(x) && arena.owns(r) && p.length === x.length
        ? k.cgUpdate(x.length, alpha, p.byteOffset, q.byteOffset, x.byteOffset, r.byteOffset)
        : javascriptCgSteps.update(alpha, p, q, x, r)),
      direction: (beta, z, w, p, q) => (arena.owns(z) && arena.owns(w) && arena.owns(p) && arena.owns(q) && z.length === p.length
        ? k.cgDirection(p.length, beta, z.byteOffset, w.byteOffset, p.byteOffset, q.byteOffset)
        : javascriptCgSteps.direction(beta, z, w, p, q)),
    },
    ...(productMatrix ? {
      product: {
        matrix: h.operator,
        spmvDot(p: Float64Array, q: Float64Array): number {
          const C = productMatrix;
          return arena.owns(p) && arena.owns(q)
            ? k.spmvDot(C.nRows, C.rowPtr.byteOffset, C.colIdx.byteOffset, C.values.byteOffset, p.byteOffset, q.byteOffset)
            : spmvDot(h.operator, p, q);
        },
        residual(b: Float64Array, x: Float64Array, r: Float64Array): number {
          const C = productMatrix;
          if (arena.owns(x) && arena.owns(r)) {
            // b is the caller's: through the staging vector, which no cycle uses while CG checks its residual.
            k.residual(C.nRows, C.rowPtr.byteOffset, C.colIdx.byteOffset, C.values.byteOffset, input(b, staging.b), x.byteOffset, r.byteOffset);
          } else {
            return residualInto(h.operator, b, x, r);
          }
          let rr = 0;
          for (let i = 0; i < r.length; i++) rr += r[i] * r[i];
          return rr;
        },
      },
    } : {}),
    vector(n: number): Float64Array {
      const v = n === levels[0].n ? spares.pop() : undefined;
      return v ?? new Float64Array(n);
    },
    dispose(): void {
      arena.release();
      if (keepMemory === false) releaseArenaMemory(team);
    },
    release(v: Float64Array): void {
      if (arena.owns(v) && v.length === levels[0].n && !spares.includes(v)) spares.push(v);
    },
    ...(symmetric && h.exactProducts ? {
      withProduct: {
        matrix: h.operator,
        apply(r: Float64Array, z: Float64Array, w: Float64Array): number {
          const bx = cycleWithProduct(input(r, staging.b), output(z, staging.x), output(w, staging.w));
          copyOut(z, staging.x);
          copyOut(w, staging.w);
          return bx;
        },
      },
    } : {}),
  };
}

/** Rows 0 … n − 1 cut into `parts` runs of nearly equal length, as [first, last) pairs. */
function equalParts(n: number, parts: number): Int32Array {
  const out = new Int32Array(2 * parts);
  for (let p = 0; p < parts; p++) { out[2 * p] = Math.floor((p * n) / parts); out[2 * p + 1] = Math.floor(((p + 1) * n) / parts); }
  return out;
}
