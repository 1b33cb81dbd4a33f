// The preflight check: before any level runs, an external solver writes its own source and boundary data at a few
// points of its choosing (preflight.csv), and rungs compares them with the derived ones. A term dropped when the
// source was typed by hand then costs one second and names itself, instead of a ladder and a below-order verdict.
import { existsSync, mkdirSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { parseCsvTable } from '../csv/read.ts';
import { runLevelCommand } from '../external/command.ts';
import type { ExternalDiscretization } from '../external/types.ts';
import type { DataBundle } from '../codegen/types.ts';
import { compileBundle } from '../equation/index.ts';
import { outputColumns } from './values-at.ts';

/** The file the solver writes into its preflight folder. */
export const PREFLIGHT_FILE = 'preflight.csv';
/** Relative agreement required by default: the solver evaluates the same formulas in another order, so round-off
 *  differs, but a dropped or wrong term changes the value at far more than this (common practice, no source). */
export const PREFLIGHT_TOLERANCE = 1e-8;

const DECIMAL = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;
const COLUMNS = ['name', 'x', 'y', 'z', 't', 'nx', 'ny', 'nz', 'value'] as const;

export interface PreflightOutcome {
  /** Values compared, per datum name. */
  compared: Record<string, number>;
  file: string;
  seconds: number;
}

/** Compares the rows of a preflight table with the bundle's functions; throws at the first disagreement, naming the
 *  datum, the point and both values. */
export function comparePreflight(bundle: DataBundle, text: string, file: string, tolerance = PREFLIGHT_TOLERANCE): Record<string, number> {
  const table = parseCsvTable(text, file);
  const col = new Map(table.header.map((h, i) => [h, i]));
  for (const h of table.header) {
    if (!(COLUMNS as readonly string[]).includes(h)) throw new RungsInputError(`${file} line ${table.headerLine}: unknown column '${h}'; valid columns: ${COLUMNS.join(', ')}`, file);
  }
  for (const need of ['name', 'x', 'value']) {
    if (!col.has(need)) throw new RungsInputError(`${file} line ${table.headerLine}: no column '${need}'; the header is ${COLUMNS.join(',')} (y, z, t, nx, ny, nz may be left out)`, file);
  }
  if (table.rows.length === 0) throw new RungsInputError(`${file}: no rows; write at least the source of each equation at a few points`, file);
  const compiled = compileBundle(bundle);
  // Every output column a solver may name: exact_u, grad_u[1], source_momentum[0], flux_balance …
  const outputs = new Map<string, { fn: string; index: number }>();
  for (const f of bundle.functions) outputColumns(f.name, f.outputs.length).forEach((c, index) => outputs.set(c, { fn: f.name, index }));
  const args = new Float64Array(7);
  const out = new Float64Array(9);
  const compared: Record<string, number> = {};
  for (const r of table.rows) {
    const cell = (name: string): number => {
      const k = col.get(name);
      if (k === undefined) return 0;
      const t = r.fields[k]!.trim();
      if (!DECIMAL.test(t)) throw new RungsInputError(`${file} line ${r.line}: column '${name}' holds "${t}", not a decimal number`, file);
      return Number(t);
    };
    const name = r.fields[col.get('name')!]!.trim();
    const target = outputs.get(name);
    if (!target) {
      throw new RungsInputError(`${file} line ${r.line}: '${name}' is not a datum rungs derives for this study; valid names: ${[...outputs.keys()].join(', ')}`, file);
    }
    const c = compiled.functions.get(target.fn)!;
    const point = { x: cell('x'), y: cell('y'), z: cell('z'), t: cell('t'), nx: cell('nx'), ny: cell('ny'), nz: cell('nz') };
    c.args.forEach((a, i) => { args[i] = point[a as keyof typeof point]; });
    c.evaluate(args, out);
    const derived = out[target.index]!;
    const given = cell('value');
    // Relative to the datum's size, with the size of its arguments as a floor near its zeros.
    const size = Math.max(Math.abs(derived), Math.abs(given), 1e-300);
    if (!(Math.abs(given - derived) <= tolerance * Math.max(size, 1))) {
      const at = c.args.map((a) => `${a}=${point[a as keyof typeof point]}`).join(', ');
      throw new RungsInputError(
        `${file} line ${r.line}: the solver's ${name} at (${at}) is ${given}, but the derived value is ${derived} ` +
        `(difference ${(given - derived).toExponential(2)}); the solver's ${name.startsWith('source') ? 'source term' : name.startsWith('flux') || name.startsWith('robin') ? 'boundary data' : 'data'} ` +
        'differs from the manufactured one — check the term typed by hand, or use the generated code ({data})', file);
    }
    compared[name] = (compared[name] ?? 0) + 1;
  }
  return compared;
}

/** Runs the study's preflight command once in <root>/preflight and compares what it wrote. */
export async function runPreflight(
  spec: ExternalDiscretization, bundle: DataBundle, root: string, values: { study: string; n: number; h: number; data?: string; steps?: number; dt?: number; T?: number },
): Promise<PreflightOutcome | null> {
  if (!spec.preflight) return null;
  const dir = join(root, 'preflight');
  const file = join(dir, PREFLIGHT_FILE);
  try {
    mkdirSync(dir, { recursive: true });
    rmSync(file, { force: true });
  } catch (err) {
    throw new RungsInputError(`study '${values.study}': preflight: cannot prepare ${dir} (${(err as Error).message})`, dir);
  }
  const t0 = performance.now();
  await runLevelCommand(
    { command: spec.preflight, timeoutSeconds: spec.timeoutSeconds, cwd: spec.cwd, env: { ...spec.env, RUNGS_PREFLIGHT: '1' } },
    { study: values.study, level: 0, n: values.n, h: values.h, degree: spec.degree, out: dir, data: values.data, steps: values.steps, dt: values.dt, T: values.T },
  ).catch((err: unknown) => {
    if (err instanceof RungsInputError) throw new RungsInputError(err.message.replace(/level 0 \(n = [^)]*\)/, 'preflight'), err.where);
    throw err;
  });
  if (!existsSync(file)) {
    throw new RungsInputError(`study '${values.study}': preflight: the command wrote no ${file}; it must write rows name,x,y,z,t,nx,ny,nz,value (see README, External codes)`, file);
  }
  const compared = comparePreflight(bundle, readFileSync(file, 'utf8'), file);
  return { compared, file, seconds: (performance.now() - t0) / 1e3 };
}
