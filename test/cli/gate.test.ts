import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { XMLParser } from 'fast-xml-parser';
import { afterAll, describe, expect, it, vi } from 'vitest';
import { checkCommand, type CheckFlags } from '../../src/cli/check-command.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { defineStudy, interval, lagrange } from '../../src/index.ts';

// `rungs check` as CI sees it, called in-process (the CLI takes seconds to start): exit status, JUnit and messages.
// Every study is a small kiln rod in 1-D (invented demo data), so each call runs in well under a second of work.
const root = mkdtempSync(join(tmpdir(), 'rungs-gate-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));
// Outside a package, tsx would read the study files as CommonJS; they are ES modules like the project's own.
writeFileSync(join(root, 'package.json'), '{ "type": "module" }\n');
const lib = pathToFileURL(resolve('src/index.ts')).href;
let fileCount = 0;

/** A study file in a folder of its own (a fresh path: the module cache would return an earlier file's study). */
function studyFile(folder: string, stem: string, body: string): string {
  const dir = join(root, folder);
  mkdirSync(dir, { recursive: true });
  const path = join(dir, `${stem}.study.ts`);
  fileCount++;
  writeFileSync(path, `import { defineStudy, interval, lagrange } from '${lib}';\nexport default defineStudy({\n${body}\n});\n`);
  return path;
}
const rod = (name: string, extra = '', exact = 'sin(2*x) + x') =>
  `  name: '${name}', domain: interval(0, 1), exact: '${exact}', discretization: lagrange({ degree: 1 }),\n  ladder: { n: [8, 16, 32, 64] }, norms: ['L2', 'H1semi'],${extra}`;

interface Checked { status: number; out: string; err: string; reports: string; junit: { failures: number; errors: number; cases: Record<string, unknown>[] } }
const parser = new XMLParser({ ignoreAttributes: false, attributeNamePrefix: '', isArray: (n) => n === 'testcase' });

/** Runs the command with its output captured; always writes JUnit and checks the status it implies. */
async function check(paths: string[], flags: Partial<CheckFlags> = {}): Promise<Checked> {
  const run = join(root, `run-${++fileCount}`);
  const junitPath = join(run, 'junit.xml');
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((s) => { out += String(s); return true; });
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((s) => { err += String(s); return true; });
  let status: number;
  try {
    status = await checkCommand(paths, { out: join(run, 'reports'), junit: junitPath, jobs: 1, ...flags });
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
  const suite = parser.parse(readFileSync(junitPath, 'utf8')).testsuites.testsuite;
  const junit = { failures: Number(suite.failures), errors: Number(suite.errors), cases: suite.testcase ?? [] };
  // The contract of the gate: the JUnit file says what the exit status says.
  expect(status).toBe(junit.errors ? 2 : junit.failures ? 1 : 0);
  return { status, out, err, junit, reports: join(run, 'reports') };
}

const good = studyFile('good', 'kiln-rod', rod('kiln-rod'));
const baselinePath = join(root, 'baseline.json');

describe('rungs check: every outcome', () => {
  it('pass: records a baseline with the declaration hash, then passes against it', async () => {
    const rec = await check([good], { baseline: baselinePath, updateBaseline: true });
    expect(rec.status).toBe(0);
    const stored = JSON.parse(readFileSync(baselinePath, 'utf8'));
    expect(stored.studies['kiln-rod'].declaration).toMatch(/^sha256:[0-9a-f]{64}$/);
    const r = await check([good], { baseline: baselinePath });
    expect(r.status).toBe(0);
    expect(r.out).toContain('baseline: no regressions');
    expect(r.out).toContain('check passed (exit 0): 1 study as expected');
    expect(r.junit.cases).toHaveLength(2);
  });

  it('below-order: exit 1, a JUnit failure, and the reasons printed', async () => {
    const below = studyFile('below', 'kiln-rod-below', rod('kiln-rod-below', " expected: { L2: 3 },"));
    const r = await check([below], { quiet: true });
    expect(r.status).toBe(1);
    expect(r.junit.failures).toBe(1);
    expect(r.out).toMatch(/failed: kiln-rod-below — not as expected/);
    expect(r.out).toMatch(/ {4}L2: verdict below-order, expected on-order\n {6}· /);
    expect(r.out).toContain('check failed (exit 1): 1 study not as expected (kiln-rod-below)');
  });

  it('regression: exit 1, a JUnit failure of type regression', async () => {
    const b = JSON.parse(readFileSync(baselinePath, 'utf8'));
    b.studies['kiln-rod'].norms.L2[2].error /= 1.2;
    const seeded = join(root, 'seeded.json');
    writeFileSync(seeded, JSON.stringify(b));
    const r = await check([good], { baseline: seeded });
    expect(r.status).toBe(1);
    expect(r.out).toMatch(/regression: kiln-rod {2}L2 {2}level 3 .* \(\+20%\)/);
    expect(r.junit.cases.filter((c) => c.failure).map((c) => [c.name, (c.failure as { type: string }).type])).toEqual([['L2', 'regression']]);
  });

  it('bad input (expected order 0): exit 2, a JUnit error, the file, the field and what is valid', async () => {
    const zero = studyFile('zero', 'kiln-rod-zero', rod('kiln-rod-zero', ' expected: { L2: 0 },'));
    const r = await check([zero, good]);
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/kiln-rod-zero\.study\.ts \(study 'kiln-rod-zero'\): expected\.L2: expected order 0 is not valid: an expected order must be a positive number/);
    expect(r.junit.errors).toBe(1);
    // The other study still ran.
    expect(r.junit.cases.filter((c) => c.classname === 'rungs.kiln-rod')).toHaveLength(2);
  });
});

describe('rungs check against a baseline', () => {
  it('--quick against a full baseline compares the levels it ran and says how many', async () => {
    const r = await check([good], { baseline: baselinePath, quick: true });
    expect(r.status).toBe(0);
    expect(r.out).toContain("note: kiln-rod  compared levels 1–3 of the baseline's 4 (--quick)");
    expect(r.out).toContain('baseline: no regressions; --quick: the first 3 of 4 recorded levels compared');
  });

  it('a changed declaration whose errors still match is a warning; one that moves them fails', async () => {
    const looser = studyFile('changed-tolerance', 'kiln-rod', rod('kiln-rod', ' tolerance: 0.2,'));
    const w = await check([looser], { baseline: baselinePath });
    expect(w.status).toBe(0);
    expect(w.out).toMatch(/warning: kiln-rod {2}declaration changed since the baseline was recorded \([0-9a-f]{12} → [0-9a-f]{12}\), but its errors still match the baseline/);
    expect(w.out).toContain('check passed (exit 0): 1 study as expected; 1 warning');

    const other = studyFile('changed-exact', 'kiln-rod', rod('kiln-rod', '', 'sin(3*x) + x'));
    const f = await check([other], { baseline: baselinePath });
    expect(f.status).toBe(1);
    expect(f.out).toMatch(/regression: kiln-rod {2}/);
    expect(f.out).toMatch(/warning: kiln-rod {2}declaration changed .*; the differences above may come from that change/);
  });

  it('a baseline that lost a study fails with exit 2 and a JUnit error', async () => {
    const second = studyFile('second', 'kiln-rod-second', rod('kiln-rod-second'));
    const r = await check([good, second], { baseline: baselinePath });
    expect(r.status).toBe(2);
    expect(r.err).toContain(`error: ${baselinePath}: kiln-rod-second  not in the baseline; record it (--update-baseline) from a trusted run`);
    expect(r.junit.cases.filter((c) => c.error).map((c) => [c.classname, (c.error as { type: string }).type])).toEqual([
      ['rungs.kiln-rod-second', 'study-new'], ['rungs.kiln-rod-second', 'study-new'],
    ]);
  });

  it('a baseline with an empty studies object is a clear exit 2, never a silent pass', async () => {
    const empty = join(root, 'empty.json');
    writeFileSync(empty, JSON.stringify({ format: 'rungs-baseline', version: 1, studies: {} }));
    const r = await check([good], { baseline: empty });
    expect(r.status).toBe(2);
    expect(r.err).toContain(`field studies: holds no studies, so it can vouch for nothing`);
    expect(r.junit.cases).toContainEqual(expect.objectContaining({ classname: 'rungs', name: 'baseline file' }));
  });
});

describe('rungs check refuses ambiguous names up front', () => {
  it('two files with one study name: exit 2 naming both files, neither runs, the others do', async () => {
    studyFile('twins', 'kiln-a', rod('kiln-twin'));
    studyFile('twins', 'kiln-b', rod('Kiln-Twin'));
    const r = await check([join(root, 'twins'), good]);
    expect(r.status).toBe(2);
    const lines = r.err.split('\n').filter((l) => l.includes('also declared by'));
    expect(lines).toHaveLength(2);
    for (const line of lines) {
      expect(line).toContain('kiln-a.study.ts');
      expect(line).toContain('kiln-b.study.ts');
    }
    expect(r.junit.cases.filter((c) => c.error)).toHaveLength(2);
    expect(r.junit.cases.filter((c) => c.classname === 'rungs.kiln-rod')).toHaveLength(2);
    expect(existsSync(join(r.reports, 'kiln-rod.csv'))).toBe(true);
    expect(existsSync(join(r.reports, 'kiln-twin.csv')) || existsSync(join(r.reports, 'Kiln-Twin.csv'))).toBe(false);
  });

  it('a reserved study name: exit 2 with the reason, and no study file clobbers summary.csv', async () => {
    const reserved = studyFile('reserved', 'summary', rod('summary'));
    const r = await check([reserved, good]);
    expect(r.status).toBe(2);
    expect(r.err).toMatch(/summary\.study\.ts \(study 'summary'\): name: 'summary' is reserved: the run writes summary\.csv, index\.html and junit\.xml/);
    expect(r.junit.errors).toBe(1);
    expect(readFileSync(join(r.reports, 'summary.csv'), 'utf8')).toMatch(/^study,norm,/);
  });

  it('the schema refuses expected orders ≤ 0 and reserved names in any case, and accepts names that merely start alike', () => {
    const decl = (over: object) => defineStudy({
      name: 'kiln-rod', domain: interval(0, 1), exact: 'x*x', discretization: lagrange({ degree: 1 }), ladder: { n: [4, 8] }, ...over,
    });
    const refusal = (over: object) => {
      try { validateStudy(decl(over), 'kiln.study.ts'); } catch (err) { return (err as Error).message; }
      return 'accepted';
    };
    expect(refusal({ expected: { H1semi: -1 } })).toMatch(/^kiln\.study\.ts \(study 'kiln-rod'\): expected\.H1semi: expected order -1 is not valid: an expected order must be a positive number/);
    expect(refusal({ expected: { L2: 0 } })).toMatch(/expected\.L2: expected order 0 is not valid/);
    expect(refusal({ expected: { L2: 1.5 } })).toBe('accepted');
    for (const name of ['summary', 'Index', 'JUNIT', 'index.html', 'summary.csv']) expect(refusal({ name })).toMatch(new RegExp(`name: '${name.replace('.', '\\.')}' is reserved`));
    for (const name of ['summary-tile', 'indexed', 'kiln-index']) expect(refusal({ name })).toBe('accepted');
  });
});

describe('the rungs binary', () => {
  it('exits with the status the JUnit file implies (one spawn: a bad study beside a good one)', () => {
    const junit = join(root, 'bin-junit.xml');
    const zero = studyFile('bin', 'kiln-rod-bin', rod('kiln-rod-bin', ' expected: { H1semi: -2 },'));
    const r = spawnSync(process.execPath, ['bin/rungs.mjs', 'check', zero, good, '--junit', junit, '--out', join(root, 'bin-reports'), '--quiet'],
      { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
    expect(r.status).toBe(2);
    const suite = parser.parse(readFileSync(junit, 'utf8')).testsuites.testsuite;
    expect([Number(suite.errors), Number(suite.failures)]).toEqual([1, 0]);
    expect(r.stdout).toContain('check failed (exit 2, bad input): 1 study could not run');
  });
});
