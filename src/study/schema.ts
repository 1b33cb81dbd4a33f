import { z } from 'zod';
import { RungsInputError } from '../errors.ts';
import { NORM_NAMES, type StudyDeclaration } from './declaration.ts';
import { builtInNorms, externalFieldNorms, TIME_NORMS } from './discretizations/system-norms.ts';
import { defaultNorms } from './expected.ts';
import { TIME_ORDER, type TimeMethodName } from '../fem/time/methods.ts';
import { externalDiscretizationSchema, quantityNamesSchema } from '../external/schema.ts';

const fn = (what: string) => z.custom<(...a: never[]) => unknown>((v) => typeof v === 'function', { message: `expected ${what} (a function)` });
const coefficient = z.union([z.string().min(1), z.number().finite()], { message: 'expected a formula string such as "1 + x*y" or a finite number' });
const positiveInt = z.number().int().positive();
const verdicts = ['on-order', 'below-order', 'above-order', 'exact', 'inconclusive'] as const;
/** Names whose report files would clobber the run's own (summary.csv, index.html, junit.xml) or folders beside them. */
export const RESERVED_STUDY_NAME = /^(summary|index|junit)(\..*)?$/i;

const domain = z.object({
  kind: z.enum(['interval', 'rectangle', 'lshape', 'box', 'custom']),
  dim: z.union([z.literal(1), z.literal(2), z.literal(3)]),
  tags: z.array(z.string()),
  bbox: z.array(z.tuple([z.number(), z.number()])),
  label: z.string(),
  mesh: fn('mesh(n)'),
}, { message: 'expected a domain such as interval(0, 1), rectangle([0, 2], [0, 1]), lShape() or box([0, 1], [0, 1], [0, 1])' });

const quadrature = z.object({
  stiffness: z.number().int().min(0).optional(),
  convection: z.number().int().min(0).optional(),
  reaction: z.number().int().min(0).optional(),
  load: z.number().int().min(0).optional(),
  boundary: z.number().int().min(0).optional(),
}).strict();

const discretization = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('lagrange'), degree: z.number().int().min(1).max(3), quadrature: quadrature.optional(), label: z.string().optional() }).strict(),
  z.object({ kind: z.literal('custom'), label: z.string().min(1), degree: z.number().int().min(0).optional(), solve: fn('solve(level)') }).strict(),
  externalDiscretizationSchema,
], { message: 'expected lagrange({ degree }), custom({ label, solve }) or external({ command, output })' });

const tagList = z.union([z.array(z.string()), z.record(z.string(), z.array(z.string()))],
  { message: "expected a list of boundary tags, or (with a pde) tags per field or equation such as { u: ['left'] }" });
const formulaList = z.array(z.union([z.string().min(1), z.number().finite()]));
const pde = z.object({
  label: z.string().optional(),
  fields: z.record(z.string(), z.enum(['scalar', 'vector'])),
  coefficients: z.record(z.string(), z.union([z.string().min(1), z.number().finite(), formulaList, z.array(formulaList)])).optional(),
  equations: z.record(z.string(), z.object({ flux: z.string().optional(), rest: z.string().optional(), field: z.string().optional() }).strict()),
  meanFree: z.array(z.string()).optional(),
  preset: z.object({ name: z.string(), args: z.record(z.string(), z.unknown()) }).optional(),
}, { message: 'expected a pde: { fields, equations, coefficients? } or a preset such as linearElasticity({ lambda, mu })' }).strict();

const exactFunctions = z.object({ u: fn('u(x, y, z)'), grad: fn('grad(x, y, z, out)'), f: fn('f(x, y, z)') }).strict();

const increasing = (list: number[], key: string, what: string, ctx: RefineContext) => {
  for (let i = 1; i < list.length; i++) {
    if (!(list[i] > list[i - 1])) ctx.addIssue({ code: 'custom', path: [key, i], message: `${key} must increase level by level (${what}): ${list[i - 1]} then ${list[i]}` });
  }
};

