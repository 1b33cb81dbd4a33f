import type { Mesh } from '../../mesh/types.ts';
import type { SolveStats } from '../../linalg/types.ts';
import type { StudyDeclaration } from '../declaration.ts';
import type { StudyProblem } from '../problem.ts';
import type { LevelContext } from '../context.ts';
import type { LevelResult } from '../result.ts';
import type { LevelErrorCells } from '../where.ts';
import type { ExternalDiscretization } from '../../external/types.ts';
import type { ExternalLevelInput, LevelRunner } from '../../external/level.ts';
import type { LocalOrderPair } from '../where.ts';

/** Where a level runs: the output folder (external solvers write into <out>/<study>/level-k). */
export interface LevelEnvironment {
  out: string;
  /** The folder holding the study's generated manufactured data ({data}, RUNGS_DATA), when written. */
  data?: string;
  /** The levels the study runs (its finest two get error files and maps). */
  total?: number;
  /** Write `level-k/errors.vtu` for the finest two levels (the CLI does; a study run from code does not). */
  errorFiles?: boolean;
  /** Runs an external level elsewhere (as a job of a scheduler, src/scheduler/); none: a child process of rungs. */
  levelRunner?: (disc: ExternalDiscretization, level: ExternalLevelInput) => LevelRunner;
  /** The study's second finest level (its cell errors and the expected order) once it is done in this thread
   *  (runner.ts addLevel): the finest level starts the pair's local orders on another thread (where.ts,
   *  localOrdersAhead). */
  localOrderPair?: LocalOrderPair;
}

export interface LevelTime { T: number; steps: number; dt: number }

/** Everything one level of a study needs, the mesh already made. */
export interface LevelInput {
  decl: StudyDeclaration;
  file: string;
  problem: StudyProblem;
  index: number;
  n: number;
  mesh: Mesh;
  /** A study with time: the final time, the level's number of equal steps and Δt = T/steps. */
  time?: LevelTime;
  /** The norms the study measures (or, for an external code, the errors it reports). */
  norms: readonly string[];
  solver: LevelContext['solver'];
  env: LevelEnvironment;
}

/** What a discretization hands back for one level: its unknowns and errors, and how it solved. */
export interface LevelOutput {
  dofs: number;
  /** The code's own h and cell count, when it meshes for itself (external codes); else the runner's mesh. */
  h?: number;
  cells?: number;
  errors: Record<string, number>;
  interpolationErrors?: Record<string, number>;
  quasiOptimality?: number | null;
  solver?: SolveStats | null;
  algebraic?: LevelResult['algebraic'];
  quantities?: Record<string, number>;
  /** The errors per cell of the discrete solution, where the discretization measured them (src/study/where.ts). */
  errorCells?: LevelErrorCells;
  seconds: { assemble: number; solve: number; errors: number; [phase: string]: number };
}

/** Every kind of discretization — rungs's own elements for each equation, a user's TypeScript solve(level), an
 *  external code — is one object behind this interface; the level runner only meshes and times. */
export interface LevelDiscretization {
  /** What it is, for messages and reports (e.g. "vector P2 elasticity"). */
  label: string;
  run(input: LevelInput): Promise<LevelOutput>;
}

export const seconds = (t0: number): number => (performance.now() - t0) / 1e3;
