import type { Mesh } from '../mesh/types.ts';
import type { DiscreteField } from '../norms/types.ts';
import type { FunctionSpace } from '../fem/dofmap/types.ts';
import type { CommandRun } from './command.ts';
import type { VtkSystemField } from './vtk/to-field.ts';
import type { SchedulerSettings } from '../scheduler/types.ts';

/** How the external solver hands its level back: its own measured errors, or its discrete solution as VTK. */
export type ExternalOutput = 'errors' | 'vtk';

/** A discretization implemented by another program, run once per level. */
export interface ExternalDiscretization {
  kind: 'external';
  /** Command template, e.g. "python3 solver.py --n {n} --out {out}"; placeholders {n} {h} {level} {degree} {out}
   *  {study}, substituted inside each word after splitting (no shell). Or the argv words themselves. A word that
   *  starts with ./ or ../ is a path relative to the study file's folder (src/external/study-paths.ts). */
  command: string | string[];
  output: ExternalOutput;
  /** Element degree (sets derived expected orders and the error quadrature; checked against VTK cell types). */
  degree?: number;
  /** Seconds a level may take before the solver's process group is stopped (default 600). */
  timeoutSeconds?: number;
  /** Largest output file (solution.vtk / .vtu, errors.json / .csv) rungs reads, in bytes; a larger one is refused
   *  before it is read (default: the memory available divided by what reading costs per byte, about 8). */
  maxOutputBytes?: number;
  label?: string;
  /** VTK point-data array holding the solution of a scalar equation (default: the only scalar array). */
  field?: string;
  /** The VTK point-data array of each field of the study's pde, for a system: `{ u: 'displacement', p: 'pressure' }`
   *  (default: the array named like the field). A vector field takes an array with one component per dimension (in
   *  2D also three, the third zero to round-off); a scalar field a one-component array. `{ array, degree }` gives a
   *  field's polynomial degree where it is not the preset's (Taylor–Hood: the pressure has the study's degree − 1, read
   *  from the corners of the quadratic cells, its other nodes checked to hold its linear interpolation). */
  fields?: Record<string, string | ExternalFieldArray>;
  /** Working folder of the solver (default: the folder rungs runs in); a relative one is taken from the study file's folder. */
  cwd?: string;
  /** Extra environment variables for the solver. */
  env?: Record<string, string>;
  /** A command run once before the ladder (same placeholders; RUNGS_PREFLIGHT=1): it writes its own source and
   *  boundary data at points of its choosing to {out}/preflight.csv, which rungs compares with the derived data. */
  preflight?: string | string[];
  /** Run the levels as jobs of a batch scheduler (Slurm) or as local processes, with resources per level
   *  (src/scheduler/types.ts). Where a level runs does not change its result (the resume key leaves it out). */
  scheduler?: SchedulerSettings;
}

/** A field's VTK array with the polynomial degree to read it with. */
export interface ExternalFieldArray {
  array: string;
  /** 1 or the cells' degree; default: the preset's (Taylor–Hood pressure: degree − 1), else the cells'. */
  degree?: number;
}

/** Declares an external solver, for a study's `discretization` field. */
export function external(opts: Omit<ExternalDiscretization, 'kind'>): ExternalDiscretization {
  return { kind: 'external', ...opts };
}

/** What one level's solver produced, read back from its level folder. */
export type ExternalLevelOutput =
  | {
      kind: 'errors';
      file: string;
      dofs: number;
      /** The solver's h, or the level's own when the file gives none. */
      h: number;
      cells: number | null;
      errors: Record<string, number>;
      quantities: Record<string, number>;
    }
  | {
      kind: 'field';
      file: string;
      mesh: Mesh;
      field: DiscreteField;
      degree: 1 | 2;
      /** Distinct nodes of the VTK cells, or the solver's own count from an errors.json next to the VTK file. */
      dofs: number;
      h: number;
      fieldName: string;
      /** The Lagrange space of the field, for the nodal interpolant of the exact solution. */
      space: FunctionSpace;
      quantities: Record<string, number>;
    }
  | {
      /** The fields of a system, all on the cells of one VTK file. */
      kind: 'fields';
      file: string;
      mesh: Mesh;
      fields: VtkSystemField[];
      /** Degree of the cells. */
      degree: 1 | 2;
      /** Unknowns of all fields (nodes × components), or the solver's own count from an errors.json beside the file. */
      dofs: number;
      h: number;
      quantities: Record<string, number>;
    };

export interface ExternalLevelRun {
  output: ExternalLevelOutput;
  run: CommandRun;
  /** Wall seconds: solver, reading its output. */
  seconds: { solve: number; read: number };
}
