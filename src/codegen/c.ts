import { printNode, unwrap, type ExpressionSyntax } from './cse.ts';
import { comment, commentSafe, headerLines } from './header.ts';
import { decimal17 } from './literal.ts';
import { COLUMN, outputLabel, toleranceLines, type Prepared, type PreparedFunction } from './prepared.ts';

const CALL_C: Readonly<Record<string, string>> = { abs: 'fabs', sign: 'rungs_sign' };

/** Expression syntax of C (math.h), or of C++ (<cmath>) with `prefix` 'std::'. */
export function cSyntax(prefix = ''): ExpressionSyntax {
  return {
    num: (v) => (v < 0 || Object.is(v, -0) ? `(${decimal17(v)})` : decimal17(v)),
    arg: (name) => name,
    neg: (a) => `(-${a})`,
    bin: (op, a, b) => `(${a} ${op} ${b})`,
    ipow: (a, n) => (n === 2 ? `(${a} * ${a})` : `(${a} * ${a} * ${a})`),
    pow: (a, b) => `${prefix}pow(${unwrap(a)}, ${unwrap(b)})`,
    call: (fn, a) => (fn === 'sign' ? `rungs_sign(${a})` : `${prefix}${CALL_C[fn] ?? fn}(${a})`),
  };
}

/** Body lines of one function: (void) for unused arguments, temporaries, then the output statements. */
export function cBody(f: PreparedFunction, syntax: ExpressionSyntax, store: (k: number, text: string) => string,
  beforeOutputs: readonly string[] = []): string[] {
  const { plan } = f;
  const unused = f.fn.args.filter((a) => !plan.used.has(a));
  return [
    ...(unused.length ? [`    ${unused.map((a) => `(void)${a};`).join(' ')}`] : []),
    ...plan.temps.map((i) => `    const double ${plan.names[i]} = ${unwrap(printNode(plan, i, syntax, true))};`),
    ...beforeOutputs.map((l) => `    ${l}`),
    ...plan.outputs.map((o, k) => `    ${store(k, unwrap(printNode(plan, o, syntax)))}`),
  ];
}

const parameters = (f: PreparedFunction): string => f.fn.args.map((a) => `double ${a}`).join(', ');

export function cData(p: Prepared, file: string): string {
  const syntax = cSyntax();
  const guard = 'RUNGS_DATA_H';
  const functions = p.functions.map((f) => {
    const single = f.plan.outputs.length === 1;
    const signature = single
      ? `static inline double ${f.fn.name}(${parameters(f)})`
      : `static inline void ${f.fn.name}(${parameters(f)}, double out[])`;
    const store = (k: number, text: string): string =>
      single ? `return ${text};` : `out[${k}] = ${text}; /* ${commentSafe(f.fn.outputNames[k]).replace(/\*\//g, '* /')} */`;
    return [`/* ${commentSafe(f.fn.doc).replace(/\*\//g, '* /')} */`, signature, '{', ...cBody(f, syntax, store), '}'].join('\n');
  });
  return [
    comment(headerLines(p.bundle, file, 'One output is returned as a double; several are written to out[0 .. n-1] (the caller provides n doubles).',
      ['C99 or later; link with -lm. Every function is static inline, so the header can be included in several files.']), '//'),
    `#ifndef ${guard}`,
    `#define ${guard}`,
    '',
    '#include <math.h>',
    '',
    '/* sign with sign(0) = 0 (and NaN for NaN), as in every language rungs writes. */',
    'static inline double rungs_sign(double a) { return a > 0.0 ? 1.0 : (a < 0.0 ? -1.0 : a); }',
    '',
    functions.join('\n\n'),
    '',
    `#endif /* ${guard} */`,
    '',
  ].join('\n');
}

/** Rows of C array initialisers, one point or output set per line. */
export const cRows = (rows: readonly number[][]): string =>
  rows.map((r) => `    {${r.map(decimal17).join(', ')}}`).join(',\n');

export const callArgs = (f: PreparedFunction, row: string): string => f.fn.args.map((a) => `${row}[${COLUMN[a]}]`).join(', ');

