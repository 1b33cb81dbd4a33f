import { derivative, parse, type MathNode } from 'mathjs';
import { NORMAL_ARGUMENTS, POINT_ARGUMENTS, type DataBundle, type GeneratedFunction } from '../../src/codegen/types.ts';

const point = (name: string, doc: string, formulas: string[], outputNames: string[]): GeneratedFunction => ({
  name, doc, args: POINT_ARGUMENTS, outputs: formulas.map((f) => parse(f)), outputNames,
});

/** Temperature of a kiln rod cooling in time (invented): every function of a formula, nested powers, negative
 *  constants, division, unary minus, a vector output, a function of the normal, t. Arguments stay inside the real
 *  domain of every function over the box [0, 1]^3 x [0, 2], so mathjs returns plain numbers. */
const U = 'exp(-t) * sin(pi * x) * cos(2 * y) * (1 + z^2)';

export const KILN_FORMULAS: Record<string, string[]> = {
  trig: ['sin(pi * x) + cos(2 * y) * tan(z) + sec(x) - csc(y + 1) + cot(z + 0.5)'],
  arcs: ['asin(x - 0.5) + acos(y / 2) + atan(z) + acot(x + 0.1) + asec(1 + y) + acsc(2 + z)'],
  hyperbolic: ['sinh(x) + cosh(y) - tanh(z) + sech(x * y) + csch(z + 0.1) + coth(1 + x)'],
  area: ['asinh(x - y) + acosh(1 + z) + atanh(x - 0.5) + acoth(2 + y) + asech(y / 2 + 0.1) + acsch(x + 0.5)'],
  misc: ['exp(-x) * log(1 + y) + log(2 + z, 3) + log10(1 + x) + sqrt(y) + cbrt(x - 0.5) + abs(y - 0.5) + sign(z - 0.5) + pow(x, 1.5) + pow(1 + y, -0.5)'],
  powers: ['(x^2 + y^3)^(1/2) * (1 + z)^(-2.5) + 2^(x^2) - (x - 0.5)^3 + x^(y^2) + (-0.5)^2 * x + -x^2 + (y + 1)^2^3 + (x - 1.5)^(-2) + e^x + pi^2 * pow(z - 0.5, 2)'],
  ratios: ['(x - y) / (1 + x * y) / (2 + z) - -(-x) + +y - 3 / (1 + t) - 3.25e-3 * x + 6.02e23 * 1e-23 * y + 0.1 * z - 1 / 3'],
  signs: ['sign(x - 0.5) * cbrt(z - 0.5) + sign(0 * y)'],
};

export function kilnBundle(): DataBundle {
  const u = parse(U);
  const grad = ['x', 'y', 'z'].map((v) => derivative(u, v) as MathNode);
  const functions: GeneratedFunction[] = [
    point('exact_u', 'exact temperature of the rod', [U], ['u']),
    { name: 'grad_u', doc: 'gradient of the exact temperature', args: POINT_ARGUMENTS, outputs: grad, outputNames: ['u_x', 'u_y', 'u_z'] },
    ...Object.entries(KILN_FORMULAS).map(([name, f]) => point(`kiln_${name}`, `test formula ${name}`, f, ['v'])),
    point('glaze_coefficients', 'conductivity (a constant) and reaction of the glaze', ['2.5', '1 + x * y'], ['k', 'c']),
    {
      name: 'flux_n', doc: 'heat flux through the tile face', args: NORMAL_ARGUMENTS,
      outputs: [parse('(1 + x) * (cos(pi * x) * nx + sin(y) * ny + z^2 * nz) + t')], outputNames: ['q'],
    },
  ];
  return { study: 'kiln-rod "cooling" \\ test', dim: 3, hasTime: true, functions };
}

/** Interval of the sample points: inside the real domain of every formula above. */
export const KILN_BOX = { x: [0, 1], y: [0, 1], z: [0, 1], t: [0, 2] } as const;
