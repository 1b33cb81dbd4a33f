import type { DataBundle } from '../../src/codegen/types.ts';

/** Column of each argument in a point row. */
const COLUMN: Record<string, number> = { x: 0, y: 1, z: 2, t: 3, nx: 4, ny: 5, nz: 6 };

/** Programs that read "n" then n rows of x y z t nx ny nz from standard input and print, per point, every output of
 *  every function (in bundle order), one value per line with 17 significant digits. */
export function cDriver(bundle: DataBundle, cpp: boolean): string {
  const calls = bundle.functions.map((f) => {
    const args = f.args.map((a) => `p[${COLUMN[a]}]`).join(', ');
    if (f.outputs.length === 1) return `    printf("%.17g\\n", ${cpp ? 'rungs_data::' : ''}${f.name}(${args}));`;
    const n = f.outputs.length;
    return cpp
      ? `    { const auto v = rungs_data::${f.name}(${args}); for (int k = 0; k < ${n}; k++) printf("%.17g\\n", v[k]); }`
      : `    { double v[${n}]; ${f.name}(${args}, v); for (int k = 0; k < ${n}; k++) printf("%.17g\\n", v[k]); }`;
  });
  return [
    '#include <stdio.h>',
    `#include "${cpp ? 'rungs_data.hpp' : 'rungs_data.h'}"`,
    'int main(void) {',
    '  int n;',
    '  if (scanf("%d", &n) != 1) return 2;',
    '  for (int i = 0; i < n; i++) {',
    '    double p[7];',
    '    for (int k = 0; k < 7; k++) if (scanf("%lf", &p[k]) != 1) return 2;',
    ...calls,
    '  }',
    '  return 0;',
    '}',
    '',
  ].join('\n');
}

export function fortranDriver(bundle: DataBundle): string {
  const calls = bundle.functions.map((f) => {
    const args = f.args.map((a) => `drv_p(${COLUMN[a] + 1})`).join(', ');
    if (f.outputs.length === 1) return `    write (*, '(es26.17e3)') ${f.name}(${args})`;
    return `    call ${f.name}(${args}, drv_v(1:${f.outputs.length}))\n    write (*, '(es26.17e3)') drv_v(1:${f.outputs.length})`;
  });
  return [
    'program driver',
    '  use, intrinsic :: iso_fortran_env, only: real64',
    '  use rungs_data',
    '  implicit none',
    '  integer :: drv_n, drv_i',
    '  real(real64) :: drv_p(7), drv_v(16)',
    '  read (*, *) drv_n',
    '  do drv_i = 1, drv_n',
    '    read (*, *) drv_p',
    ...calls,
    '  end do',
    'end program driver',
    '',
  ].join('\n');
}

/** Vectorised: every function is called once on the arrays of all points, then the values are interleaved per point
 *  (a constant output comes back as an array of the broadcast shape too). */
export function pythonDriver(bundle: DataBundle): string {
  const calls = bundle.functions.map((f) => {
    const args = f.args.map((a) => `c[${COLUMN[a]}]`).join(', ');
    return f.outputs.length === 1 ? `cols.append(${f.name}(${args}))` : `cols.extend(${f.name}(${args}))`;
  });
  return [
    'import sys',
    'import numpy as np',
    `from rungs_data import ${bundle.functions.map((f) => f.name).join(', ')}`,
    'n = int(sys.stdin.readline())',
    'c = np.loadtxt(sys.stdin, ndmin=2).T',
    'cols = []',
    ...calls,
    'values = np.column_stack([np.broadcast_to(v, (n,)) for v in cols])',
    'sys.stdout.write("\\n".join("%.17g" % v for v in values.ravel()) + "\\n")',
    '',
  ].join('\n');
}

/** Without NumPy (its import blocked): every function called point by point with plain floats, which the data file
 *  then evaluates through the math module. */
export function pythonScalarDriver(bundle: DataBundle): string {
  const calls = bundle.functions.map((f) => {
    const args = f.args.map((a) => `p[${COLUMN[a]}]`).join(', ');
    return f.outputs.length === 1 ? `    row.append(${f.name}(${args}))` : `    row.extend(${f.name}(${args}))`;
  });
  return [
    'import sys',
    'sys.modules["numpy"] = None  # import numpy now raises ImportError',
    `import rungs_data`,
    `from rungs_data import ${bundle.functions.map((f) => f.name).join(', ')}`,
    'assert not rungs_data._RUNGS_NUMPY',
    'n = int(sys.stdin.readline())',
    'out = []',
    'for _ in range(n):',
    '    p = [float(v) for v in sys.stdin.readline().split()]',
    '    row = []',
    ...calls,
    '    assert all(type(v) is float for v in row)',
    '    out.extend("%.17g" % v for v in row)',
    'sys.stdout.write("\\n".join(out) + "\\n")',
    '',
  ].join('\n');
}

export function javaScriptDriver(bundle: DataBundle, dataFile: string): string {
  const calls = bundle.functions.map((f) => {
    const args = f.args.map((a) => `p[${COLUMN[a]}]`).join(', ');
    return f.outputs.length === 1 ? `  out.push(${f.name}(${args}));` : `  out.push(...${f.name}(${args}));`;
  });
  return [
    "import { readFileSync } from 'node:fs';",
    `import { ${bundle.functions.map((f) => f.name).join(', ')} } from './${dataFile}';`,
    "const numbers = readFileSync(0, 'utf8').trim().split(/\\s+/).map(Number);",
    'const n = numbers[0];',
    'const out = [];',
    'for (let i = 0; i < n; i++) {',
    '  const p = numbers.slice(1 + 7 * i, 8 + 7 * i);',
    ...calls,
    '}',
    "process.stdout.write(out.map((v) => v.toPrecision(17)).join('\\n') + '\\n');",
    '',
  ].join('\n');
}
