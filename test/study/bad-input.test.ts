import { describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, existsSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { executeStudies } from '../../src/cli/execute.ts';

// Every bad-input case gives one clear message naming the file and the field, and the other studies still run.
describe('bad study input', async () => {
  const out = mkdtempSync(join(tmpdir(), 'rungs-bad-'));
  const { results, problems } = await executeStudies(['test/fixtures/mixed'], { out, quiet: true });
  const msg = (file: string) => problems.find((p) => p.file.endsWith(file))?.message ?? `(no problem reported for ${file})`;

  it('still runs and writes the good study', () => {
    expect(results.map((r) => r.study)).toEqual(['fixture-good']);
    expect(existsSync(join(out, 'fixture-good.csv'))).toBe(true);
    expect(readFileSync(join(out, 'fixture-good.csv'), 'utf8').trim().split('\n')).toHaveLength(5);
  });
  it('reports one problem per bad file', () => expect(problems).toHaveLength(10));
  it('a file that throws on import', () => expect(msg('throws.study.ts')).toMatch(/throws\.study\.ts: the study file threw while loading: kiln controller offline/));
  it('no default export', () => expect(msg('no-default.study.ts')).toMatch(/no default export/));
  it('an unknown field, listing the valid ones', () => expect(msg('unknown-field.study.ts')).toMatch(/unknown field 'glaze'; valid fields here: name, description/));
  it('fewer than 2 levels', () => expect(msg('one-level.study.ts')).toMatch(/ladder\.n: a ladder needs at least 2 levels/));
  it('h not decreasing', () => expect(msg('not-decreasing.study.ts')).toMatch(/ladder\.n\[2\]: n must increase/));
  it('a formula that does not parse', () => expect(msg('bad-formula.study.ts')).toMatch(/exact.*(parenthesis|column|expected)/i));
  it('an unknown variable', () => expect(msg('unknown-variable.study.ts')).toMatch(/exact: the symbol "t" .* not allowed in 1D; valid: variables x/));
  it('a source that is NaN somewhere in the domain', () => expect(msg('nan-source.study.ts')).toMatch(/source term f .* is NaN at \(x=0\.[0-4]\d*\)/));
  it('user-given derivatives that disagree with u, naming the point', () => expect(msg('wrong-derivative.study.ts')).toMatch(/exact\.grad\[0\] disagrees with finite differences of exact at \(x=0\.\d+\): given/));
  it('a boundary tag that does not exist', () => expect(msg('unknown-tag.study.ts')).toMatch(/unknown boundary tag 'north'.*'left', 'right', 'bottom', 'top'/));
});
