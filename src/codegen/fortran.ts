import { printNode, unwrap, type ExpressionSyntax } from './cse.ts';
import { comment, commentSafe, headerLines } from './header.ts';
import { decimal17 } from './literal.ts';
import { COLUMN, outputLabel, toleranceLines, type Prepared, type PreparedFunction } from './prepared.ts';

/** Free-form lines are at most 132 characters; wrapping at 100 leaves room for the continuation marks. */
const WRAP = 100;

/** Split a long statement at spaces outside string literals, with & at the end and the start of each continuation. */
export function wrapFortran(line: string): string {
  if (line.length <= WRAP) return line;
  const indent = /^ */.exec(line)![0];
  // A comment line goes on as more comment lines; a statement as continuation lines.
  const isComment = line.trimStart().startsWith('!');
  const parts: string[] = [];
  let rest = line;
  while (rest.length > WRAP) {
    let quote = '';
    let cut = -1;
    for (let k = indent.length + 8; k < rest.length && (k < WRAP - 2 || cut < 0); k++) {
      const ch = rest[k];
      if (quote) { if (ch === quote) quote = ''; } else if (ch === "'" || ch === '"') quote = ch;
      else if (ch === '!' && !isComment) break; else if (ch === ' ') cut = k;
    }
    if (cut < 0) break;
    parts.push(isComment ? rest.slice(0, cut) : `${rest.slice(0, cut)} &`);
    rest = isComment ? `${indent}!   ${rest.slice(cut + 1)}` : `${indent}    & ${rest.slice(cut + 1)}`;
  }
  parts.push(rest);
  return parts.join('\n');
}

/** Helpers Fortran lacks, written only when some formula needs them. */
const HELPERS: Readonly<Record<'sign' | 'cbrt', string[]>> = {
  sign: [
    '  ! sign with sign(0) = 0 (and NaN for NaN); the SIGN intrinsic transfers a sign instead.',
    '  pure elemental function rungs_sign(a) result(res)',
    '    real(real64), intent(in) :: a',
    '    real(real64) :: res',
    '    if (a > 0.0_real64) then',
    '      res = 1.0_real64',
    '    else if (a < 0.0_real64) then',
    '      res = -1.0_real64',
    '    else',
    '      res = a',
    '    end if',
    '  end function rungs_sign',
  ],
  cbrt: [
    '  ! Real cube root keeping the sign of a (Fortran has none): a power, then one Newton step to full precision.',
    '  pure elemental function rungs_cbrt(a) result(res)',
    '    real(real64), intent(in) :: a',
    '    real(real64) :: res, r',
    '    r = abs(a)**(1.0_real64 / 3.0_real64)',
    '    if (r > 0.0_real64 .and. r <= huge(r)) r = r - (r * r * r - abs(a)) / (3.0_real64 * r * r)',
    '    res = sign(r, a)',
    '  end function rungs_cbrt',
  ],
};

const fLiteral = (v: number): string => (v < 0 || Object.is(v, -0) ? `(${decimal17(v)}_real64)` : `${decimal17(v)}_real64`);

export const fortranSyntax: ExpressionSyntax = {
  num: fLiteral,
  arg: (name) => name,
  neg: (a) => `(-${a})`,
  // Parentheses everywhere: a Fortran processor may regroup unparenthesised operations.
  bin: (op, a, b) => `(${a} ${op} ${b})`,
  ipow: (a, n) => (n === 2 ? `(${a} * ${a})` : `((${a} * ${a}) * ${a})`),
  pow: (a, b) => `(${a} ** ${b})`,
  call: (fn, a) => (fn === 'sign' || fn === 'cbrt' ? `rungs_${fn}(${a})` : `${fn}(${a})`),
};

function fortranFunction(f: PreparedFunction): string[] {
  const { plan, fn } = f;
  const single = plan.outputs.length === 1;
  const args = fn.args.join(', ');
  const head = single ? `pure function ${fn.name}(${args}) result(res)` : `pure subroutine ${fn.name}(${args}, out)`;
  const lines = [
    `  ! ${commentSafe(fn.doc)}`,
    `  ${head}`,
    `    real(real64), intent(in) :: ${args}`,
    single ? '    real(real64) :: res' : `    real(real64), intent(out) :: out(${plan.outputs.length})`,
    ...(plan.temps.length ? [`    real(real64) :: ${plan.temps.map((i) => plan.names[i]).join(', ')}`] : []),
    ...plan.temps.map((i) => `    ${plan.names[i]} = ${unwrap(printNode(plan, i, fortranSyntax, true))}`),
    ...plan.outputs.flatMap((o, k) => {
      const text = unwrap(printNode(plan, o, fortranSyntax));
      return single ? [`    res = ${text}`] : [`    ! ${commentSafe(fn.outputNames[k])}`, `    out(${k + 1}) = ${text}`];
    }),
    single ? `  end function ${fn.name}` : `  end subroutine ${fn.name}`,
  ];
  return lines;
}

function usesCall(p: Prepared, fn: string): boolean {
  return p.functions.some((f) => f.plan.nodes.some((n) => n.kind === 'call' && n.fn === fn));
}

