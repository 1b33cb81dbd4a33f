// Generated code compiled and run with the real tools, each against mathjs (an outside library) on the same trees.
// Julia is not packaged in Debian 12 (apt-cache policy julia: no candidate), so it cannot be run here; its text is
// checked structurally in julia.test.ts.
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import type { EvalFunction } from 'mathjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { generateCode } from '../../src/codegen/generate.ts';
import type { Language } from '../../src/codegen/languages.ts';
import { mulberry32 } from '../../src/mesh/random.ts';
import { KILN_BOX, kilnBundle } from './bundle.ts';
import { cDriver, fortranDriver, javaScriptDriver, pythonDriver, pythonScalarDriver } from './drivers.ts';
import { missing, run, steps, type Ran } from './run.ts';

const bundle = kilnBundle();
const OPTIONS = { box: KILN_BOX, samplePoints: 24, seed: 11 };
const N = 1000;

// Rows x y z t nx ny nz: first the points where sign and cbrt see exactly 0 and the box corners, then seeded ones.
function referencePoints(): number[][] {
  const random = mulberry32(4242);
  const rows = [
    [0.5, 0, 0.5, 0, 1, 0, 0],
    [0.5, 0.5, 0.5, 1, 0, 1, 0],
    [0, 1, 0, 2, 0, 0, 1],
    [1, 1, 1, 2, -0.6, 0.8, 0],
  ];
  while (rows.length < N) {
    const n = [2 * random() - 1, 2 * random() - 1, 2 * random() - 1];
    const length = Math.hypot(...n);
    if (length < 0.1 || length > 1) continue;
    rows.push([random(), random(), random(), 2 * random(), n[0] / length, n[1] / length, n[2] / length]);
  }
  return rows;
}
const POINTS = referencePoints();

// Reference: mathjs 15 compiled evaluation of the very trees in the bundle, in driver order (point, function, output).
const compiled: EvalFunction[][] = bundle.functions.map((f) => f.outputs.map((o) => o.compile()));
const WIDTH = compiled.reduce((s, f) => s + f.length, 0);
const outputLabels = bundle.functions.flatMap((f) => f.outputNames.map((n) => `${f.name}.${n}`));
const referenceProblems: string[] = [];
const REFERENCE = POINTS.flatMap((p, i) => {
  const scope = { x: p[0], y: p[1], z: p[2], t: p[3], nx: p[4], ny: p[5], nz: p[6] };
  return compiled.flatMap((f) => f.map((c, k) => {
    const v: unknown = c.evaluate(scope);
    if (typeof v !== 'number' || !Number.isFinite(v)) referenceProblems.push(`point ${i} output ${k}: ${String(v)}`);
    return Number(v);
  }));
});
const SCALES = Array.from({ length: WIDTH }, (_, k) => POINTS.reduce((m, _p, i) => Math.max(m, Math.abs(REFERENCE[i * WIDTH + k])), 0));

/** Largest |got - ref| / max(|ref|, scale of that output) and the first few values above `limit`. */
function agreement(text: string, limit: number): { worst: number; where: string; failures: string[]; count: number } {
  const values = text.trim().split(/\s+/).map(Number);
  const failures: string[] = [];
  let worst = 0;
  let where = '';
  values.forEach((v, j) => {
    const k = j % WIDTH;
    const ref = REFERENCE[j];
    const error = Math.abs(v - ref) / Math.max(Math.abs(ref), SCALES[k]);
    if (!(error <= worst)) { worst = Number.isNaN(error) ? Infinity : error; where = `${outputLabels[k]} at point ${Math.floor(j / WIDTH)}`; }
    if (!(error <= limit) && failures.length < 10) failures.push(`${outputLabels[k]} point ${Math.floor(j / WIDTH)}: ${v} vs ${ref}`);
  });
  return { worst, where, failures, count: values.length };
}

const pointInput = `${N}\n${POINTS.map((p) => p.map((v) => v.toPrecision(17)).join(' ')).join('\n')}\n`;
const TSX = createRequire(import.meta.url).resolve('tsx/cli');
// typescript exports no ./bin entry: its command sits beside its package.json.
const TSC = join(dirname(createRequire(import.meta.url).resolve('typescript/package.json')), 'bin', 'tsc');
const PYTHON = '/usr/bin/python3';

interface Case {
  language: Language;
  /** Name of the case when a language has more than one (default the language). */
  label?: string;
  /** A driver of its own (default DRIVER_FILE of the language). */
  driverFile?: [string, () => string];
  /** Why this case cannot run here, or undefined. */
  skip: string | undefined;
  /** Measured worst relative difference to mathjs allowed (1e-13 unless measured otherwise, see below). */
  limit: number;
  driver: (dir: string) => Promise<Ran>;
  selfTest: (dir: string) => Promise<Ran>;
  /** Why the self-test cannot run here though the driver can, or undefined. */
  selfTestSkip?: string;
}

