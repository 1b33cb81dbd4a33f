// A level that would not fit in memory is refused before it is meshed, naming its ladder value and the budget, so
// that an 8000² level asked for by mistake stops its own study with a message instead of taking the machine (or the
// process, and with it every other study) down. The estimate: the unknowns a level will have, from its domain, n and
// degree, times the peak memory per unknown of the built-in pipeline measured on this machine.
import { ladderRungs } from './time-ladder.ts';
import { RungsInputError } from '../errors.ts';
import { machineMemory, showBytes } from '../external/vtk/limits.ts';
import type { Mesh } from '../mesh/types.ts';
import type { StudyDeclaration } from './declaration.ts';

/**
 * Peak memory per unknown of one built-in level (mesh, dofs, assembly, AMG-PCG solve, errors), by degree: the slope of
 * the peak RSS of a fresh process between two sizes of a two-level study on the unit square, above a process that
 * only loads rungs (211 MiB), measured with test/bench/memory.bench.ts on this 2-core, 24 GB machine:
 *   P1 263 169 → 1 050 625 unknowns: 79 → 456 MiB above the baseline (455 B/unknown at 1M), slope 501 B/unknown;
 *   P2 263 169 → 1 050 625 unknowns: 115 → 562 MiB (561 B/unknown at 1M), slope 595 B/unknown;
 *   P3 264 196 → 1 048 576 unknowns: 161 → 773 MiB (773 B/unknown at 1M), slope 818 B/unknown (relTol 1e-10).
 * docs/performance-history.md agrees (peak RSS 0.69 GB for P1, 0.85 GB for P2 at 1.05M unknowns, baseline included).
 * Rounded up by about a fifth: coefficients, quadrilaterals and perturbed meshes add nonzeros per row. The fixed part
 * of the fit came out negative (−47, −34, −45 MiB: small levels cost less per unknown), so the estimate is the slope
 * times the unknowns and nothing else.
 */
export const PIPELINE_BYTES_PER_DOF: Readonly<Record<number, number>> = { 1: 600, 2: 700, 3: 1000 };
/** Tetrahedra couple more unknowns per row than triangles (P1: about 15 nonzeros per row against 7), so their
 *  matrix and hierarchy cost about twice as much per unknown; assumed from that count, not measured. */
const THREE_D_FACTOR = 2;

const MB = 2 ** 20;

/** The unknowns a level will have, before meshing, for the built-in domains; null for a custom domain. */
export function estimateDofs(decl: StudyDeclaration, n: number, degree: number): number | null {
  const d = decl.domain;
  const cells = (i: number) => Math.max(1, Math.round(n * (d.bbox[i]![1] - d.bbox[i]![0])));
  switch (d.kind) {
    case 'interval':
      return degree * cells(0) + 1;
    case 'rectangle': {
      const grid = (degree * cells(0) + 1) * (degree * cells(1) + 1);
      // Crossed diagonals add a centre vertex per square, and its edges: about twice the unknowns.
      return /crossed/.test(d.label) ? 2 * grid : grid;
    }
    case 'box':
      // Vertices, edges, faces and interiors of a structured grid of cubes (tetrahedra add no vertices): exact for
      // P_k tetrahedra and Q_k hexahedra.
      return (degree * cells(0) + 1) * (degree * cells(1) + 1) * (degree * cells(2) + 1);
    case 'lshape':
      // The square [-1, 1]² of 2n × 2n cells less the nodes strictly inside one quadrant (n cells per unit length).
      return (2 * degree * n + 1) ** 2 - (degree * n) ** 2;
    default:
      return null;
  }
}

/** The unknowns on a mesh already built (custom domains): vertices times degree^dim, as on a structured grid. */
export function estimateDofsOnMesh(mesh: Mesh, degree: number): number {
  return mesh.nVertices * degree ** mesh.dim;
}

/** The element degree a level is estimated with: the discretization's own, else 1. */
function degreeOf(decl: StudyDeclaration): number {
  const k = decl.discretization.degree;
  return k !== undefined && k >= 1 ? Math.min(Math.round(k), 3) : 1;
}

/** Unknowns per node of rungs's own elements for the study's equation: a displacement or velocity has one per
 *  coordinate (the Taylor–Hood pressure, on the coarser P_(k−1) nodes, adds less than one more: counted as one).
 *  Each unknown of a system row couples to about as many unknowns per component as a scalar row, so the bytes per
 *  unknown are taken as the scalar ones times the components (assumed from the nonzero count, not measured). */
function componentsOf(decl: StudyDeclaration): number {
  if (decl.discretization.kind !== 'lagrange') return 1;
  const preset = decl.pde?.preset?.name;
  const dim = decl.domain.dim;
  if (preset === 'linear-elasticity') return dim;
  if (preset === 'stokes' || preset === 'nearly-incompressible-elasticity') return dim + 1;
  return 1;
}

/** Estimated peak memory of a level with `dofs` unknowns, in bytes. */
export function levelBytes(dofs: number, degree: number, dim: number): number {
  return dofs * PIPELINE_BYTES_PER_DOF[degree]! * (dim === 3 ? THREE_D_FACTOR : 1);
}

/** The budget a level runs under: the study's memoryBudgetMB, or the memory available now. */
export function levelBudget(decl: StudyDeclaration): { bytes: number; source: string } {
  if (decl.memoryBudgetMB !== undefined) return { bytes: decl.memoryBudgetMB * MB, source: `memoryBudgetMB: ${decl.memoryBudgetMB}` };
  const available = machineMemory().available;
  return { bytes: available, source: `the memory available on this machine (${showBytes(available)}; set memoryBudgetMB to choose)` };
}

const mb = (bytes: number) => `${Math.ceil(bytes / MB).toLocaleString('en-US')} MB`;

/**
 * Refuses level `index` when its estimate exceeds the budget: before meshing for the built-in domains, or with
 * `mesh` (a custom domain, meshed by the study's own function) before anything is built on it.
 */
export function checkLevelMemory(decl: StudyDeclaration, index: number, mesh?: Mesh): void {
  const n = ladderRungs(decl)[index]!.n;
  const degree = degreeOf(decl);
  const nodes = mesh ? estimateDofsOnMesh(mesh, degree) : estimateDofs(decl, n, degree);
  if (nodes === null) return;
  const components = componentsOf(decl);
  const dofs = nodes * components;
  const dim = mesh?.dim ?? decl.domain.dim;
  const need = levelBytes(dofs, degree, dim) * components;
  const budget = levelBudget(decl);
  if (need <= budget.bytes) return;
  // The largest n of this domain that fits, for the message (the estimate grows with n^dim).
  const fits = Math.floor(n * (budget.bytes / need) ** (1 / dim));
  const perDof = PIPELINE_BYTES_PER_DOF[degree]! * (dim === 3 ? THREE_D_FACTOR : 1) * components;
  throw new RungsInputError(
    `ladder.n[${index}]: the ladder value n = ${n} would give about ${dofs.toLocaleString('en-US')} unknowns (degree ${degree}), ` +
      `which need about ${mb(need)} (${perDof} bytes per unknown, measured on the built-in pipeline), more than the memory budget of ` +
      `${mb(budget.bytes)} (${budget.source}); the level was not ${mesh ? 'solved' : 'meshed'}. Use a ladder value of at most about ` +
      `${Math.max(fits, 0)} for this budget, or raise memoryBudgetMB on a machine with the memory`,
  );
}
