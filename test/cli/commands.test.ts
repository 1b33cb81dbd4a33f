import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync, chmodSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { XMLParser } from 'fast-xml-parser';

// The rungs command as a user runs it: exit statuses 0 / 1 / 2 (README), baselines, JUnit XML, rungs fit.
const STUDY = 'studies/tile-p1.study.ts';
function rungs(...args: string[]) {
  const r = spawnSync(process.execPath, ['bin/rungs.mjs', ...args], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1', CI: 'true' } });
  return { status: r.status, out: r.stdout, err: r.stderr };
}

describe('rungs check', () => {
  const dir = mkdtempSync(join(tmpdir(), 'rungs-check-'));
  const base = join(dir, 'baseline.json');
  const out = join(dir, 'reports');
  it('--update-baseline writes a baseline; an unchanged run then passes and writes JUnit XML', () => {
    expect(rungs('check', STUDY, '--baseline', base, '--update-baseline', '--out', out).status).toBe(0);
    const junit = join(dir, 'junit.xml');
    const r = rungs('check', STUDY, '--baseline', base, '--junit', junit, '--out', out);
    expect(r.status).toBe(0);
    expect(r.out).toMatch(/baseline: no regressions/);
    const xml = new XMLParser({ ignoreAttributes: false }).parse(readFileSync(junit, 'utf8'));
    expect(xml.testsuites['@_tests']).toBe('3');
    expect(xml.testsuites['@_failures']).toBe('0');
  });
  it('flags a seeded 10% regression at one level and exits 1', () => {
    const b = JSON.parse(readFileSync(base, 'utf8'));
    const lvl = b.studies['tile-p1'].norms.L2[3];
    lvl.error /= 1.1;
    const seeded = join(dir, 'seeded.json');
    writeFileSync(seeded, JSON.stringify(b));
    const r = rungs('check', STUDY, '--baseline', seeded, '--out', out);
    expect(r.status).toBe(1);
    expect(r.out).toMatch(/regression: tile-p1  L2  level 4  .* vs baseline .* \(\+10%\)/);
  });
  it('a corrupt baseline, a missing one and one from another ladder are bad input (exit 2), results still written', () => {
    const corrupt = join(dir, 'corrupt.json');
    writeFileSync(corrupt, '{ "studies": ');
    const c = rungs('check', STUDY, '--baseline', corrupt, '--out', join(dir, 'r2'));
    expect(c.status).toBe(2);
    expect(c.err).toMatch(/corrupt\.json.*not valid JSON/);
    expect(readFileSync(join(dir, 'r2', 'tile-p1.csv'), 'utf8')).toMatch(/^level,/);
    const missing = rungs('check', STUDY, '--baseline', join(dir, 'nope.json'), '--out', out);
    expect(missing.status).toBe(2);
    expect(missing.err).toMatch(/nope\.json/);
    // Another ladder: the baseline's first level recorded at another h.
    const b = JSON.parse(readFileSync(base, 'utf8'));
    b.studies['tile-p1'].ladder.h[0] *= 2;
    const other = join(dir, 'other-ladder.json');
    writeFileSync(other, JSON.stringify(b));
    const moved = rungs('check', STUDY, '--baseline', other, '--out', out);
    expect(moved.status).toBe(2);
    expect(moved.err).toMatch(/other-ladder\.json: field studies\.tile-p1\.norms\.\w+\[0\]: level 1 \(h .*\) is not on the study's ladder/);
  });
  it('--levels N against a longer baseline compares the levels it ran, and says so', () => {
    const shorter = rungs('check', STUDY, '--baseline', base, '--levels', '3', '--out', join(dir, 'levels3'));
    expect(shorter.status).toBe(0);
    expect(shorter.out).toMatch(/note: tile-p1  compared levels 1–3 of the baseline's 5 \(--levels 3\)/);
    expect(shorter.out).toMatch(/baseline: no regressions; --levels 3: the first 3 of 5 recorded levels compared/);
  });
  it('--quick runs only the coarsest levels that still give a fit (3 unless the study says)', () => {
    const q = join(dir, 'quick');
    const r = rungs('check', STUDY, '--quick', '--out', q);
    expect(r.status).toBe(0);
    expect(readFileSync(join(q, 'tile-p1.csv'), 'utf8').trim().split('\n')).toHaveLength(4);
  });
  it('an unwritable output folder is bad input (exit 2)', () => {
    const ro = join(dir, 'ro');
    mkdirSync(ro);
    writeFileSync(join(ro, 'blocker'), '');
    const r = rungs('run', STUDY, '--out', join(ro, 'blocker', 'sub'), '--quiet');
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/blocker/);
    chmodSync(ro, 0o755);
  });
});

describe('rungs fit', () => {
  it('fits a table from any code and judges it with --expect; GCI of a quantity', () => {
    const dir = mkdtempSync(join(tmpdir(), 'rungs-fit-'));
    const table = join(dir, 'kiln.csv');
    // e = 3 h^2 exactly, and a quantity φ(h) = 2 + 0.5 h^2: the fit must give order 2 and φ_ext = 2
    // (Richardson 1911; exact power laws, no noise).
    const hs = [0.2, 0.1, 0.05, 0.025];
    writeFileSync(table, 'h,L2,flux\n' + hs.map((h) => `${h},${3 * h * h},${2 + 0.5 * h * h}`).join('\n') + '\n');
    const r = rungs('fit', table, '--errors', 'L2', '--expect', '2', '--quantity', 'flux', '--out', join(dir, 'out'));
    expect(r.status).toBe(0);
    expect(r.out).toMatch(/L2 +fitted 2\.00 .*expected 2 +✓ on-order/);
    expect(r.out).toMatch(/flux +2\.00031\d* +2\.00 +2(\.0+)? /);
    const wrong = rungs('fit', table, '--errors', 'L2', '--expect', '3', '--out', join(dir, 'out'));
    expect(wrong.status).toBe(1);
    const bad = rungs('fit', join(dir, 'missing.csv'));
    expect(bad.status).toBe(2);
  });
});
