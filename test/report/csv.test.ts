import { describe, expect, it } from 'vitest';
import { levelsCsv, summaryCsv, SUMMARY_COLUMNS } from '../../src/report/csv.ts';
import { csvRecords, parseCsv } from './csv-parse.ts';
import { demoResults, tileP1Patch, tileP2, tileP2TwoLevels } from './fixture.ts';

// The columns levelsCsv documents in its JSDoc, in order, for a study with L2 and H1semi and interpolation errors in H1semi.
const DOCUMENTED_LEVEL_COLUMNS = [
  'level', 'n', 'h', 'dofs', 'cells',
  'L2_error', 'L2_rate', 'H1semi_error', 'H1semi_rate',
  'H1semi_interp_error',
  'quasi_optimality',
  'solver_method', 'solver_preconditioner', 'solver_iterations', 'solver_residual', 'solver_stopped_by', 'algebraic_error', 'algebraic_target',
  't_mesh', 't_assemble', 't_solve', 't_errors', 't_total',
  'peak_rss_mb',
];

describe('levelsCsv', () => {
  const result = tileP2();
  const text = levelsCsv(result);
  const { header, records } = csvRecords(text);

  it('has the documented columns and one row per level', () => {
    expect(header).toEqual(DOCUMENTED_LEVEL_COLUMNS);
    expect(records).toHaveLength(result.levels.length);
    // Every record has as many fields as the header (RFC 4180 §2.4, Shafranovich 2005).
    for (const row of parseCsv(text).slice(1)) expect(row).toHaveLength(header.length);
  });

  it('writes numbers that read back to the very same doubles', () => {
    // ECMAScript Number-to-String gives the shortest string that parses back to the same double
    // (ECMA-262, Number::toString); the CSV must keep that full precision.
    result.levels.forEach((level, i) => {
      const r = records[i];
      expect(Number(r.level)).toBe(level.index + 1);
      expect(Number(r.h)).toBe(level.h);
      expect(Number(r.dofs)).toBe(level.dofs);
      expect(Number(r.L2_error)).toBe(level.errors.L2);
      expect(Number(r.H1semi_error)).toBe(level.errors.H1semi);
      expect(Number(r.H1semi_interp_error)).toBe(level.interpolationErrors!.H1semi);
      expect(Number(r.solver_residual)).toBe(level.solver!.relativeResidual);
      expect(Number(r.t_total)).toBe(level.seconds.total);
    });
  });

  it('gives the pairwise rate ln(e1/e2)/ln(h1/h2) and leaves the first level empty', () => {
    // Observed order between two levels, p = ln(e1/e2)/ln(h1/h2) (Roache 1998, Verification and Validation in
    // Computational Science and Engineering; from memory).
    expect(records[0].L2_rate).toBe('');
    for (let i = 1; i < records.length; i++) {
      const a = result.levels[i - 1];
      const b = result.levels[i];
      const p = Math.log(a.errors.L2 / b.errors.L2) / Math.log(a.h / b.h);
      expect(Number(records[i].L2_rate)).toBeCloseTo(p, 12);
    }
  });

  it('converts peak RSS to mebibytes (2^20 bytes)', () => {
    // 1 MiB = 2^20 bytes (IEC 80000-13).
    expect(Number(records[2].peak_rss_mb) * 1048576).toBeCloseTo(result.levels[2].peakRssBytes!, 3);
  });

  it('drops interpolation columns when no level has them and leaves absent values empty', () => {
    const patch = tileP1Patch();
    const { header: h, records: rows } = csvRecords(levelsCsv(patch));
    expect(h.some((c) => c.endsWith('_interp_error'))).toBe(false);
    expect(rows.every((r) => r.quasi_optimality === '')).toBe(true);
    expect(rows[0].solver_stopped_by).toBe('direct');
  });
});

describe('summaryCsv', () => {
  const results = [...demoResults(), tileP2TwoLevels()];
  const { header, records } = csvRecords(summaryCsv(results));

  it('has one row per study and norm with the documented columns', () => {
    expect(header).toEqual([...SUMMARY_COLUMNS]);
    expect(records).toHaveLength(results.reduce((n, r) => n + r.analyses.length, 0));
  });

  it('round-trips fitted orders and marks the one departure of the demo set', () => {
    const row = records.find((r) => r.study === 'tile-p1-vertex-k' && r.norm === 'L2')!;
    const fit = results[1].analyses[0].fit!;
    expect(Number(row.fitted)).toBe(fit.order);
    expect(Number(row.ci_low)).toBe(fit.ciLow);
    expect(row.verdict).toBe('below-order');
    expect(row.expected_verdict).toBe('on-order');
    expect(row.as_expected).toBe('false');
    expect(row.fit_levels).toBe('3 4 5');
    // Reasons contain commas; RFC 4180 quoting keeps them in one field, joined with '; '.
    expect(row.reasons).toBe(results[1].analyses[0].reasons.join('; '));
  });

  it('writes a two-point fit: empty stderr, infinite interval', () => {
    const row = records.find((r) => r.study === 'tile-p2-quick')!;
    expect(row.stderr).toBe('');
    expect(Number(row.ci_low)).toBe(-Infinity);
    expect(Number(row.ci_high)).toBe(Infinity);
  });

  it('quotes a field holding a double quote by doubling it (RFC 4180 §2.7)', () => {
    const r = tileP2();
    r.analyses[0].reasons = ['rate "jumps", then settles'];
    const text = summaryCsv([r]);
    expect(text).toContain('"rate ""jumps"", then settles"');
    expect(csvRecords(text).records[0].reasons).toBe('rate "jumps", then settles');
  });
});