const ladder = z.object({
  n: z.array(positiveInt).min(1, 'a ladder needs at least one value of n'),
  steps: z.array(positiveInt).min(1).optional(),
  dt: z.array(z.number().positive({ message: 'expected a positive time step' }).finite()).min(1).optional(),
  coupled: z.object({
    c: z.number().positive({ message: 'expected a positive factor c of Δt = c·h^exponent' }).finite(),
    exponent: z.number().positive({ message: 'expected a positive exponent (Δt = c·h^exponent must shrink with h; p/q balances the spatial and temporal errors)' }).finite(),
  }).strict().optional(),
  grid: z.boolean().optional(),
  perturb: z.object({ fraction: z.number().min(0).max(0.35), seed: z.number().int().optional() }).strict().optional(),
  quick: z.number().int().min(2).optional(),
}).strict().superRefine((l, ctx) => {
  increasing(l.n, 'n', 'h decreasing', ctx);
  if (l.steps) increasing(l.steps, 'steps', 'Δt decreasing', ctx);
  if (l.dt) increasing(l.dt.map((d) => -d), 'dt', 'Δt decreasing', ctx);
});

export const studySchema = z.object({
  name: z.string().regex(/^[A-Za-z0-9][A-Za-z0-9._-]*$/, 'expected a name of letters, digits, ".", "_" or "-" (it names the report files)')
    .refine((n) => !RESERVED_STUDY_NAME.test(n), {
      error: (iss) => `'${String(iss.input)}' is reserved: the run writes summary.csv, index.html and junit.xml beside the study files, so a study may not be named summary, index or junit (in any case, alone or before a '.'); choose another name, such as '${String(iss.input)}-tile'`,
    }),
  description: z.string().optional(),
  domain,
  pde: pde.optional(),
  exact: z.union([z.string().min(1), exactFunctions, z.record(z.string(), z.union([z.string().min(1), z.array(z.string().min(1))]))],
    { message: 'expected a formula string in x, y, z, formulas per field ({ u: [...], p: \'...\' }) or { u, grad, f } functions' }).optional(),
  coefficients: z.object({ k: coefficient.optional(), b: z.array(coefficient).optional(), c: coefficient.optional() }).strict().optional(),
  boundary: z.object({
    dirichlet: tagList.optional(),
    neumann: tagList.optional(),
    robin: z.object({ tags: tagList, alpha: coefficient }).strict().optional(),
  }).strict().optional(),
  discretization,
  ladder,
  time: z.object({
    final: z.number().positive({ message: 'expected the final time T, a positive number (time: { final: 1 })' }).finite(),
    stepper: z.enum(Object.keys(TIME_ORDER) as [TimeMethodName, ...TimeMethodName[]]).optional(),
    order: z.number().positive({ message: 'expected a positive temporal order (errors fall like Δt^q with q > 0)' }).finite().optional(),
  }).strict().optional(),
  // Built-in norms, or (an external code's own errors) any name with the expected order the study declares.
  norms: z.array(z.string().regex(/^[A-Za-z][A-Za-z0-9_.-]*$/, 'expected a norm name of letters, digits, "_", "." or "-"')).min(1).optional(),
  quantities: quantityNamesSchema.optional(),
  expected: z.record(z.string(), z.number().finite().positive({
    error: (iss) => `expected order ${String(iss.input)} is not valid: an expected order must be a positive number (errors fall like h^p with p > 0), e.g. expected: { L2: 2 }`,
  })).optional(),
  tolerance: z.number().positive().optional(),
  fitWindow: z.number().int().min(2).optional(),
  allow: z.object({
    aboveOrder: z.record(z.string(), z.string().min(1, 'give the reason the study accepts it')).optional(),
    fewLevels: z.record(z.string(), z.string().min(1, 'give the reason the study accepts it')).optional(),
  }).strict().optional(),
  expect: z.object({ verdict: z.enum(verdicts), flaw: z.string().min(1).optional() }).strict().optional(),
  solver: z.object({
    method: z.enum(['auto', 'cg', 'gmres', 'bicgstab', 'direct']).optional(),
    preconditioner: z.enum(['auto', 'none', 'jacobi', 'ssor', 'ic0', 'ilu0', 'amg']).optional(),
    relTol: z.number().positive().max(0.1).optional(),
    maxIter: positiveInt.optional(),
    errorFraction: z.number().min(0).max(1).optional(),
  }).strict().optional(),
  baselineTolerance: z.number().positive().optional(),
  memoryBudgetMB: z.number().positive({ message: 'expected a positive number of megabytes (2^20 bytes), such as 4096' }).finite().optional(),
  sweep: z.object({
    coefficient: z.string().min(1),
    values: z.array(z.number().finite()).min(2, { message: 'a sweep needs at least two values of the coefficient' }),
    expect: z.enum(['robust', 'not-robust']).optional(),
    growth: z.number().gt(1).finite().optional(),
  }).strict().optional(),
}).strict().superRefine((s, ctx) => {
  checkTimeLadder(s as unknown as StudyDeclaration, ctx);
  if (s.exact === undefined && !(s.discretization.kind === 'external' && s.quantities?.length)) {
    ctx.addIssue({ code: 'custom', path: ['exact'], message: 'missing: give the exact solution (a formula in x, y, z or { u, grad, f }); only an external study that declares quantities may leave it out' });
  }
  // rungs's own elements measure the norms of their equation (L2_u, L2_p, … for systems); a custom field the
  // scalar ones; an external code may report any norm it declares with its order.
  const preset = (s.pde as StudyDeclaration['pde'])?.preset?.name;
  // An external code's VTK solution of a system: rungs measures the norms of its fields (checkExternalFields).
  const fieldTable = externalFieldNorms(s as unknown as StudyDeclaration);
  const measured: string[] = s.discretization.kind === 'lagrange' && preset
    ? Object.keys(builtInNorms(preset, 1).orders)
    : fieldTable?.names ?? NORM_NAMES;
  if (s.discretization.kind === 'external') checkExternalFields(s as unknown as StudyDeclaration, ctx);
  (s.norms ?? []).forEach((nm, i) => {
    if (measured.includes(nm)) return;
    // The norms over time: measured by rungs's own heat stepper, and from an external code's series of VTK files
    // (a lone scalar field); an external code's errors file may still report a norm of that name itself.
    const ownErrors = s.discretization.kind === 'external' && s.discretization.output === 'errors';
    if (TIME_NORMS.includes(nm) && !ownErrors) {
      const what = `'${nm}' is a norm over the time levels t_0 … t_N (${nm === 'Linf_L2' ? 'max_n ‖e(t_n)‖_L2' : '(Σ_n Δt ‖e(t_n)‖²_H1)^(1/2)'})`;
      ctx.addIssue({
        code: 'custom', path: ['norms', i],
        message: !s.time
          ? `${what}, but this study is steady (no time: { final }); measure ${measured.join(', ')}, or give the problem a time derivative (pde: heat({ k }) or dt(u)), an exact solution in x and t and time: { final, … }`
          : `${what}; rungs measures it for a single scalar field (the heat preset, or a pde of one scalar field with dt(u)) solved by its own stepper or written by an external code as VTK, one file per time level; here measure ${measured.filter((m) => !TIME_NORMS.includes(m)).join(', ')}, or let the code report it (output: 'errors', with its expected order)`,
      });
      return;
    }
    if (fieldTable) {
      ctx.addIssue({ code: 'custom', path: ['norms', i], message: `'${nm}' is not a norm rungs measures on the fields of ${preset ?? 'this pde'} (${measured.join(', ')}); with output: 'vtk' rungs integrates every error itself` });
    } else if (s.discretization.kind !== 'external') {
      ctx.addIssue({ code: 'custom', path: ['norms', i], message: `'${nm}' is not a norm rungs measures${preset ? ` for ${preset}` : ''} (${measured.join(', ')}); other names are for errors an external code reports itself` });
    } else if (s.expected?.[nm] === undefined) {
      ctx.addIssue({ code: 'custom', path: ['expected', nm], message: `missing: '${nm}' is the external code's own error norm, so give its expected order (expected: { ${nm}: 2 })` });
    }
  });
  if (s.sweep) {
    const own = s.pde ? Object.keys((s.pde as StudyDeclaration['pde'])!.coefficients ?? {}) : Object.keys(s.coefficients ?? {}).filter((k) => k !== 'b');
    if (!own.includes(s.sweep.coefficient)) {
      ctx.addIssue({ code: 'custom', path: ['sweep', 'coefficient'], message: `'${s.sweep.coefficient}' is not a scalar coefficient of this study; valid: ${own.join(', ') || '(none: declare the coefficient first)'}` });
    }
    if (new Set(s.sweep.values).size !== s.sweep.values.length) ctx.addIssue({ code: 'custom', path: ['sweep', 'values'], message: 'the values repeat; give distinct values in the order they approach the limit' });
  }
  for (const rule of ['aboveOrder', 'fewLevels'] as const) {
    for (const k of Object.keys(s.allow?.[rule] ?? {})) {
      const own = s.norms ?? defaultNorms(s as unknown as StudyDeclaration);
      if (!own.includes(k)) ctx.addIssue({ code: 'custom', path: ['allow', rule, k], message: `'${k}' is not one of the study's norms (${own.join(', ')})` });
    }
  }
  const names = [...(s.norms ?? []), ...(s.quantities ?? []), ...measured];
  for (const k of Object.keys(s.expected ?? {})) {
    if (!names.includes(k)) ctx.addIssue({ code: 'custom', path: ['expected', k], message: `'${k}' is neither a norm (${NORM_NAMES.join(', ')}) nor a declared quantity` });
  }
});

