import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

// The three complete examples of docs/verify-your-discretization.md, run as a user runs them: through the rungs
// command, from a folder of their own (so the external solver's "./kiln_rod_solver.py" must be found next to the
// study file, not in the folder rungs runs in).
const ROOT = resolve(import.meta.dirname, '../..');
const EXAMPLES = join(ROOT, 'docs/examples');

interface JsonStudy {
  study: string;
  complete: boolean;
  asExpected: boolean;
  levels: { n: number; h: number; errors: Record<string, number> }[];
  analyses: { name: string; verdict: string; fitted?: number; expected?: number | null }[];
}

function runExamples(): { status: number | null; studies: JsonStudy[]; stderr: string } {
  const cwd = mkdtempSync(join(tmpdir(), 'rungs-guide-'));
  const r = spawnSync(process.execPath, [join(ROOT, 'bin/rungs.mjs'), 'run', EXAMPLES, '--json', '--out', join(cwd, 'reports')], {
    cwd, encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' },
  });
  let studies: JsonStudy[] = [];
  try { studies = JSON.parse(r.stdout) as JsonStudy[]; } catch { /* reported by the status check below */ }
  return { status: r.status, studies, stderr: r.stderr };
}

describe('the guide\'s examples', () => {
  const run = runExamples();
  const byName = new Map(run.studies.map((s) => [s.study, s]));

  it('all three run from another folder and give the verdicts the guide states', () => {
    expect({ status: run.status, stderr: run.stderr }).toEqual({ status: 0, stderr: expect.any(String) });
    // Expected orders for Lagrange elements of degree p in the smooth case: p + 1 in L2, p in the H1 seminorm
    // (Ciarlet 1978, Thm 3.2.2 and §3.2, Aubin–Nitsche).
    const verdicts = Object.fromEntries(run.studies.map((s) => [s.study, [s.complete, s.asExpected, ...s.analyses.map((a) => `${a.name} ${a.verdict}`)]]));
    expect(verdicts).toEqual({
      'guide-tile-glaze-p2': [true, true, 'L2 on-order', 'H1semi on-order'],
      'guide-kiln-rod-own-p1': [true, true, 'L2 on-order', 'H1semi on-order'],
      'guide-kiln-rod-python': [true, true, 'L2 on-order', 'H1semi on-order'],
    });
  });

  it('the TypeScript and the Python rod solvers, written apart, agree level by level', () => {
    // Same method (P1, 2-point Gauss load, Dirichlet ends) in two languages: the errors rungs measures must agree to
    // round-off of the solves (common practice, no source: independent implementations as a cross-check).
    const own = byName.get('guide-kiln-rod-own-p1')!, py = byName.get('guide-kiln-rod-python')!;
    const worst = Math.max(...own.levels.flatMap((l, i) => ['L2', 'H1semi'].map((nm) => Math.abs(l.errors[nm]! - py.levels[i]!.errors[nm]!) / l.errors[nm]!)));
    expect(worst).toBeLessThan(1e-9);
  });

  it('the rod\'s H1-seminorm error matches the asymptotic constant of linear interpolation', () => {
    // For P1 in 1D the Galerkin solution of −(k u′)′ = f is close to the interpolant, and the interpolant's derivative
    // error is h/√12 · ‖u″‖_L2 + O(h²) on a uniform mesh (from memory; it follows from the error of the secant slope,
    // u′ − (secant) ≈ u″(x_mid)(x − x_mid), whose mean square over a cell is u″² h²/12).
    const u2 = (x: number) => {
      // u = e^{−x} sin 3x + x  →  u″ = e^{−x}(−8 sin 3x − 6 cos 3x)
      return Math.exp(-x) * (-8 * Math.sin(3 * x) - 6 * Math.cos(3 * x));
    };
    // ‖u″‖² by composite Simpson with 2000 panels (error far below the 1% asked here).
    const m = 2000;
    let s = 0;
    for (let i = 0; i <= m; i++) s += (i === 0 || i === m ? 1 : i % 2 ? 4 : 2) * u2(i / m) ** 2;
    const norm = Math.sqrt(s / (3 * m));
    const finest = byName.get('guide-kiln-rod-own-p1')!.levels.at(-1)!;
    expect(finest.errors.H1semi! / (finest.h / Math.sqrt(12) * norm)).toBeCloseTo(1, 2);
  });
});
