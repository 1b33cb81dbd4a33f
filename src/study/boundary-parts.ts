// Which boundary condition holds where: for today's equation one list of tags per kind; for a declared pde per
// field (Dirichlet) and per equation (natural: Neumann F·n, Robin F·n + α·field).
import { RungsInputError } from '../errors.ts';
import type { DerivedProblem } from '../equation/index.ts';
import type { BoundaryDeclaration, StudyDeclaration } from './declaration.ts';

export interface BoundaryParts {
  /** Union over fields / equations, for the scalar solver and the reports. */
  dirichlet: string[];
  neumann: string[];
  robin: string[];
}

/** Per field (Dirichlet) and per equation (Neumann, Robin). */
export interface BoundaryByName {
  dirichlet: Record<string, string[]>;
  neumann: Record<string, string[]>;
  robin: Record<string, string[]>;
}

type TagSpec = string[] | Record<string, string[]> | undefined;

const isRecord = (v: TagSpec): v is Record<string, string[]> => v !== undefined && !Array.isArray(v);

/** Resolve the study's boundary declaration. `derived` is null for today's equation given as functions. Errors name
 *  `where`, the field path, and what would be valid. */
export function resolveBoundary(decl: StudyDeclaration, derived: DerivedProblem | null, where: string, file: string): { parts: BoundaryParts; byName: BoundaryByName } {
  const tags = decl.domain.tags;
  const bd: BoundaryDeclaration = decl.boundary ?? {};
  const fail = (message: string): never => { throw new RungsInputError(`${where}: ${message}`, file); };
  const robinSpec: TagSpec = bd.robin?.tags;
  if (!decl.pde) {
    for (const [name, spec] of [['dirichlet', bd.dirichlet], ['neumann', bd.neumann], ['robin.tags', robinSpec]] as const) {
      if (isRecord(spec)) fail(`boundary.${name}: tags per field or equation need a pde; for today's equation give a list of tags`);
    }
  }
  // Fields that take boundary conditions: those whose equation has a flux (a constraint such as ∇·u = 0 takes none).
  const withFlux = derived ? derived.equations.filter((e) => e.flux !== null) : [];
  const fieldsWithData = derived && decl.pde ? withFlux.map((e) => e.field) : ['u'];
  const equationsWithFlux = derived && decl.pde ? withFlux.map((e) => e.name) : ['balance'];
  const allFields = derived && decl.pde ? derived.fields.map((f) => f.name) : ['u'];
  const spread = (spec: TagSpec, names: string[], valid: string[], part: string, kind: string): Record<string, string[]> => {
    if (spec === undefined) return {};
    if (!isRecord(spec)) return Object.fromEntries(names.map((n) => [n, [...spec]]));
    for (const key of Object.keys(spec)) {
      if (!valid.includes(key)) fail(`boundary.${part}.${key}: '${key}' is not ${kind}; valid: ${valid.join(', ') || '(none)'}`);
    }
    return Object.fromEntries(Object.entries(spec).map(([k, v]) => [k, [...v]]));
  };
  const neumann = spread(bd.neumann, equationsWithFlux, equationsWithFlux, 'neumann', 'an equation with a flux');
  const robin = spread(robinSpec, equationsWithFlux, equationsWithFlux, 'robin.tags', 'an equation with a flux');
  const eqOf = new Map((derived && decl.pde ? derived.equations : []).map((e) => [e.field, e.name]));
  const naturalOf = (field: string): string[] => {
    const eq = decl.pde ? eqOf.get(field) : 'balance';
    return eq === undefined ? [] : [...(neumann[eq] ?? []), ...(robin[eq] ?? [])];
  };
  let dirichlet: Record<string, string[]>;
  if (bd.dirichlet === undefined) {
    // Every tag not given a natural condition, for each field that takes boundary data.
    dirichlet = Object.fromEntries(fieldsWithData.map((f) => [f, tags.filter((t) => !naturalOf(f).includes(t))]));
  } else {
    dirichlet = spread(bd.dirichlet, fieldsWithData, allFields, 'dirichlet', 'a declared field');
  }
  const check = (part: string, list: string[]) => {
    for (const t of list) {
      if (!tags.includes(t)) fail(`boundary.${part}: unknown boundary tag '${t}'; the domain ${decl.domain.label} has tags ${tags.map((x) => `'${x}'`).join(', ')}`);
    }
  };
  for (const [f, list] of Object.entries(dirichlet)) check(isRecord(bd.dirichlet) ? `dirichlet.${f}` : 'dirichlet', list);
  for (const [e, list] of Object.entries(neumann)) check(isRecord(bd.neumann) ? `neumann.${e}` : 'neumann', list);
  for (const [e, list] of Object.entries(robin)) check(isRecord(robinSpec) ? `robin.tags.${e}` : 'robin.tags', list);
  // One condition per tag and field: Dirichlet on a field excludes natural data of its equation there.
  for (const f of allFields) {
    const eq = decl.pde ? eqOf.get(f) : 'balance';
    const seen = new Map<string, string>();
    const all: [string, string][] = [
      ...(dirichlet[f] ?? []).map((t) => ['dirichlet', t] as [string, string]),
      ...(eq ? (neumann[eq] ?? []).map((t) => ['neumann', t] as [string, string]) : []),
      ...(eq ? (robin[eq] ?? []).map((t) => ['robin.tags', t] as [string, string]) : []),
    ];
    for (const [part, t] of all) {
      if (seen.has(t)) fail(`boundary: tag '${t}' is given two conditions (${seen.get(t)} and ${part})${decl.pde ? ` for field '${f}'` : ''}`);
      seen.set(t, part);
    }
  }
  const union = (r: Record<string, string[]>) => [...new Set(Object.values(r).flat())];
  return { parts: { dirichlet: union(dirichlet), neumann: union(neumann), robin: union(robin) }, byName: { dirichlet, neumann, robin } };
}