type RefineContext = Parameters<Parameters<z.ZodType['superRefine']>[0]>[1];

/** The ladder of a study with time (src/study/time-ladder.ts): one axis refined at a time, a coupled path or a grid;
 *  a steady study has no time ladder. */
function checkTimeLadder(s: StudyDeclaration, ctx: RefineContext): void {
  const l = s.ladder;
  const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: 'custom', path, message });
  const timeKeys = (['steps', 'dt', 'coupled', 'grid'] as const).filter((k) => l[k] !== undefined);
  if (!s.time) {
    if (timeKeys.length) issue(['ladder', timeKeys[0]!], `belongs to a study with time; give time: { final: T${s.discretization.kind === 'lagrange' ? ", stepper: 'bdf2'" : ''} } or leave ladder.${timeKeys[0]} out`);
    else if (l.n.length < 2) issue(['ladder', 'n'], 'a ladder needs at least 2 levels');
    return;
  }
  const T = s.time.final;
  if (l.dt) {
    if (l.steps) { issue(['ladder', 'dt'], 'give either steps or dt, not both'); return; }
    // Equal steps that end exactly at T: Δt must divide T (to round-off).
    const bad = l.dt.findIndex((d) => Math.abs(T / d - Math.round(T / d)) > 1e-9 * (T / d));
    if (bad >= 0) {
      const d = l.dt[bad]!;
      issue(['ladder', 'dt', bad], `Δt = ${d} does not divide the final time T = ${T} (T/Δt = ${(T / d).toPrecision(6)}); rungs takes equal steps that end at T: give a Δt such as ${T / Math.ceil(T / d)} (${Math.ceil(T / d)} steps), or the steps themselves (ladder.steps)`);
      return;
    }
  }
  const stepsList = l.steps ?? l.dt?.map((d) => Math.round(T / d));
  if (!stepsList && !l.coupled) {
    issue(['ladder'], `missing: a study with time needs a time ladder: steps: [16, 32, 64, 128] on one mesh (n: [64]) for the temporal order, steps: [1024] with several n for the spatial order, coupled: { c, exponent } for Δt = c·h^exponent, or several of both with grid: true`);
    return;
  }
  if (stepsList && l.coupled) { issue(['ladder', 'coupled'], 'give either steps (dt) or coupled, not both'); return; }
  const nSteps = stepsList?.length ?? 0;
  if (l.grid) {
    if (l.coupled) issue(['ladder', 'grid'], 'a grid runs every pair of n and steps; a coupled path derives the steps from n: give one of them');
    else if (l.n.length < 2 || nSteps < 2 || l.n.length * nSteps < 5) {
      issue(['ladder', 'grid'], `a two-axis design needs at least two values of n, two of steps and five pairs in all (to fit C_h, p, C_t and q with a degree of freedom left); got ${l.n.length} × ${nSteps}`);
    }
  } else if (stepsList) {
    if (l.n.length > 1 && nSteps > 1) {
      issue(['ladder', 'steps'], `both n (${l.n.length} values) and steps (${nSteps} values) vary: give one value of n (temporal order), one value of steps (spatial order), grid: true (every pair, fitted jointly) or coupled: { c, exponent } (Δt = c·h^exponent)`);
    } else if (l.n.length < 2 && nSteps < 2) {
      issue(['ladder'], 'a ladder needs at least 2 levels: several steps on one mesh, or several n at one steps value');
    }
  } else if (l.n.length < 2) {
    issue(['ladder', 'n'], 'a coupled path needs at least 2 values of n');
  }
  const d = s.discretization;
  if (d.kind === 'lagrange' && !s.time.stepper) {
    issue(['time', 'stepper'], `missing: rungs's own elements need a time stepper: one of ${Object.keys(TIME_ORDER).map((k) => `'${k}'`).join(', ')}`);
  }
  if (d.kind !== 'lagrange' && s.time.stepper) {
    issue(['time', 'stepper'], `names one of rungs's own steppers, but the ${d.kind} discretization advances in time itself; give its temporal order instead (time: { final: ${T}, order: 2 })`);
  }
  if (d.kind !== 'lagrange' && s.time.order === undefined) {
    issue(['time', 'order'], `missing: the expected temporal order of the ${d.kind} code's stepper (time: { final: ${T}, order: 2 } for a second-order method)`);
  }
}

