import { printNode, unwrap, type ExpressionSyntax } from './cse.ts';
import { comment, commentSafe, headerLines } from './header.ts';
import { decimal17 } from './literal.ts';
import { outputLabel, toleranceLines, type Prepared } from './prepared.ts';

const NUMPY: Readonly<Record<string, string>> = { asin: 'arcsin', acos: 'arccos', atan: 'arctan', asinh: 'arcsinh', acosh: 'arccosh', atanh: 'arctanh' };

const pyLiteral = (v: number): string => (v < 0 || Object.is(v, -0) ? `(${decimal17(v)})` : decimal17(v));

export const pythonSyntax: ExpressionSyntax = {
  num: pyLiteral,
  arg: (name) => name,
  neg: (a) => `(-${a})`,
  bin: (op, a, b) => `(${a} ${op} ${b})`,
  ipow: (a, n) => (n === 2 ? `(${a} * ${a})` : `(${a} * ${a} * ${a})`),
  // np.power, not **: Python's own ** on two floats gives a complex number for a negative base.
  pow: (a, b) => `np.power(${unwrap(a)}, ${unwrap(b)})`,
  call: (fn, a) => `np.${NUMPY[fn] ?? fn}(${a})`,
};

const pyString = (text: string): string => JSON.stringify(text);

/** NumPy when present; otherwise a namespace of the same names over the math module, for scalar arguments (a solver
 *  in plain Python need not install NumPy). Domain errors give nan and overflow inf, as NumPy does. */
const SCALAR_FALLBACK: readonly string[] = [
  'import os as _os',
  '',
  'try:',
  '    if _os.environ.get("RUNGS_DATA_SCALAR") == "1":  # a solver working on plain floats asks for the math module',
  '        raise ImportError("RUNGS_DATA_SCALAR=1")',
  '    import numpy as np',
  '    _RUNGS_NUMPY = True',
  'except ImportError:',
  '    import math as _math',
  '',
  '    def _rungs_safe(f):',
  '        def call(*a):',
  '            try:',
  '                return f(*a)',
  '            except ValueError:',
  '                return float("nan")',
  '            except OverflowError:',
  '                return float("inf")',
  '        return call',
  '',
  '    class _RungsScalarMath:',
  '        """The NumPy names the generated functions use, for plain floats."""',
  '        float64 = float',
  '        asarray = staticmethod(lambda v, dtype=None: float(v))',
  '        power = staticmethod(_rungs_safe(_math.pow))',
  '        sign = staticmethod(lambda v: float((v > 0) - (v < 0)) if v == v else v)',
  '        cbrt = staticmethod(lambda v: _math.copysign(abs(v) ** (1.0 / 3.0), v))',
  '        abs = staticmethod(abs)',
  '',
  '    for _name, _f in [("sin", "sin"), ("cos", "cos"), ("tan", "tan"), ("arcsin", "asin"), ("arccos", "acos"),',
  '                      ("arctan", "atan"), ("sinh", "sinh"), ("cosh", "cosh"), ("tanh", "tanh"), ("arcsinh", "asinh"),',
  '                      ("arccosh", "acosh"), ("arctanh", "atanh"), ("exp", "exp"), ("log", "log"), ("log10", "log10"),',
  '                      ("sqrt", "sqrt")]:',
  '        setattr(_RungsScalarMath, _name, staticmethod(_rungs_safe(getattr(_math, _f))))',
  '    np = _RungsScalarMath()',
  '    _RUNGS_NUMPY = False',
];

export function pythonData(p: Prepared, file: string): string {
  const functions = p.functions.map(({ fn, plan }) => {
    const args = fn.args.join(', ');
    const single = plan.outputs.length === 1;
    const outs = plan.outputs.map((o) => `_rungs_shaped(${unwrap(printNode(plan, o, pythonSyntax))}, ${args})`);
    return [
      `def ${fn.name}(${args}):`,
      `    """${commentSafe(fn.doc).replace(/"/g, "'")}. Returns ${single ? fn.outputNames[0] : `(${fn.outputNames.join(', ')})`}."""`
        .replace(/\.\./g, '.'),
      // Arrays even for scalar arguments, so division by zero and out-of-domain calls follow NumPy (inf, nan).
      ...fn.args.filter((a) => plan.used.has(a)).map((a) => `    ${a} = np.asarray(${a}, dtype=np.float64)`),
      ...plan.temps.map((i) => `    ${plan.names[i]} = ${unwrap(printNode(plan, i, pythonSyntax, true))}`),
      single ? `    return ${outs[0]}` : `    return (\n${outs.map((o) => `        ${o},`).join('\n')}\n    )`,
    ].join('\n');
  });
  return [
    comment(headerLines(p.bundle, file,
      'Arguments may be NumPy arrays or scalars (broadcast together); each output is a float64 array of the broadcast shape ' +
      '(a NumPy float for scalar arguments). Several outputs are returned as a tuple, in the order listed.',
      ['Uses NumPy when it is installed; without it, or with RUNGS_DATA_SCALAR=1 in the environment (much faster on',
        'single floats), scalar arguments only, through the math module (a domain error gives nan, as in NumPy; a',
        'division by zero raises ZeroDivisionError). Python 3.8 or later.']), '#'),
    ...SCALAR_FALLBACK,
    '',
    '',
    'def _rungs_shaped(value, *args):',
    '    """value as float64 of the broadcast shape of the arguments (a constant output becomes an array too)."""',
    '    if not _RUNGS_NUMPY:',
    '        return float(value)',
    '    shape = np.broadcast_shapes(*(np.shape(a) for a in args))',
    '    result = np.array(np.broadcast_to(np.asarray(value, dtype=np.float64), shape))',
    '    return result[()] if result.ndim == 0 else result',
    '',
    '',
    ...functions.flatMap((f) => [f, '', '']),
  ].join('\n').replace(/\n\n\n$/, '\n');
}

