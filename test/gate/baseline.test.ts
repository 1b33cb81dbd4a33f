import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import {
  baselineJson,
  compareAll,
  compareToBaseline,
  makeBaseline,
  readBaseline,
  writeBaseline,
} from '../../src/gate/baseline.ts';
import { demoResults, tileP1Patch, tileP2 } from '../report/fixture.ts';

const dir = mkdtempSync(join(tmpdir(), 'rungs-baseline-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function inputError(fn: () => unknown): RungsInputError {
  try {
    fn();
  } catch (err) {
    if (err instanceof RungsInputError) return err;
    throw err;
  }
  throw new Error('expected a RungsInputError');
}

describe('compareToBaseline', () => {
  const baseline = makeBaseline([tileP2()]);

  it('passes an unchanged run', () => {
    expect(compareToBaseline(tileP2(), baseline.studies['tile-p2'])).toEqual([]);
  });

  it('flags a seeded 10% regression at one level with a one-line message', () => {
    const run = tileP2();
    const before = run.levels[4].errors.L2;
    run.levels[4].errors.L2 = before * 1.1;
    const findings = compareToBaseline(run, baseline.studies['tile-p2']);
    expect(findings).toHaveLength(1);
    const f = findings[0];
    expect(f).toMatchObject({ kind: 'regression', severity: 'failure', study: 'tile-p2', norm: 'L2', level: 5 });
    expect(f.change).toBeCloseTo(0.1, 12);
    // Numbers with two significant digits as JS writes them: 1.6037...e-6 × 1.1 = 1.764e-6.
    expect(f.line).toBe('tile-p2  L2  level 5  1.8e-6 vs baseline 1.6e-6 (+10%)');
  });

  it('reports a growth within the tolerance as nothing and an improvement beyond it as a note', () => {
    const run = tileP2();
    run.levels[3].errors.H1semi *= 1.04;
    run.levels[2].errors.L2 *= 0.5;
    const findings = compareToBaseline(run, baseline.studies['tile-p2']);
    expect(findings).toHaveLength(1);
    expect(findings[0]).toMatchObject({ kind: 'improvement', severity: 'note', level: 3 });
    expect(findings[0].line).toMatch(/^tile-p2 {2}L2 {2}level 3 {2}\S+ vs baseline \S+ \(-50%\)$/);
  });

  it('honours a tighter tolerance given by the caller', () => {
    const run = tileP2();
    run.levels[3].errors.H1semi *= 1.04;
    const findings = compareToBaseline(run, baseline.studies['tile-p2'], { relTol: 0.01 });
    expect(findings.map((f) => f.line)).toEqual([expect.stringMatching(/^tile-p2 {2}H1semi {2}level 4 .* \(\+4\.0%\)$/)]);
  });

  it('does not compare levels that sit on a round-off floor in both runs', () => {
    const b = makeBaseline([tileP1Patch()]);
    const run = tileP1Patch();
    for (const l of run.levels) l.errors.L2 *= 3; // round-off differs between machines
    expect(compareToBaseline(run, b.studies['tile-p1-patch'])).toEqual([]);
  });

  it('names the study and the level when the ladder differs', () => {
    const other = tileP2();
    other.levels[2].h = 0.05;
    const [f] = compareToBaseline(other, baseline.studies['tile-p2']);
    expect(f.kind).toBe('ladder-mismatch');
    expect(f.severity).toBe('failure');
    expect(f.line).toContain('tile-p2');
    expect(f.line).toContain('level 3');
    expect(f.line).toContain('h 0.05 vs baseline 0.0625');

    const shorter = tileP2();
    shorter.levels.pop();
    expect(compareToBaseline(shorter, baseline.studies['tile-p2'])[0].line).toContain('4 levels vs baseline 5 levels');

    const dofs = tileP2();
    dofs.levels[1].dofs += 1;
    expect(compareToBaseline(dofs, baseline.studies['tile-p2'])[0].line).toContain('level 2  dofs 562 vs baseline 561');
  });

  it('notes studies and norms the baseline does not know, and fails on norms the run lost', () => {
    const findings = compareAll(demoResults(), baseline);
    expect(findings.filter((f) => f.kind === 'study-new').map((f) => f.study)).toEqual(['tile-p1-vertex-k', 'tile-p1-patch', 'l-tile-corner']);
    const lost = tileP2();
    lost.analyses.pop();
    for (const l of lost.levels) delete l.errors.H1semi;
    expect(compareToBaseline(lost, baseline.studies['tile-p2'])).toEqual([
      expect.objectContaining({ kind: 'norm-missing', severity: 'failure', norm: 'H1semi' }),
    ]);
  });
});

describe('baseline files', () => {
  it('round-trips make → write → read', () => {
    const path = join(dir, 'round.json');
    const baseline = makeBaseline(demoResults());
    writeBaseline(path, baseline);
    expect(readBaseline(path)).toEqual(baseline);
    expect(compareAll(demoResults(), readBaseline(path)).filter((f) => f.severity === 'failure')).toEqual([]);
  });

  it('writes sorted keys with one level per line, so that it diffs well', () => {
    const text = baselineJson(makeBaseline([tileP2(), tileP1Patch()]));
    const keysInOrder = [...text.matchAll(/^ {2}"(\w+)":/gm)].map((m) => m[1]);
    expect(keysInOrder).toEqual(['format', 'studies', 'version']);
    expect(text.indexOf('"tile-p1-patch"')).toBeLessThan(text.indexOf('"tile-p2"'));
    const levelLines = text.split('\n').filter((l) => l.includes('"level":'));
    expect(levelLines).toHaveLength(2 * 2 * 5);
    expect(levelLines[0].trim()).toMatch(/^\{ "dofs": 45, "error": [\d.e-]+, "floor": true, "h": 0\.25, "level": 1 \},?$/);
    expect(levelLines.at(-1)!.trim()).toMatch(/^\{ "dofs": 33153, "error": [\d.e-]+, "h": 0\.015625, "level": 5 \}$/);
    expect(JSON.parse(text).format).toBe('rungs-baseline');
  });

  it('keeps other studies and their tolerance when re-recording one study', () => {
    const first = makeBaseline(demoResults());
    first.studies['tile-p2'].relTol = 0.2;
    const again = makeBaseline([tileP2()], first);
    expect(Object.keys(again.studies).sort()).toEqual(Object.keys(first.studies).sort());
    expect(again.studies['tile-p2'].relTol).toBe(0.2);
  });

  it('names a missing file', () => {
    const path = join(dir, 'nope.json');
    const err = inputError(() => readBaseline(path));
    expect(err.message).toContain(path);
    expect(err.message).toContain('does not exist');
    expect(err.where).toBe(path);
  });

  it('names a file that is not JSON', () => {
    const path = join(dir, 'corrupt.json');
    writeFileSync(path, '{"format": "rungs-baseline", "studies": {');
    const err = inputError(() => readBaseline(path));
    expect(err.message).toContain(path);
    expect(err.message).toContain('not valid JSON');
  });

  it('names the field of a wrongly shaped file', () => {
    const path = join(dir, 'shape.json');
    const b = JSON.parse(baselineJson(makeBaseline([tileP2()])));
    b.studies['tile-p2'].norms.L2[3].error = 'small';
    writeFileSync(path, JSON.stringify(b));
    const err = inputError(() => readBaseline(path));
    expect(err.message).toContain(path);
    expect(err.message).toContain('studies.tile-p2.norms.L2[3].error');

    b.studies['tile-p2'].norms.L2[3].error = 1e-5;
    b.studies['tile-p2'].norms.L2[3].h = 0.07;
    writeFileSync(path, JSON.stringify(b));
    expect(inputError(() => readBaseline(path)).message).toContain('studies.tile-p2.norms.L2[3]: level 4');

    writeFileSync(path, JSON.stringify({ format: 'something-else', version: 1, studies: {} }));
    expect(inputError(() => readBaseline(path)).message).toContain('field format');
    expect(readFileSync(path, 'utf8')).toContain('something-else');
  });
});