/** The `external` part: `field` names the VTK array of today's scalar equation, `fields` the arrays of a system's
 *  fields (each a field of the pde); a Taylor–Hood preset needs the velocity degree to read its pressure with degree
 *  − 1; every norm rungs measures on the fields needs an expected order, derived from the preset or declared. */
function checkExternalFields(s: StudyDeclaration, ctx: RefineContext): void {
  const d = s.discretization;
  if (d.kind !== 'external') return;
  const issue = (path: (string | number)[], message: string) => ctx.addIssue({ code: 'custom', path: ['discretization', ...path], message });
  const pde = s.pde;
  const preset = pde?.preset?.name;
  const scalarEquation = !pde || preset === 'diffusion-convection-reaction';
  const kinds: Record<string, string> = pde?.fields ?? { u: 'scalar' };
  const names = Object.keys(kinds);
  const listed = names.map((f) => `${f} (${kinds[f]})`).join(', ');
  const lone = names.length === 1 && kinds[names[0]!] === 'scalar';
  if (d.fields !== undefined) {
    if (d.output !== 'vtk') {
      issue(['fields'], "names the VTK arrays of the fields, but output is 'errors' (the code reports its own errors); use output: 'vtk' or leave fields out");
      return;
    }
    if (scalarEquation) {
      issue(['fields'], "today's scalar equation has one field: name its VTK array with field: '<array>'");
      return;
    }
    if (d.field !== undefined) issue(['field'], `give the arrays of ${preset ?? 'the pde'} in fields only (fields: { ${names.map((f) => `${f}: '<array>'`).join(', ')} })`);
    for (const key of Object.keys(d.fields)) {
      if (!Object.hasOwn(kinds, key)) issue(['fields', key], `'${key}' is not a field of the study's pde; valid: ${listed}`);
    }
  }
  if (d.output !== 'vtk' || scalarEquation) return;
  if (d.field !== undefined && !lone) {
    issue(['field'], `${pde!.label ?? 'the pde'} has the fields ${listed}: name their VTK arrays with fields: { ${names.map((f) => `${f}: '<array>'`).join(', ')} }`);
  }
  const taylorHood = preset === 'stokes' || preset === 'nearly-incompressible-elasticity';
  const pArray = d.fields?.p;
  if (taylorHood && (typeof pArray !== 'object' || pArray.degree === undefined)) {
    if (d.degree === undefined) {
      issue(['degree'], 'missing: give the velocity (displacement) degree k of the Taylor–Hood P_k–P_(k−1) elements, e.g. degree: 2; rungs reads the pressure with degree k − 1 and derives the expected orders from k');
    } else if (d.degree < 2) {
      issue(['degree'], `Taylor–Hood needs a velocity (displacement) degree of at least 2 (the pressure takes degree − 1); got ${d.degree}. A code of equal order declares the pressure's degree, fields: { p: { array: '<array>', degree: ${d.degree} } }, and its expected orders`);
    }
  }
  // Every norm the study measures needs an order: from the preset and degree, or declared.
  const table = externalFieldNorms(s)!;
  for (const nm of s.norms ?? table.defaults) {
    if (!table.names.includes(nm) || table.orders[nm] !== undefined || s.expected?.[nm] !== undefined) continue;
    const why = preset && d.degree === undefined
      ? 'give discretization.degree (the orders follow from the preset) or'
      : `rungs derives no order for ${preset ? `'${nm}' of ${preset}` : 'a pde of the study\'s own'}:`;
    ctx.addIssue({ code: 'custom', path: ['expected', nm], message: `missing: the expected order of '${nm}'; ${why} declare it (expected: { ${nm}: 2 })` });
  }
}