const C_FLAGS = ['-std=c99', '-O1', '-Wall', '-Wextra', '-pedantic', '-Werror'];
const CPP_FLAGS = ['-std=c++17', '-O1', '-Wall', '-Wextra', '-pedantic', '-Werror'];
// Unused dummy arguments (an unused z or t) are expected in generated code; every other warning fails the build.
const F_FLAGS = ['-std=f2008', '-O1', '-Wall', '-Werror', '-Wno-unused-dummy-argument'];

// Relative agreement required against mathjs: 1e-13 of max(|ref|, scale) in every language (common practice, no
// source: a few ulps of differing math libraries, amplified by the sums of these formulas). Measured worst on this
// machine (Debian 12, glibc 2.36, gcc/g++/gfortran 12.2, NumPy 1.24, Node 20): 5.0e-16 for C, C++, Fortran, JavaScript
// and TypeScript (kiln_hyperbolic at a box corner), 4.6e-16 for Python (kiln_trig), so no language needs a looser limit.
const CASES: Case[] = [
  {
    language: 'c', skip: missing('/usr/bin/gcc', 'gcc'), limit: 1e-13,
    driver: (d) => steps([['gcc', [...C_FLAGS, 'driver.c', '-o', 'driver', '-lm']], ['./driver', [], pointInput]], d),
    selfTest: (d) => steps([['gcc', [...C_FLAGS, 'rungs_data_selftest.c', '-o', 'selftest', '-lm']], ['./selftest', []]], d),
  },
  {
    language: 'cpp', skip: missing('/usr/bin/g++', 'g++'), limit: 1e-13,
    driver: (d) => steps([['g++', [...CPP_FLAGS, 'driver.cpp', '-o', 'driver']], ['./driver', [], pointInput]], d),
    selfTest: (d) => steps([['g++', [...CPP_FLAGS, 'rungs_data_selftest.cpp', '-o', 'selftest']], ['./selftest', []]], d),
  },
  {
    language: 'fortran', skip: missing('/usr/bin/gfortran', 'gfortran'), limit: 1e-13,
    driver: (d) => steps([['gfortran', [...F_FLAGS, 'rungs_data.f90', 'driver.f90', '-o', 'driver']], ['./driver', [], pointInput]], d),
    selfTest: (d) => steps([['gfortran', [...F_FLAGS, 'rungs_data.f90', 'rungs_data_selftest.f90', '-o', 'selftest']], ['./selftest', []]], d),
  },
  {
    language: 'python', skip: missing(PYTHON, 'python3-numpy', ['-c', 'import numpy']), limit: 1e-13,
    driver: (d) => run(PYTHON, ['driver.py'], d, pointInput),
    selfTest: (d) => run(PYTHON, ['rungs_data_selftest.py'], d),
  },
  {
    // A solver in plain Python without NumPy: the data fall back to the math module for scalar arguments.
    language: 'python', label: 'python without NumPy', skip: missing(PYTHON, 'python3'), limit: 1e-13,
    driverFile: ['driver_scalar.py', () => pythonScalarDriver(bundle)],
    driver: (d) => run(PYTHON, ['driver_scalar.py'], d, pointInput),
    selfTest: (d) => run(PYTHON, ['rungs_data_selftest.py'], d),
    // The self-test calls the functions on arrays too, so it needs NumPy even where the solver does not.
    selfTestSkip: missing(PYTHON, 'python3-numpy', ['-c', 'import numpy']),
  },
  {
    language: 'javascript', skip: undefined, limit: 1e-13,
    driver: (d) => run(process.execPath, ['driver.mjs'], d, pointInput),
    selfTest: (d) => run(process.execPath, ['rungs_data_selftest.mjs'], d),
  },
  {
    language: 'typescript', skip: undefined, limit: 1e-13,
    // The data file must also pass the TypeScript compiler in strict mode on its own.
    driver: (d) => steps([
      [process.execPath, [TSC, '--noEmit', '--strict', '--target', 'es2022', '--module', 'esnext', '--types', '', 'rungs_data.ts']],
      [process.execPath, [TSX, 'driver.ts'], pointInput],
    ], d),
    selfTest: (d) => run(process.execPath, [TSX, 'rungs_data_selftest.ts'], d),
  },
];