export function fortranData(p: Prepared, file: string): string {
  const helpers = (['sign', 'cbrt'] as const).filter((h) => usesCall(p, h)).map((h) => HELPERS[h]);
  const names = p.functions.map((f) => f.fn.name);
  const lines = [
    comment(headerLines(p.bundle, file, 'One output: a pure function returning real(real64); several: a pure subroutine writing out(1:n).',
      ['Fortran 2008; all reals are real(real64) from iso_fortran_env. Compile this file before the code that uses the module.']), '!'),
    'module rungs_data',
    '  use, intrinsic :: iso_fortran_env, only: real64',
    '  implicit none',
    '  private',
    ...(names.length ? [`  public :: ${names.join(', ')}`] : []),
    '',
    'contains',
    '',
    ...helpers.flatMap((h) => [...h, '']),
    ...p.functions.flatMap((f) => [...fortranFunction(f), '']),
    'end module rungs_data',
    '',
  ];
  return lines.join('\n').split('\n').map(wrapFortran).join('\n');
}

const fString = (text: string): string => `'${text.replace(/'/g, "''")}'`;

export function fortranSelfTest(p: Prepared, file: string, dataFile: string): string {
  const n = p.points.length;
  const most = Math.max(1, ...p.functions.map((f) => f.plan.outputs.length));
  const arg = (f: PreparedFunction): string => f.fn.args.map((a) => `rungs_p(${COLUMN[a] + 1}, rungs_i)`).join(', ');
  const declarations = p.functions.flatMap((f, j) => [
    `  real(real64) :: rungs_e${j}(${f.plan.outputs.length}, ${n})`,
    `  real(real64), parameter :: rungs_s${j}(${f.plan.outputs.length}) = [${f.scales.map(fLiteral).join(', ')}]`,
  ]);
  const fill = [
    ...p.points.map((at, i) => `  rungs_p(:, ${i + 1}) = [${[at.x, at.y, at.z, at.t, at.nx, at.ny, at.nz].map(fLiteral).join(', ')}]`),
    ...p.functions.flatMap((f, j) => f.expected.map((row, i) => `  rungs_e${j}(:, ${i + 1}) = [${row.map(fLiteral).join(', ')}]`)),
  ];
  const checks = p.functions.flatMap((f, j) => {
    const count = f.plan.outputs.length;
    const call = count === 1 ? [`    rungs_got(1) = ${f.fn.name}(${arg(f)})`] : [`    call ${f.fn.name}(${arg(f)}, rungs_got(1:${count}))`];
    return [...call, ...f.plan.outputs.map((_, k) =>
      `    call rungs_check(${fString(f.fn.name)}, ${fString(outputLabel(f, k))}, rungs_i, rungs_got(${k + 1}), rungs_e${j}(${k + 1}, rungs_i), rungs_s${j}(${k + 1}))`)];
  });
  const study = fString(commentSafe(p.bundle.study).replace(/[^\x20-\x7e]/g, '?'));
  const lines = [
    comment([`${file}: self-test of ${dataFile} for study "${commentSafe(p.bundle.study)}", generated by rungs. Do not edit.`,
      ...toleranceLines(p), `Build and run: gfortran -std=f2008 ${dataFile} ${file} -o selftest && ./selftest`], '!'),
    'program rungs_data_selftest',
    '  use, intrinsic :: iso_fortran_env, only: real64',
    '  use rungs_data',
    '  implicit none',
    '  real(real64), parameter :: rungs_tolerance = 1.0e-12_real64',
    `  real(real64) :: rungs_p(7, ${n})  ! x, y, z, t, nx, ny, nz per point`,
    `  real(real64) :: rungs_got(${most})`,
    ...declarations,
    '  integer :: rungs_i, rungs_checked, rungs_failures',
    '  rungs_checked = 0',
    '  rungs_failures = 0',
    ...fill,
    `  do rungs_i = 1, ${n}`,
    ...checks,
    '  end do',
    `  write (*, '(3a, i0, a, i0, a)') 'rungs self-test of study ', ${study}, ': ', rungs_checked, ' values checked, ', rungs_failures, ' failed'`,
    '  if (rungs_failures > 0) error stop 1',
    '',
    'contains',
    '',
    '  subroutine rungs_check(rungs_fn, rungs_output, rungs_point, rungs_value, rungs_expected, rungs_scale)',
    '    character(len=*), intent(in) :: rungs_fn, rungs_output',
    '    integer, intent(in) :: rungs_point',
    '    real(real64), intent(in) :: rungs_value, rungs_expected, rungs_scale',
    '    real(real64) :: rungs_bound',
    '    rungs_bound = rungs_tolerance * max(abs(rungs_expected), rungs_scale)',
    '    rungs_checked = rungs_checked + 1',
    '    ! Written so that a NaN fails.',
    '    if (.not. (abs(rungs_value - rungs_expected) <= rungs_bound)) then',
    '      rungs_failures = rungs_failures + 1',
    "      write (*, '(5a, i0, a, es25.17e3, a, es25.17e3)') 'FAIL ', rungs_fn, ' ', rungs_output, ' at point ', rungs_point, &",
    "        ': got ', rungs_value, ', expected ', rungs_expected",
    '    end if',
    '  end subroutine rungs_check',
    '',
    'end program rungs_data_selftest',
    '',
  ];
  return lines.join('\n').split('\n').map(wrapFortran).join('\n');
}
