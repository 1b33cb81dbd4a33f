import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { executeStudies } from '../../src/cli/execute.ts';
import { memberName } from '../../src/study/sweep.ts';

// Sweeps over a coefficient. Facts behind the expectations: for −∇·(k∇u) = f with constant k and f derived from the
// same u, the discrete problem is the k = 1 one scaled by k, so the error of u does not depend on k (exact); vector
// P1 displacement elements lock as λ/μ grows (Babuška & Suri 1992), so their error constant grows with λ.
describe('sweeps over a coefficient', async () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-sweep-'));
  afterAll(() => rmSync(out, { recursive: true, force: true }));
  const run = await executeStudies(['test/fixtures/sweep'], { out, quiet: true });
  const bad = await executeStudies(['test/fixtures/sweep-bad'], { out: join(out, 'bad'), quiet: true });

  it('runs one study per value, named for it', () => {
    expect(run.results.map((r) => r.study).sort()).toEqual([
      ...[1, 100, 10000].map((v) => memberName('sweep-conductivity-p2', 'k', v)),
      ...[1, 100, 10000].map((v) => memberName('sweep-locking-p1', 'lambda', v)),
    ].sort());
    expect(memberName('a', 'lambda', 1e4)).toBe('a-lambda-1e4');
  });
  it('finds the conductivity sweep robust (growth 1 to round-off) and the P1 λ sweep not robust, both as declared', () => {
    const byGroup = Object.fromEntries(run.sweeps.map((v) => [v.group, v]));
    expect(byGroup['sweep-conductivity-p2'].robust).toBe(true);
    expect(Math.max(...byGroup['sweep-conductivity-p2'].findings.map((f) => f.growth))).toBeLessThan(1 + 1e-6);
    expect(byGroup['sweep-locking-p1'].robust).toBe(false);
    expect(byGroup['sweep-locking-p1'].findings.find((f) => f.norm === 'L2_u')!.growth).toBeGreaterThan(10);
    expect(run.results.every((r) => r.asExpected)).toBe(true);
    expect(run.problems).toEqual([]);
  });
  it('writes the verdict and its reason into every member', () => {
    const member = run.results.find((r) => r.study === memberName('sweep-locking-p1', 'lambda', 1e4))!;
    expect(member.robustness?.group).toBe('sweep-locking-p1');
    expect(member.warnings.join('\n')).toMatch(/sweep over lambda: L2_u: the error constant e\/h\^2 grows ×\d+.*not robust — likely locking/);
  });
  it('a sweep that expects robustness and does not find it makes its members not as expected', () => {
    const members = bad.results.filter((r) => r.robustness?.group === 'sweep-locking-unexpected');
    expect(members).toHaveLength(3);
    expect(members.every((r) => !r.asExpected)).toBe(true);
  });
  it('a sweep over a coefficient the equation does not have is bad input naming the valid ones', () => {
    expect(bad.problems.map((p) => p.message).join('\n')).toMatch(/sweep\.coefficient.*'nu' is not a scalar coefficient of this study; valid: lambda, mu/);
  });
});