/** The self-test of a data file with one sin changed to cos: it must notice. */
const BROKEN: Partial<Record<Language, (dir: string) => Promise<Ran>>> = {
  c: (d) => steps([['gcc', [...C_FLAGS, 'rungs_data_selftest.c', '-o', 'selftest', '-lm']], ['./selftest', []]], d),
  python: (d) => run(PYTHON, ['rungs_data_selftest.py'], d),
};

const DRIVER_FILE: Partial<Record<Language, [string, () => string]>> = {
  c: ['driver.c', () => cDriver(bundle, false)],
  cpp: ['driver.cpp', () => cDriver(bundle, true)],
  fortran: ['driver.f90', () => fortranDriver(bundle)],
  python: ['driver.py', () => pythonDriver(bundle)],
  javascript: ['driver.mjs', () => javaScriptDriver(bundle, 'rungs_data.mjs')],
  typescript: ['driver.ts', () => javaScriptDriver(bundle, 'rungs_data.ts')],
};

describe('generated code, compiled and run, against mathjs', () => {
  let root = '';
  const results = new Map<string, { driver: Ran; selfTest: Ran; broken?: Ran }>();
  const labelOf = (c: Case): string => c.label ?? c.language;

  beforeAll(async () => {
    root = mkdtempSync(join(tmpdir(), 'rungs-codegen-'));
    // All builds at once: the machine has two cores and most of the time is spent in compilers.
    await Promise.all(CASES.filter((c) => !c.skip).map(async (c) => {
      const files = generateCode(bundle, c.language, OPTIONS);
      // Driver and self-test in folders of their own: two Fortran builds would both write rungs_data.mod.
      const dirs = ['driver', 'selftest'].map((what) => {
        const dir = join(root, labelOf(c).replace(/\W+/g, '-'), what);
        mkdirSync(dir, { recursive: true });
        for (const f of files) writeFileSync(join(dir, f.name), f.text);
        return dir;
      });
      const [name, text] = c.driverFile ?? DRIVER_FILE[c.language]!;
      writeFileSync(join(dirs[0], name), text());
      const broken = c.label ? undefined : BROKEN[c.language];
      let brokenRun: Promise<Ran | undefined> = Promise.resolve(undefined);
      if (broken) {
        const dir = join(root, labelOf(c), 'broken');
        mkdirSync(dir, { recursive: true });
        files.forEach((f, i) => writeFileSync(join(dir, f.name), i === 0 ? f.text.replace('sin(', 'cos(') : f.text));
        brokenRun = broken(dir);
      }
      const [driver, selfTest, brokenResult] = await Promise.all([c.driver(dirs[0]), c.selfTest(dirs[1]), brokenRun]);
      results.set(labelOf(c), { driver, selfTest, broken: brokenResult });
    }));
  });

  afterAll(() => {
    if (root) rmSync(root, { recursive: true, force: true });
  });

  it('has a real, finite mathjs reference at every point (the points lie in every function\'s domain)', () => {
    expect(referenceProblems).toEqual([]);
    expect(REFERENCE.length).toBe(N * WIDTH);
  });

  for (const c of CASES) {
    describe.skipIf(c.skip !== undefined)(`${labelOf(c)}${c.skip ? ` (skipped: ${c.skip})` : ''}`, () => {
      it(`agrees with mathjs at ${N} points to ${c.limit} relative of max(|ref|, scale)`, () => {
        const { driver } = results.get(labelOf(c))!;
        expect(driver.code, `${driver.command}\n${driver.stderr}`).toBe(0);
        const a = agreement(driver.stdout, c.limit);
        expect(a.count).toBe(N * WIDTH);
        expect(a.failures, `worst ${a.worst} at ${a.where}`).toEqual([]);
      });

      it.skipIf(c.selfTestSkip !== undefined)(`runs its generated self-test with exit status 0${c.selfTestSkip ? ` (skipped: ${c.selfTestSkip})` : ''}`, () => {
        const { selfTest } = results.get(labelOf(c))!;
        expect(selfTest.code, `${selfTest.command}\n${selfTest.stdout}\n${selfTest.stderr}`).toBe(0);
        expect(selfTest.stdout).toMatch(/values checked, 0 failed/);
        expect(selfTest.stdout).not.toMatch(/FAIL/);
      });

      if (BROKEN[c.language] && !c.label) it('fails its self-test, naming the value, when the data file is wrong', () => {
        const broken = results.get(labelOf(c))!.broken!;
        expect(broken.code).not.toBe(0);
        expect(broken.stdout).toMatch(/^FAIL exact_u u at point 1: got/m);
        expect(broken.stdout).toMatch(/values checked, [1-9]\d* failed/);
      });
    });
  }
});
