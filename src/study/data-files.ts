// A study's manufactured data handed to the user's solver: the generated code in every offered language, its
// self-tests, and problem.json (the PDE, the boundary parts and every formula in plain infix), in one folder.
import { mkdirSync, renameSync, writeFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { formulaText, generatePrepared, LANGUAGES, prepareBundle, type DataBundle, type Language } from '../codegen/index.ts';
import { parseFormula } from '../exact/formula.ts';
import { dataBundle, type DerivedProblem } from '../equation/index.ts';
import type { StudyDeclaration } from './declaration.ts';
import type { StudyProblem } from './problem.ts';

/** The convention every generated file and problem.json state. */
export const CONVENTION = '-div(F) + R = source in the domain; natural (Neumann) data F.n with n the outward unit normal; ' +
  'Robin data F.n + alpha*u; Dirichlet data the exact field';

/** The bundle of a study with formulas (null when its exact solution is given as functions or left out). */
export function studyBundle(decl: StudyDeclaration, problem: StudyProblem): DataBundle | null {
  if (!problem.derived) return null;
  const robin = decl.boundary?.robin
    ? { alpha: parseFormula(String(decl.boundary.robin.alpha), 'boundary.robin.alpha', decl.domain.dim) }
    : undefined;
  return dataBundle(decl.name, problem.derived, robin);
}

/** Writes the data of one study into `dir` (created), each file under a temporary name then renamed, so a reader
 *  never sees half a file; returns the absolute folder. */
export function writeStudyData(
  dir: string, decl: StudyDeclaration, problem: StudyProblem, languages: readonly Language[] = LANGUAGES,
): string {
  const bundle = studyBundle(decl, problem);
  if (!bundle || !problem.derived) {
    throw new RungsInputError(`study '${decl.name}': exact: the manufactured data can be generated only from formulas (this study gives functions or no exact solution)`, decl.name);
  }
  const [bx, by, bz] = decl.domain.bbox;
  const box = { x: bx, ...(by ? { y: by } : {}), ...(bz ? { z: bz } : {}) };
  const prepared = prepareBundle(bundle, { box }); // once: every language prints the same plan and self-test values
  const files = languages.flatMap((lang) => generatePrepared(prepared, lang));
  files.push({ name: 'problem.json', text: JSON.stringify(problemJson(decl, problem, problem.derived, bundle), null, 2) + '\n' });
  const abs = resolve(dir);
  try {
    mkdirSync(abs, { recursive: true });
    for (const f of files) {
      const tmp = join(abs, `.${f.name}.${process.pid}.tmp`);
      writeFileSync(tmp, f.text);
      renameSync(tmp, join(abs, f.name));
    }
  } catch (err) {
    throw new RungsInputError(`study '${decl.name}': cannot write the manufactured data into ${abs} (${(err as Error).message}); give a writable output folder`, abs);
  }
  return abs;
}

/** The PDE, the boundary parts and every generated function's formulas (infix with ** and with pow, never ^). */
export function problemJson(decl: StudyDeclaration, problem: StudyProblem, derived: DerivedProblem, bundle: DataBundle): Record<string, unknown> {
  const pde = problem.pde;
  return {
    format: 'rungs-manufactured-data',
    version: 1,
    study: decl.name,
    dim: derived.dim,
    time_dependent: derived.hasTime,
    convention: CONVENTION,
    pde: {
      label: pde.label ?? null,
      fields: pde.fields,
      coefficients: pde.coefficients ?? {},
      equations: Object.fromEntries(derived.equations.map((e) => [e.name, {
        flux: pde.equations[e.name]?.flux ?? null, rest: pde.equations[e.name]?.rest ?? null, field: e.field,
        kind: e.rank === 0 ? 'scalar' : 'vector',
      }])),
      mean_free: derived.meanFree,
    },
    boundary: {
      dirichlet: problem.byName.dirichlet,
      neumann: problem.byName.neumann,
      robin: problem.byName.robin,
      robin_alpha: decl.boundary?.robin ? String(decl.boundary.robin.alpha) : null,
    },
    domain: { label: decl.domain.label, bounding_box: decl.domain.bbox, tags: decl.domain.tags },
    functions: bundle.functions.map((f) => ({
      name: f.name,
      doc: f.doc,
      args: f.args,
      outputs: f.outputs.map((node, i) => ({
        name: f.outputNames[i],
        formula: formulaText(node, 'starstar'),
        formula_pow: formulaText(node, 'pow'),
      })),
    })),
  };
}