/** The self-test main of C and C++ (the same source compiles as both; only the include and the call of several
 *  outputs differ). */
export function cSelfTest(p: Prepared, file: string, dataFile: string, cpp: boolean): string {
  const n = p.points.length;
  const rows = p.points.map((at) => [at.x, at.y, at.z, at.t, at.nx, at.ny, at.nz]);
  const tables = p.functions.map((f, j) => [
    `static const double rungs_e${j}[${n}][${f.plan.outputs.length}] = {\n${cRows(f.expected)}\n};`,
    `static const double rungs_s${j}[${f.plan.outputs.length}] = {${f.scales.map(decimal17).join(', ')}};`,
  ].join('\n'));
  const checks = p.functions.map((f, j) => {
    const name = cpp ? `rungs_data::${f.fn.name}` : f.fn.name;
    const check = (k: number, got: string): string =>
      `rungs_check("${f.fn.name}", "${outputLabel(f, k)}", rungs_i + 1, ${got}, rungs_e${j}[rungs_i][${k}], rungs_s${j}[${k}]);`;
    if (f.plan.outputs.length === 1) return `        ${check(0, `${name}(${callArgs(f, 'rungs_p')})`)}`;
    const count = f.plan.outputs.length;
    const lines = cpp
      ? [`const std::array<double, ${count}> rungs_v = ${name}(${callArgs(f, 'rungs_p')});`]
      : [`double rungs_v[${count}];`, `${name}(${callArgs(f, 'rungs_p')}, rungs_v);`];
    return `        {\n${[...lines, ...f.plan.outputs.map((_, k) => check(k, `rungs_v[${k}]`))].map((l) => `            ${l}`).join('\n')}\n        }`;
  });
  const study = JSON.stringify(commentSafe(p.bundle.study).replace(/[^\x20-\x7e]/g, '?'));
  const build = cpp ? `g++ -std=c++17 ${file} -o selftest && ./selftest` : `gcc -std=c99 ${file} -lm -o selftest && ./selftest`;
  return [
    comment([`${file}: self-test of ${dataFile} for study "${commentSafe(p.bundle.study)}", generated by rungs. Do not edit.`,
      ...toleranceLines(p), `Build and run: ${build}`], '//'),
    ...(cpp ? ['#include <array>', '#include <cmath>', '#include <cstdio>'] : ['#include <math.h>', '#include <stdio.h>']),
    `#include "${dataFile}"`,
    '',
    `static const double rungs_tolerance = 1e-12;`,
    'static int rungs_checked = 0;',
    'static int rungs_failures = 0;',
    '',
    'static void rungs_check(const char *rungs_fn, const char *rungs_output, int rungs_point, double rungs_got,',
    '                        double rungs_expected, double rungs_scale)',
    '{',
    `    const double rungs_bound = rungs_tolerance * ${cpp ? 'std::fmax(std::fabs' : 'fmax(fabs'}(rungs_expected), rungs_scale);`,
    '    rungs_checked++;',
    '    /* Written so that a NaN fails. */',
    `    if (!(${cpp ? 'std::fabs' : 'fabs'}(rungs_got - rungs_expected) <= rungs_bound)) {`,
    '        rungs_failures++;',
    '        printf("FAIL %s %s at point %d: got %.17g, expected %.17g\\n", rungs_fn, rungs_output, rungs_point, rungs_got, rungs_expected);',
    '    }',
    '}',
    '',
    `static const double rungs_points[${n}][7] = { /* x, y, z, t, nx, ny, nz */\n${cRows(rows)}\n};`,
    ...tables,
    '',
    'int main(void)',
    '{',
    `    for (int rungs_i = 0; rungs_i < ${n}; rungs_i++) {`,
    '        const double *rungs_p = rungs_points[rungs_i];',
    ...(p.functions.length ? [] : ['        (void)rungs_p;']),
    ...checks,
    '    }',
    `    printf("rungs self-test of study %s: %d values checked, %d failed\\n", ${study}, rungs_checked, rungs_failures);`,
    '    return rungs_failures > 0 ? 1 : 0;',
    '}',
    '',
  ].join('\n');
}

