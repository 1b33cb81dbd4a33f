import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { fromFunctions, type FunctionInput } from '../../src/exact/functions.ts';
import type { ScalarFn } from '../../src/exact/types.ts';

const PI = Math.PI;

// u = sin(πx) sin(πy): ∇u = π(cos πx sin πy, sin πx cos πy), −Δu = 2π² u (calculus, derived by hand).
const SINE_2D: FunctionInput = {
  dim: 2,
  u: (x, y) => Math.sin(PI * x) * Math.sin(PI * y),
  grad: (x, y, _z, out) => {
    out[0] = PI * Math.cos(PI * x) * Math.sin(PI * y);
    out[1] = PI * Math.sin(PI * x) * Math.cos(PI * y);
  },
  f: (x, y) => 2 * PI * PI * Math.sin(PI * x) * Math.sin(PI * y),
};

function messageOf(run: () => unknown): string {
  try {
    run();
  } catch (err) {
    expect(err).toBeInstanceOf(RungsInputError);
    return (err as Error).message;
  }
  throw new Error('expected a RungsInputError');
}

describe('fromFunctions: consistent input is accepted', () => {
  it('wraps u, grad, f with default coefficients and computes the flux k∇u·n', () => {
    const s = fromFunctions(SINE_2D, 'exact');
    expect(s.origin).toBe('functions');
    expect(s.polynomialDegree).toBeNull();
    expect(s.kDegreeHint).toBe(0);
    expect(s.k(0.3, 0.2, 0)).toBe(1);
    const [x, y] = [0.3, 0.2];
    expect(s.flux(x, y, 0, 0, -1, 0)).toBeCloseTo(-PI * Math.sin(PI * x) * Math.cos(PI * y), 14);
  });

  it('accepts a rapidly varying correct solution, u = sin(20πx) in 1D (the base step alone is off by ~2e-5; halved steps resolve it)', () => {
    const w = 20 * PI;
    expect(() =>
      fromFunctions({
        dim: 1,
        u: (x) => Math.sin(w * x),
        grad: (x, _y, _z, out) => { out[0] = w * Math.cos(w * x); },
        f: (x) => w * w * Math.sin(w * x),
      }),
    ).not.toThrow();
  });

  it('accepts variable k, b, c in 3D and a grad that returns an array', () => {
    // u = xyz + e^z, k = 1 + x: ∇·(k∇u) = kΔu + ∂x k·∂x u = (1 + x) e^z + yz;
    // b = (1, y, 0), c = x: f = −(1 + x) e^z − yz + yz + xyz + x(xyz + e^z) = −e^z + xyz + x²yz.
    const s = fromFunctions(
      {
        dim: 3,
        u: (x, y, z) => x * y * z + Math.exp(z),
        grad: (x, y, z) => [y * z, x * z, x * y + Math.exp(z)],
        f: (x, y, z) => -Math.exp(z) + x * y * z + x * x * y * z,
        k: (x) => 1 + x,
        b: (_x, y, _z, out) => { out[0] = 1; out[1] = y; out[2] = 0; },
        c: (x) => x,
      },
      'exact',
      { box: [[-1, 1], [0, 2], [0, 1]] },
    );
    const g = new Float64Array(3);
    s.grad(0.5, 1, 0, g);
    expect([g[0], g[1], g[2]]).toEqual([0, 0, 1.5]);
  });

  it('accepts constant coefficients given as numbers (1D convection–reaction)', () => {
    // u = sin(3x) + x², k = 2, b = 4, c = 5: f = 23 sin 3x + 12 cos 3x + 5x² + 8x − 4 (derived in manufactured.test.ts).
    const s = fromFunctions({
      dim: 1,
      u: (x) => Math.sin(3 * x) + x * x,
      grad: (x, _y, _z, out) => { out[0] = 3 * Math.cos(3 * x) + 2 * x; },
      f: (x) => 23 * Math.sin(3 * x) + 12 * Math.cos(3 * x) + 5 * x * x + 8 * x - 4,
      k: 2,
      b: [4],
      c: 5,
    });
    expect(s.formulas.k).toBe('2');
  });
});

describe('fromFunctions: inconsistent input is refused, naming the point and the quantity', () => {
  it('grad[1] with the wrong sign', () => {
    const message = messageOf(() =>
      fromFunctions(
        {
          ...SINE_2D,
          grad: (x, y, _z, out) => {
            out[0] = PI * Math.cos(PI * x) * Math.sin(PI * y);
            out[1] = -PI * Math.sin(PI * x) * Math.cos(PI * y);
          },
        },
        'exact',
      ),
    );
    expect(message).toMatch(/^exact\.grad\[1\] disagrees with finite differences of exact\.u at \(x=[0-9.]+, y=[0-9.]+\): given /);
    // Both values are reported and are each other's negative (up to the finite-difference error).
    const given = Number(/given (\S+),/.exec(message)?.[1]);
    const reference = Number(/finite differences (\S+) \(/.exec(message)?.[1]);
    expect(given).toBeCloseTo(-reference, 8);
  });

  it('a gradient off by a relative 1e-4 is refused, one off by 1e-9 is accepted (tolerance 1e-6)', () => {
    const scaled = (factor: number): FunctionInput => ({
      ...SINE_2D,
      grad: (x, y, _z, out) => {
        out[0] = factor * PI * Math.cos(PI * x) * Math.sin(PI * y);
        out[1] = PI * Math.sin(PI * x) * Math.cos(PI * y);
      },
    });
    expect(messageOf(() => fromFunctions(scaled(1 + 1e-4)))).toMatch(/^grad\[0\] disagrees/);
    expect(() => fromFunctions(scaled(1 + 1e-9))).not.toThrow();
  });

  it('f missing a factor 2', () => {
    const f: ScalarFn = (x, y) => PI * PI * Math.sin(PI * x) * Math.sin(PI * y);
    const message = messageOf(() => fromFunctions({ ...SINE_2D, f }, { f: 'source' }));
    expect(message).toMatch(/^source disagrees with −∇·\(k∇u\) \+ b·∇u \+ c·u .* at \(x=[0-9.]+, y=[0-9.]+\): given /);
  });

  it('f that forgot the reaction term', () => {
    const message = messageOf(() => fromFunctions({ ...SINE_2D, c: 3 }));
    expect(message).toMatch(/^f disagrees/);
  });

  it('non-finite values and wrong types', () => {
    expect(messageOf(() => fromFunctions({ ...SINE_2D, u: () => NaN }))).toMatch(/^u is NaN at \(x=/);
    expect(messageOf(() => fromFunctions({ ...SINE_2D, f: 'x' as unknown as ScalarFn }, 'exact'))).toMatch(/^exact\.f: expected a function/);
    expect(messageOf(() => fromFunctions({ ...SINE_2D, b: [1] }))).toMatch(/^b: expected 2 finite numbers/);
  });
});