/** Validates a study's default export; every problem names the file, the field path and what would be valid. */
export function validateStudy(raw: unknown, file: string): StudyDeclaration {
  const res = studySchema.safeParse(raw);
  if (res.success) return raw as StudyDeclaration;
  const issue = res.error.issues[0];
  const path = issue.path.length ? issue.path.map((p) => (typeof p === 'number' ? `[${p}]` : `.${String(p)}`)).join('').replace(/^\./, '') : '(study)';
  const name = typeof (raw as { name?: unknown })?.name === 'string' ? ` (study '${(raw as { name: string }).name}')` : '';
  let message = issue.message;
  if (issue.code === 'unrecognized_keys') {
    const allowed = allowedKeys(issue.path);
    message = `unknown field${issue.keys.length > 1 ? 's' : ''} ${issue.keys.map((k) => `'${k}'`).join(', ')}${allowed ? `; valid fields here: ${allowed}` : ''}`;
  } else if (issue.code === 'invalid_value' && 'values' in issue) {
    message = `expected one of ${(issue.values as unknown[]).map((v) => JSON.stringify(v)).join(', ')}`;
  }
  const more = res.error.issues.length > 1 ? ` (and ${res.error.issues.length - 1} more problem${res.error.issues.length > 2 ? 's' : ''})` : '';
  return fail(`${file}${name}: ${path}: ${message}${more}`, file);
}

function fail(message: string, file: string): never {
  throw new RungsInputError(message, file);
}

function allowedKeys(path: PropertyKey[]): string | null {
  let s: z.ZodType = studySchema;
  for (const p of path) {
    const shape = (s as unknown as { shape?: Record<string, z.ZodType> }).shape;
    if (!shape || typeof p !== 'string' || !shape[p]) return null;
    s = unwrap(shape[p]);
  }
  const shape = (unwrap(s) as unknown as { shape?: Record<string, unknown> }).shape;
  return shape ? Object.keys(shape).join(', ') : null;
}

function unwrap(s: z.ZodType): z.ZodType {
  let cur = s as unknown as { unwrap?: () => z.ZodType; def?: { innerType?: z.ZodType; in?: z.ZodType } };
  for (let i = 0; i < 5; i++) {
    if (typeof cur.unwrap === 'function') cur = cur.unwrap() as never;
    else if (cur.def?.innerType) cur = cur.def.innerType as never;
    else if (cur.def?.in) cur = cur.def.in as never;
    else break;
  }
  return cur as unknown as z.ZodType;
}
