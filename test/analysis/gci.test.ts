import { describe, expect, it } from 'vitest';
import { gciTwoGrids, gridConvergenceIndex, representativeSize } from '../../src/analysis/gci.ts';
import { RungsInputError } from '../../src/errors.ts';

describe('grid convergence index (Celik et al. 2008, J. Fluids Eng. 130(7) 078001)', () => {
  // Worked example, Table 1, first column: 2-D grids of N1, N2, N3 = 18000, 8000, 4500 cells, so
  // r21 = 1.5 and r32 = 1.333; φ1, φ2, φ3 = 6.063, 5.972, 5.863. The printed results p = 1.53,
  // φ_ext21 = 6.1685, e_a21 = 1.5%, e_ext21 = 1.71%, GCI_fine21 = 2.17% are typed from memory (not re-read
  // from the paper); our computation reproduces every one of them to the printed digits, which supports the
  // recollection. Note the printed r32 = 1.333 is (8000/4500)^(1/2) = 4/3 rounded: with 1.333 itself
  // φ_ext21 would print 6.1682, not 6.1685, so the sizes come from the cell counts.
  const h = [18000, 8000, 4500].map((n) => representativeSize(1, n, 2));
  const result = gridConvergenceIndex([6.063, 5.972, 5.863], h);

  it('reproduces the refinement ratios from the cell counts', () => {
    expect(result.r21).toBeCloseTo(1.5, 12);
    expect(result.r32).toBeCloseTo(1.333, 3);
  });
  it('reproduces the printed observed order, extrapolated value, errors and GCI', () => {
    expect(Math.abs(result.order - 1.53)).toBeLessThanOrEqual(0.005);
    expect(Math.abs(result.extrapolated21 - 6.1685)).toBeLessThanOrEqual(0.00005);
    expect(Math.abs(100 * result.approxRelError21 - 1.5)).toBeLessThanOrEqual(0.05);
    expect(Math.abs(100 * result.extrapolatedRelError21 - 1.71)).toBeLessThanOrEqual(0.005);
    expect(Math.abs(100 * result.gciFine21 - 2.17)).toBeLessThanOrEqual(0.005);
    expect(result.convergence).toBe('monotone');
    expect(result.safetyFactor).toBe(1.25);
    expect(result.warnings).toEqual([]);
  });
  it('the observed order makes both grid pairs extrapolate to the same value', () => {
    // The three-grid equation for p is exactly the condition that φ = φ_ext + C h^p passes through all three
    // points (Celik et al. 2008, eqs. 2–4), so φ_ext21 = φ_ext32 (algebra, common practice).
    expect(result.extrapolated32).toBeCloseTo(result.extrapolated21, 12);
  });
  it('the asymptotic-range ratio GCI32 / (r21^p GCI21) is close to 1 (Roache 1998)', () => {
    expect(Math.abs(result.asymptoticRatio - 1)).toBeLessThan(0.05);
  });
});

describe('gridConvergenceIndex on constructed sequences', () => {
  it('on φ = A + B h^p the extrapolated value is A and GCI_fine21 = Fs |φ1 - A| / |φ1|', () => {
    // For an exact power law, e_a21 / (r^p - 1) = |φ1 - A| / |φ1| (Roache 1998, eq. 5.6.1 with eq. 5.4.1),
    // and the asymptotic ratio is |φ1| / |φ2|.
    const A = 10;
    const B = 3;
    const p = 2;
    const h = [0.1, 0.17, 0.3];
    const phi = h.map((x) => A + B * x ** p);
    const g = gridConvergenceIndex(phi, h);
    expect(g.order).toBeCloseTo(p, 10);
    expect(g.extrapolated21).toBeCloseTo(A, 10);
    expect(g.gciFine21).toBeCloseTo((1.25 * Math.abs(phi[0]! - A)) / phi[0]!, 12);
    expect(g.asymptoticRatio).toBeCloseTo(phi[0]! / phi[1]!, 10);
  });
  it('flags oscillatory convergence and small refinement ratios', () => {
    const g = gridConvergenceIndex([1.0, 1.02, 0.99], [1, 1.2, 1.44]);
    expect(g.convergence).toBe('oscillatory');
    expect(g.warnings.some((w) => w.startsWith('oscillatory convergence'))).toBe(true);
    expect(g.warnings.some((w) => w.startsWith('refinement ratio below 1.3'))).toBe(true);
  });
  it('flags divergence when the differences grow with refinement', () => {
    const g = gridConvergenceIndex([1.3, 1.1, 1.0], [1, 2, 4]);
    expect(g.convergence).toBe('divergent');
  });
  it('flags two equal values and leaves the order undetermined', () => {
    const g = gridConvergenceIndex([1, 1, 1.1], [1, 2, 4]);
    expect(g.convergence).toBe('undetermined');
    expect(g.order).toBeNaN();
  });
  it('two-grid GCI uses the safety factor 3 with an assumed order (Roache 1998)', () => {
    expect(gciTwoGrids(6.063, 5.972, 1.5, 2)).toBeCloseTo((3 * Math.abs((6.063 - 5.972) / 6.063)) / (1.5 ** 2 - 1), 14);
  });
  it('representative size is (V/N)^(1/d) (Celik et al. 2008, eq. 1)', () => {
    expect(representativeSize(8, 1000, 3)).toBeCloseTo(0.2, 14);
    expect(() => representativeSize(1, 0, 2)).toThrow(RungsInputError);
  });
  it('rejects grids given coarse first', () => {
    expect(() => gridConvergenceIndex([1, 2, 3], [3, 2, 1])).toThrow(RungsInputError);
  });
});
