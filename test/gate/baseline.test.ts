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
    // Another ladder means the baseline cannot vouch for the run: bad input, not a regression.
    expect(f.severity).toBe('error');
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

  it('fails with an error on studies and norms the baseline lacks, and with a failure on norms the run lost', () => {
    const findings = compareAll(demoResults(), baseline);
    const unknown = findings.filter((f) => f.kind === 'study-new');
    expect(unknown.map((f) => f.study)).toEqual(['tile-p1-vertex-k', 'tile-p1-patch', 'l-tile-corner']);
    expect(unknown.every((f) => f.severity === 'error' && f.line.includes('not in the baseline; record it'))).toBe(true);
    const lost = tileP2();
    lost.analyses.pop();
    for (const l of lost.levels) delete l.errors.H1semi;
    expect(compareToBaseline(lost, baseline.studies['tile-p2'])).toEqual([
      expect.objectContaining({ kind: 'norm-missing', severity: 'failure', norm: 'H1semi' }),
    ]);
    const thinner = makeBaseline([tileP2()]);
    delete thinner.studies['tile-p2'].norms.H1semi;
    expect(compareToBaseline(tileP2(), thinner.studies['tile-p2'])).toEqual([
      expect.objectContaining({ kind: 'norm-new', severity: 'error', norm: 'H1semi', line: expect.stringContaining('not in the baseline') }),
    ]);
  });

  it('fails with an error when a norm of the baseline lacks levels the run measured', () => {
    const holed = makeBaseline([tileP2()]);
    holed.studies['tile-p2'].norms.L2 = holed.studies['tile-p2'].norms.L2.filter((r) => r.level < 4);
    const findings = compareToBaseline(tileP2(), holed.studies['tile-p2']);
    expect(findings).toEqual([expect.objectContaining({ kind: 'level-new', severity: 'error', norm: 'L2' })]);
    expect(findings[0].line).toBe('tile-p2  L2  levels 4–5 measured by this run but not in the baseline; record it again (--update-baseline) from a trusted run');
  });

  it('is an error when the baseline holds fewer levels than the run (recorded with --quick)', () => {
    const short = tileP2();
    short.levels.splice(3);
    const b = makeBaseline([short]);
    const [f, ...rest] = compareToBaseline(tileP2(), b.studies['tile-p2'], { partial: true });
    expect(rest).toEqual([]);
    expect(f).toMatchObject({ kind: 'baseline-short', severity: 'error' });
    expect(f.line).toContain('5 levels vs baseline 3 levels: the baseline lacks levels 4–5');
  });

  it('--quick compares the levels it ran with the first levels of a full baseline, and says how many', () => {
    const quick = tileP2();
    quick.levels.splice(3);
    const entry = baseline.studies['tile-p2'];
    expect(compareToBaseline(quick, entry, { partial: true })).toEqual([
      expect.objectContaining({ kind: 'partial', severity: 'note', level: 3, baseline: 5, line: "tile-p2  compared levels 1–3 of the baseline's 5 (--quick)" }),
    ]);
    // A regression on a level it ran is still found; without --quick the shorter run is another ladder.
    quick.levels[1].errors.L2 *= 1.2;
    const found = compareToBaseline(quick, entry, { partial: true });
    expect(found.filter((f) => f.severity === 'failure')).toEqual([expect.objectContaining({ kind: 'regression', norm: 'L2', level: 2 })]);
    expect(compareToBaseline(quick, entry)).toEqual([expect.objectContaining({ kind: 'ladder-mismatch', severity: 'error' })]);
  });

  it('warns about a changed declaration, saying whether the errors still match', () => {
    const [a, b] = ['sha256:' + 'a'.repeat(64), 'sha256:' + 'b'.repeat(64)];
    const recorded = makeBaseline([tileP2()], undefined, { 'tile-p2': { declaration: a } }).studies['tile-p2'];
    expect(recorded.declaration).toBe(a);
    expect(compareToBaseline(tileP2(), recorded, { declaration: a })).toEqual([]);

    const same = compareToBaseline(tileP2(), recorded, { declaration: b });
    expect(same).toEqual([expect.objectContaining({ kind: 'declaration-changed', severity: 'warning' })]);
    expect(same[0].line).toBe(`tile-p2  declaration changed since the baseline was recorded (${'a'.repeat(12)} → ${'b'.repeat(12)}), but its errors still match the baseline: if the change was intended, record the baseline again (--update-baseline)`);

    const moved = tileP2();
    moved.levels[4].errors.L2 *= 2;
    const both = compareToBaseline(moved, recorded, { declaration: b });
    expect(both.map((f) => [f.kind, f.severity])).toEqual([['regression', 'failure'], ['declaration-changed', 'warning']]);
    expect(both[1].line).toContain('the differences above may come from that change');

    const old = makeBaseline([tileP2()]).studies['tile-p2'];
    expect(compareToBaseline(tileP2(), old, { declaration: b })).toEqual([expect.objectContaining({ kind: 'declaration-unrecorded', severity: 'note' })]);
  });

  it('uses the tolerance the study declares over the recorded one, and records it', () => {
    const run = tileP2();
    run.levels[4].errors.L2 *= 1.08; // beyond the default 5%, within a declared 10%
    const entry = makeBaseline([tileP2()]).studies['tile-p2'];
    expect(compareAll([run], { format: 'rungs-baseline', version: 1, studies: { 'tile-p2': entry } }, { facts: { 'tile-p2': { relTol: 0.1 } } })).toEqual([]);
    expect(compareToBaseline(run, entry).map((f) => f.kind)).toEqual(['regression']);
    expect(makeBaseline([tileP2()], undefined, { 'tile-p2': { relTol: 0.1 } }).studies['tile-p2'].relTol).toBe(0.1);
  });

  it('notes a study of the baseline this run did not run', () => {
    const b = makeBaseline([tileP2(), tileP1Patch()]);
    expect(compareAll([tileP2()], b)).toEqual([
      expect.objectContaining({ kind: 'study-not-run', severity: 'note', study: 'tile-p1-patch', line: 'tile-p1-patch  in the baseline but not run, so not compared' }),
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

  it('refuses a file with no studies, unless it is about to be recorded', () => {
    const path = join(dir, 'empty.json');
    writeFileSync(path, JSON.stringify({ format: 'rungs-baseline', version: 1, studies: {} }));
    const err = inputError(() => readBaseline(path));
    expect(err.message).toBe(`baseline file ${path}: field studies: holds no studies, so it can vouch for nothing; record it from a trusted run (rungs check --baseline ${path} --update-baseline)`);
    expect(readBaseline(path, { allowEmpty: true }).studies).toEqual({});
  });

  it('refuses a declaration hash of the wrong form', () => {
    const path = join(dir, 'hash.json');
    const b = JSON.parse(baselineJson(makeBaseline([tileP2()])));
    b.studies['tile-p2'].declaration = 'md5:1234';
    writeFileSync(path, JSON.stringify(b));
    expect(inputError(() => readBaseline(path)).message).toContain('field studies.tile-p2.declaration: expected "sha256:" and 64 hex digits');
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
