import { describe, expect, it } from 'vitest';
import { findStudyFiles, loadStudy } from '../../src/study/load.ts';
import { runStudy } from '../../src/study/runner.ts';

// Every bundled study gives the verdict it declares: on-order (or exact) for the sound discretizations, and
// below-order for each demonstration of a flaw, with a reason that points at it. The expected orders are facts of
// the trade for Lagrange elements (Brenner & Scott 2008, Thm 5.4.8); the flaws' effects are explained in each file.
const files = findStudyFiles(['studies']);

describe.each(files)('%s', async (file) => {
  const loaded = await loadStudy(file);
  const result = await runStudy(loaded);
  const d = loaded.declaration;
  it('gives the verdicts the study expects', () => {
    const summary = result.analyses.map((a) => `${a.name}: ${a.verdict} (${a.reasons[0]})`).join('\n');
    expect(result.asExpected, summary).toBe(true);
  });
  if (d.expect?.verdict === 'below-order') {
    it('explains the loss of order in words', () => {
      const below = result.analyses.filter((a) => a.verdict === 'below-order');
      expect(below.length).toBeGreaterThan(0);
      for (const a of below) expect(a.reasons.join(' ')).toMatch(/expected|order/);
    });
  }
  if (d.time && d.expect?.verdict === 'below-order') {
    it('says that the order is lost in time, and points at the stepper', () => {
      const below = result.analyses.filter((a) => a.verdict === 'below-order');
      for (const a of below) expect(a.reasons.join(' ')).toMatch(/rates in Δt are stable at .* a consistent loss of temporal order — typical of a time-stepping slip/);
    });
  }
});