export function pythonSelfTest(p: Prepared, file: string, dataFile: string): string {
  const module = dataFile.replace(/\.py$/, '');
  const rows = p.points.map((at) => `    [${[at.x, at.y, at.z, at.t, at.nx, at.ny, at.nz].map(decimal17).join(', ')}],`);
  const checks = p.functions.flatMap((f) => {
    const args = f.fn.args.map((a) => `rungs_columns["${a}"]`).join(', ');
    const scalarArgs = f.fn.args.map((a) => `float(rungs_columns["${a}"][0])`).join(', ');
    const single = f.plan.outputs.length === 1;
    const expected = f.expected[0].map((_, k) => `np.array([${f.expected.map((row) => decimal17(row[k])).join(', ')}])`);
    return [
      `rungs_got = ${f.fn.name}(${args})`,
      `rungs_one = ${f.fn.name}(${scalarArgs})`,
      ...f.plan.outputs.flatMap((_, k) => {
        const got = single ? 'rungs_got' : `rungs_got[${k}]`;
        const one = single ? 'rungs_one' : `rungs_one[${k}]`;
        return [
          `rungs_expected = ${expected[k]}`,
          `rungs_check(${pyString(f.fn.name)}, ${pyString(outputLabel(f, k))}, ${got}, rungs_expected, ${decimal17(f.scales[k])})`,
          `rungs_check(${pyString(f.fn.name)}, ${pyString(outputLabel(f, k) + ' (scalar call)')}, np.array([${one}]), rungs_expected[:1], ${decimal17(f.scales[k])})`,
        ];
      }),
    ];
  });
  return [
    comment([`${file}: self-test of ${dataFile} for study "${commentSafe(p.bundle.study)}", generated by rungs. Do not edit.`,
      ...toleranceLines(p), 'The functions are called once on arrays of all points and once on the scalars of the first point.',
      `Run: python3 ${file} (with ${dataFile} beside it)`], '#'),
    'import sys',
    '',
    'import numpy as np',
    '',
    ...(p.functions.length ? [`from ${module} import ${p.functions.map((f) => f.fn.name).join(', ')}`, ''] : []),
    'RUNGS_TOLERANCE = 1e-12',
    `RUNGS_POINTS = np.array([  # x, y, z, t, nx, ny, nz\n${rows.join('\n')}\n])`,
    'rungs_columns = dict(zip(["x", "y", "z", "t", "nx", "ny", "nz"], RUNGS_POINTS.T))',
    'rungs_counts = {"checked": 0, "failed": 0}',
    '',
    '',
    'def rungs_check(function, output, got, expected, scale):',
    '    got = np.broadcast_to(np.asarray(got, dtype=np.float64), expected.shape)',
    '    bound = RUNGS_TOLERANCE * np.maximum(np.abs(expected), scale)',
    '    bad = ~(np.abs(got - expected) <= bound)  # written so that a NaN fails',
    '    rungs_counts["checked"] += expected.size',
    '    rungs_counts["failed"] += int(np.count_nonzero(bad))',
    '    for i in np.flatnonzero(bad):',
    '        print(f"FAIL {function} {output} at point {i + 1}: got {got[i]:.17g}, expected {expected[i]:.17g}")',
    '',
    '',
    ...checks,
    `print(f"rungs self-test of study ${commentSafe(p.bundle.study).replace(/[^\x20-\x7e]/g, '?').replace(/["\\{}]/g, '_')}: ` +
      '{rungs_counts[\'checked\']} values checked, {rungs_counts[\'failed\']} failed")',
    'sys.exit(1 if rungs_counts["failed"] > 0 else 0)',
    '',
  ].join('\n');
}
