// Seeded mutation tests of every reader of solver output: each mutant of a small valid file must be either refused
// with a RungsInputError naming the file (and, for the per-level readers, the level and a line), or read to exactly
// the result of the unmutated file. Never another exception, never a different result.
//
// Mutations (all seeded, so every run checks the same mutants):
//  - truncation at every offset of the file;
//  - byte substitutions at seeded positions by punctuation and control characters, which cannot turn one valid
//    number or name into another (digits, signs, points, letters and blanks can — "10.5" → " 0.5", "h" → "x" — and
//    no reader could tell such a file from one written that way);
//  - numbers in forms only JavaScript accepts (0x10, 1_000, Infinity, NaN, …) in place of each number;
//  - huge counts (VTK), and swapped or out-of-range connectivity indices (VTK).
// A truncation exactly at a row boundary of a `rungs fit` table leaves a valid, shorter table (CSV declares no row
// count); those mutants must read to the result of that shorter table, which the test builds from whole lines.
import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { parseCsvTable } from '../../src/csv/read.ts';
import { readFitData } from '../../src/fit/table.ts';
import { parseErrorsCsv, parseErrorsJson } from '../../src/external/errors-file.ts';
import { parseVtkText } from '../../src/external/vtk/read.ts';
import { gridToField } from '../../src/external/vtk/to-field.ts';
import type { LevelRef } from '../../src/external/where.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { legacyVtk, nodalGrid, vtuText, type NodalGrid } from './vtk-writers.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

const level: LevelRef = { study: 'kiln-rod', index: 0, n: 2 };
const LEVEL_TEXT = "study 'kiln-rod' level 1 (n = 2): ";

// Seeded mutants: the project's own mulberry32, so every run checks the same ones.
const rng = mulberry32;

/** Characters no valid change of a number or of a name can produce (see the top of the file). */
const HOSTILE = ['\0', '\x7f', '#', '<', '>', '&', '"', "'", ',', ';', '{', '}', '[', ']', '/', '\\', '\uFFFD', '=', '%', '*'];
/** Number forms JavaScript's Number() or parseInt would take, or that overflow; a reader must refuse each. */
const NOT_DECIMAL = ['0x10', '0b1', '0o7', 'Infinity', '-Infinity', 'NaN', '1_000', '1e999', '0x1p3', '1e', '.', '--1', ''];

interface Mutant { name: string; text: string; expect?: string }

function truncations(text: string): Mutant[] {
  return Array.from({ length: text.length }, (_, k) => ({ name: `cut at ${k}`, text: text.slice(0, k) }));
}
function substitutions(text: string, count: number, seed: number): Mutant[] {
  const r = rng(seed);
  return Array.from({ length: count }, () => {
    const at = Math.floor(r() * text.length);
    const ch = HOSTILE[Math.floor(r() * HOSTILE.length)]!;
    return { name: `byte ${at} → ${JSON.stringify(ch)}`, text: text.slice(0, at) + ch + text.slice(at + 1) };
  });
}
/** Every number token (a run of digits with its sign, point and exponent, delimited by blanks, quotes, commas or
 *  tags) replaced by each NOT_DECIMAL form, for `take` seeded tokens. */
function nonDecimal(text: string, take: number, seed: number): Mutant[] {
  const spots = [...text.matchAll(/(?<=[\s",:>])[-+]?\d[\d.]*(?:[eE][-+]?\d+)?(?=[\s",}<])/g)].map((m) => [m.index!, m[0].length] as const);
  const r = rng(seed);
  const out: Mutant[] = [];
  for (let k = 0; k < take && spots.length; k++) {
    const [at, len] = spots[Math.floor(r() * spots.length)]!;
    for (const form of NOT_DECIMAL) out.push({ name: `number at ${at} → '${form}'`, text: text.slice(0, at) + form + text.slice(at + len) });
  }
  return out;
}

type Outcome = { ok: true; print: string } | { ok: false; error: unknown };
function attempt(read: () => string): Outcome {
  try { return { ok: true, print: read() }; } catch (error) { return { ok: false, error }; }
}

/**
 * Runs every mutant; returns one line per failure. A refusal must be a RungsInputError whose message contains each
 * of `mustName` and matches `line` when given; an accepted mutant must give the fingerprint `expected` (or the
 * mutant's own `expect`).
 */
function check(mutants: Mutant[], read: (text: string) => string, expected: string, mustName: string[], line?: RegExp): string[] {
  const failures: string[] = [];
  for (const m of mutants) {
    const o = attempt(() => read(m.text));
    if (o.ok) {
      if (o.print !== (m.expect ?? expected)) failures.push(`${m.name}: accepted with a different result`);
    } else if (!(o.error instanceof RungsInputError)) {
      failures.push(`${m.name}: ${(o.error as Error)?.name}: ${(o.error as Error)?.message}`);
    } else {
      const msg = o.error.message;
      const missing = mustName.filter((s) => !msg.includes(s));
      if (missing.length) failures.push(`${m.name}: message does not name ${missing.join(', ')}: ${msg}`);
      else if (line && !line.test(msg)) failures.push(`${m.name}: message names no line: ${msg}`);
    }
  }
  return failures;
}

// ---- VTK: P1 temperatures on a 2×2 tile of triangles (values with many digits, so a cut number stays a number) ----
const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'triangles' });
const tileTemperature = (x: number, y: number) => 20.123456789 + 7.25 * x + 3.5 * y * y;
const grid = nodalGrid(mesh, 1, tileTemperature);

/** The field a reader returns, independent of cell numbering and of where each cell's list starts (the reader turns
 *  cells positive, and a cell listed from another corner is the same cell). */
function fieldPrint(text: string, file: string): string {
  const v = gridToField(parseVtkText(text, file, level), { level, field: 'temperature', degree: 1 });
  const { cellDofs, dofCoords } = v.space;
  const values = v.field.nodes!.values;
  const dim = v.mesh.dim;
  const nLoc = cellDofs.length / v.mesh.nCells;
  const cells: string[] = [];
  for (let c = 0; c < v.mesh.nCells; c++) {
    const nodes: string[] = [];
    for (let i = 0; i < nLoc; i++) {
      const q = cellDofs[c * nLoc + i]!;
      nodes.push(`${Array.from(dofCoords.subarray(q * dim, q * dim + dim)).join(',')}=${values[q]}`);
    }
    cells.push(nodes.sort().join(' '));
  }
  return [v.degree, v.dofs, v.fieldName, v.mesh.h, ...cells.sort()].join('\n');
}

/** Connectivity mutants: swaps inside a cell, swaps between cells, out-of-range and non-integer indices. */
function indexMutants(write: (g: NodalGrid) => string, seed: number): Mutant[] {
  const out: Mutant[] = [];
  const withCells = (cells: number[][]) => write({ ...grid, cells });
  const copy = () => grid.cells.map((c) => c.slice());
  grid.cells.forEach((cell, c) => {
    for (let i = 0; i < cell.length; i++) {
      for (let j = i + 1; j < cell.length; j++) {
        const cells = copy();
        [cells[c]![i], cells[c]![j]] = [cells[c]![j]!, cells[c]![i]!];
        out.push({ name: `cell ${c} swap ${i}↔${j}`, text: withCells(cells) });
      }
      for (const bad of [grid.points.length, grid.points.length + 1, -1, 2147483648, 4294967296, 4294967296 + cell[i]!, 1e21]) {
        const text = withCells(copy().map((cc, k) => (k === c ? cc.map((p, m) => (m === i ? -999 : p)) : cc)));
        out.push({ name: `cell ${c} node ${i} → ${bad}`, text: text.replace('-999', String(bad)) });
      }
    }
  });
  const r = rng(seed);
  for (let k = 0; k < 120; k++) {
    const a = Math.floor(r() * grid.cells.length), b = Math.floor(r() * grid.cells.length);
    const i = Math.floor(r() * 3), j = Math.floor(r() * 3);
    const cells = copy();
    [cells[a]![i], cells[b]![j]] = [cells[b]![j]!, cells[a]![i]!];
    out.push({ name: `swap cell ${a}[${i}] ↔ cell ${b}[${j}]`, text: withCells(cells) });
  }
  return out;
}

const HUGE = ['2147483648', '4294967296', '2147483647', '9007199254740993', '99999999999999999999999', '100000', '10', '8', '0'];

describe('fuzzed legacy VTK', () => {
  const file = 'out/level-1/solution.vtk';
  const good = legacyVtk(grid);
  const good51 = legacyVtk(grid, '5.1');
  const expected = fieldPrint(good, file);
  const counts = [...good.matchAll(/^(POINTS|CELLS|CELL_TYPES|POINT_DATA) (\d+)(?: (\d+))?/gm)];
  const huge: Mutant[] = [];
  for (const text of [good, good51]) {
    for (const m of text.matchAll(/^(POINTS|CELLS|CELL_TYPES|POINT_DATA) (\d+)(?: (\d+))?/gm)) {
      for (const h of HUGE) {
        huge.push({ name: `${m[0]} → ${m[1]} ${h}`, text: text.replace(m[0], m[0].replace(` ${m[2]}`, ` ${h}`)) });
        if (m[3]) huge.push({ name: `${m[0]} size → ${h}`, text: text.replace(m[0], `${m[1]} ${m[2]} ${h}`) });
      }
    }
  }
  const indices = [...indexMutants((g) => legacyVtk(g), 14), ...indexMutants((g) => legacyVtk(g, '5.1'), 15)];
  const mutants = [
    ...truncations(good), ...truncations(good51), ...substitutions(good, 600, 11), ...substitutions(good51, 300, 12),
    ...nonDecimal(good, 40, 13), ...huge, ...indices,
  ];
  it(`${mutants.length} mutants (${good.length + good51.length} truncations, 900 byte substitutions, ${40 * NOT_DECIMAL.length} non-decimal numbers, ${huge.length} huge counts, ${indices.length} swapped or out-of-range indices) are refused or read the same`, () => {
    expect(counts.length).toBe(4);
    expect(fieldPrint(good51, file)).toBe(expected);
    const failures = check(mutants, (t) => fieldPrint(t, file), expected, [LEVEL_TEXT, file], /solution\.vtk line \d+: /);
    expect(failures.slice(0, 10)).toEqual([]);
  });
});

describe('fuzzed VTK XML (.vtu)', () => {
  const file = 'out/level-1/solution.vtu';
  const good = vtuText(grid);
  const expected = fieldPrint(good, file);
  const huge: Mutant[] = [];
  for (const attr of ['NumberOfPoints', 'NumberOfCells']) {
    for (const h of HUGE) huge.push({ name: `${attr}=${h}`, text: good.replace(new RegExp(`${attr}="\\d+"`), `${attr}="${h}"`) });
  }
  for (const h of HUGE) huge.push({ name: `last offset ${h}`, text: good.replace(/(Name="offsets" format="ascii">\n[\d ]* )(\d+)\n/, `$1${h}\n`) });
  const references = ['&#0;', '&#x110000;', '&#xD800;', '&#99999999999;', '&nbsp;', '&amp', '&#x;', '&', '&#65;']
    .map((ref) => ({ name: `reference ${ref}`, text: good.replace('written for a reader test -->', 'written -->').replace('version="1.0" byte', `version="1.0${ref}" byte`) }));
  const indices = indexMutants((g) => vtuText(g), 23);
  const mutants = [...truncations(good), ...substitutions(good, 900, 21), ...nonDecimal(good, 40, 22), ...huge, ...indices, ...references];
  it(`${mutants.length} mutants (${good.length} truncations, 900 byte substitutions, ${40 * NOT_DECIMAL.length} non-decimal numbers, ${huge.length} huge counts, ${indices.length} swapped or out-of-range indices, ${references.length} character references) are refused or read the same`, () => {
    const failures = check(mutants, (t) => fieldPrint(t, file), expected, [LEVEL_TEXT, file], /solution\.vtu line \d+: /);
    expect(failures.slice(0, 10)).toEqual([]);
  });
});

describe('fuzzed errors.json and errors.csv', () => {
  const opts = { level, require: ['L2', 'H1semi'], requireQuantities: ['flux_top'], quantities: ['flux_top'] };
  const jsonFile = 'out/level-1/errors.json';
  const json = '{\n  "dofs": 1089,\n  "h": 0.0441941738,\n  "cells": 2048,\n  "errors": { "L2": 3.4125e-4, "H1semi": 6.5e-2 },\n  "quantities": { "flux_top": -1.912345 }\n}\n';
  const print = (r: object) => JSON.stringify(r, Object.keys(r).sort()) + JSON.stringify((r as { errors: object }).errors) + JSON.stringify((r as { quantities: object }).quantities);
  const readJson = (t: string) => print(parseErrorsJson(t, jsonFile, opts));
  const jsonMutants = [...truncations(json), ...substitutions(json, 600, 31), ...nonDecimal(json, 6, 32), { name: 'BOM', text: '\uFEFF' + json }];
  it(`errors.json: ${jsonMutants.length} mutants (${json.length} truncations, 600 byte substitutions, ${6 * NOT_DECIMAL.length} non-decimal numbers, a BOM) are refused or read the same`, () => {
    const failures = check(jsonMutants, readJson, readJson(json), [LEVEL_TEXT, jsonFile], /errors\.json line \d+: /);
    expect(failures.slice(0, 10)).toEqual([]);
  });

  const csvFile = 'out/level-1/errors.csv';
  const csv = 'dofs,h,L2,H1semi,flux_top\r\n1089,0.0441941738,3.4125e-4,6.5e-2,-1.912345\r\n';
  const readCsv = (t: string) => print(parseErrorsCsv(t, csvFile, opts));
  const csvMutants = [...truncations(csv), ...substitutions(csv, 600, 33), ...nonDecimal(csv, 5, 34), { name: 'BOM', text: '\uFEFF' + csv }];
  it(`errors.csv: ${csvMutants.length} mutants (${csv.length} truncations, 600 byte substitutions, ${5 * NOT_DECIMAL.length} non-decimal numbers, a BOM) are refused or read the same`, () => {
    const failures = check(csvMutants, readCsv, readCsv(csv), [LEVEL_TEXT, csvFile], /errors\.csv line \d+: /);
    expect(failures.slice(0, 10)).toEqual([]);
  });
});

describe('fuzzed rungs fit tables (CSV)', () => {
  const file = 'kiln-rod.csv';
  const lines = ['h,dofs,L2,H1semi,mean_temperature', '0.2,25,2.0125e-2,0.16253,412.51', '0.1,100,5.00625e-3,8.0125e-2,412.8125',
    '0.05,400,1.2505e-3,4.00625e-2,412.90625', '0.025,1600,3.1255e-4,2.0003e-2,412.9290625'];
  const table = lines.join('\n') + '\n';
  const read = (t: string) => JSON.stringify(readFitData(parseCsvTable(t, file), file, { by: 'h', hColumn: 'h', dofsColumn: 'dofs', errors: ['L2', 'H1semi'], quantities: ['mean_temperature'] }));
  // A cut right after a row's line break is a valid shorter table (3 rows or more make a fit here; 2 too).
  const shorter = new Map<number, string>();
  for (let k = 3; k < lines.length; k++) {
    const text = lines.slice(0, k).join('\n') + '\n';
    shorter.set(text.length, read(text));
  }
  const mutants = [
    ...truncations(table).map((m) => ({ ...m, expect: shorter.get(m.text.length) })),
    ...substitutions(table, 800, 41), ...nonDecimal(table, 20, 42), { name: 'BOM', text: '\uFEFF' + table },
  ];
  it(`${mutants.length} mutants (${table.length} truncations, ${shorter.size} of them at a row boundary, 800 byte substitutions, ${20 * NOT_DECIMAL.length} non-decimal numbers, a BOM) are refused or read the same`, () => {
    expect(shorter.size).toBe(2);
    const failures = check(mutants, read, read(table), [file]);
    expect(failures.slice(0, 10)).toEqual([]);
  });
});

/** The RungsInputError message a read must raise. */
function refusal(read: () => unknown): string {
  try { read(); } catch (err) {
    if (err instanceof RungsInputError) return err.message;
    throw err;
  }
  throw new Error('expected a RungsInputError');
}

describe('the cases of the issue, by name', () => {
  const file = 'out/level-1/solution.vtk';
  const good = legacyVtk(grid);
  const read = (text: string, name = file) => gridToField(parseVtkText(text, name, level), { level });

  it('a legacy file cut inside its last number is refused: the final line break is missing', () => {
    const cut = good.slice(0, good.length - 5); // "…26.873456789\n" → "…26.873456" still a number
    expect(Number.isFinite(Number(cut.slice(cut.lastIndexOf('\n') + 1)))).toBe(true);
    expect(refusal(() => read(cut))).toMatch(new RegExp(`^study 'kiln-rod' level 1 \\(n = 2\\): out/level-1/solution\\.vtk line ${cut.split('\n').length}: the file does not end with a line break`));
  });

  it('POINTS 2147483648 is refused before anything is allocated, naming the count and the limit', () => {
    expect(refusal(() => read(good.replace('POINTS 9 double', 'POINTS 2147483648 double'))))
      .toContain('solution.vtk line 5: the number of POINTS is 2147483648, more than the limit of 2147483647 entries');
    expect(refusal(() => read(good.replace('POINTS 9 double', 'POINTS 100000 double'))))
      .toMatch(/line 5: POINTS 100000 \(line 5\) needs 300000 values, but the \d+ characters after it can hold at most \d+/);
  });

  it('an index 4294967296 does not wrap to 0, and 0x1 is not an index', () => {
    const at = good.indexOf('\n3 ') + 3;
    expect(refusal(() => read(good.slice(0, at) + '4294967296' + good.slice(at + 1))))
      .toMatch(/index 1 of node indices of cell 1 is 4294967296, beyond the largest index rungs reads/);
    expect(refusal(() => read(good.slice(0, at) + '0x0' + good.slice(at + 1)))).toMatch(/is '0x0', not a finite number; expected an integer written with digits/);
  });

  it('numbers are decimal only', () => {
    const last = good.lastIndexOf('\n', good.length - 2) + 1;
    for (const form of ['0x1A', '1_000', 'Infinity', '0b1']) {
      expect(refusal(() => read(good.slice(0, last) + form + '\n'))).toContain(`value 9 of values of SCALARS temperature is '${form}', not a finite number`);
    }
  });

  it('a fold (a cell turned over onto its neighbour) is refused like an inverted cell', () => {
    // Cell 2 shares the edge (1, 2) with cell 1 but lies on the same side of it, on top of cell 1. Its corners are
    // listed clockwise; the reader turns each cell positive, so the inverted-cell check alone would pass it.
    const g: NodalGrid = { points: [[0, 0, 0], [1, 0, 0], [0, 1, 0], [0.4, 0.4, 0]], cells: [[0, 1, 2], [1, 2, 3]], type: 5, values: [1, 2, 3, 4] };
    expect(refusal(() => read(legacyVtk(g)))).toBe(
      `${LEVEL_TEXT}${file} line 12: cells 1 and 2 lie on the same side of their shared edge (1, 2): the mesh folds over itself (or repeats a cell)`,
    );
  });

  it('an island dropped onto the tile (sharing no edge with it) is refused', () => {
    const g = { ...grid, points: [...grid.points, [0.1, 0.1, 0], [0.3, 0.1, 0], [0.1, 0.3, 0]], values: [...grid.values, 1, 2, 3] };
    g.cells = [...grid.cells, [9, 10, 11]];
    expect(refusal(() => read(legacyVtk(g)))).toMatch(/cross or overlap|cover the plane/);
  });

  it('XML character references are checked', () => {
    const vtu = vtuText(grid);
    const bad = (ref: string) => refusal(() => read(vtu.replace('byte_order="LittleEndian"', `byte_order="Little${ref}Endian"`), 'out/level-1/solution.vtu'));
    expect(bad('&#x110000;')).toMatch(/solution\.vtu line 3: '&#x110000;' refers to code point 1114112, which is not a character XML allows/);
    expect(bad('&nbsp;')).toMatch(/line 3: '&nbsp;' is not a reference rungs reads/);
    expect(bad('&')).toMatch(/line 3: '&Endian"' is not a complete reference|line 3: '&Endian' is not a complete reference/);
    expect(read(vtu.replace('byte_order="LittleEndian"', 'byte_order="Little&#69;ndian"'), 'x.vtu').dofs).toBe(9);
  });

  it('a BOM before errors.json is dropped as before a CSV file', () => {
    const text = '{ "dofs": 9, "errors": { "L2": 0.5 } }\n';
    expect(parseErrorsJson('\uFEFF' + text, 'e.json')).toEqual(parseErrorsJson(text, 'e.json'));
    expect(parseErrorsCsv('\uFEFFdofs,L2\n9,0.5\n', 'e.csv')).toMatchObject({ dofs: 9, errors: { L2: 0.5 } });
  });

  it('errors.json: a key given twice, and a missing value, are refused with their line', () => {
    expect(refusal(() => parseErrorsJson('{\n "dofs": 9,\n "errors": { "L2": 0.5,\n "L2": 0.25 } }\n', 'e.json', { level })))
      .toBe("study 'kiln-rod' level 1 (n = 2): e.json line 4: field 'L2' is given twice in the object opened at line 3; give each field once");
    expect(refusal(() => parseErrorsJson('{\n "dofs": 9,\n "errors": { "L2": 0.5 } }\n', 'e.json', { level, require: ['L2', 'H1semi'] })))
      .toMatch(/e\.json line 3: no error 'H1semi'/);
  });
});

describe('h reported next to a VTK solution is checked against its mesh', () => {
  it('warns beyond 1%, not within it', async () => {
    const { mkdtempSync, writeFileSync, rmSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const { readLevelOutput } = await import('../../src/external/output.ts');
    const dir = mkdtempSync(join(tmpdir(), 'rungs-h-'));
    try {
      writeFileSync(join(dir, 'solution.vtk'), legacyVtk(grid));
      // The 2×2 tile of right triangles: largest cell diameter √2/2 (the hypotenuse of a leg-1/2 triangle).
      const h = Math.SQRT2 / 2;
      writeFileSync(join(dir, 'errors.json'), `{ "dofs": 9, "h": ${h * 1.005} }\n`);
      expect(readLevelOutput('vtk', dir, { level, h: 1 }).warnings).toEqual([]);
      writeFileSync(join(dir, 'errors.json'), '{ "dofs": 9, "h": 0.5 }\n');
      const out = readLevelOutput('vtk', dir, { level, h: 1 });
      expect(out.warnings).toHaveLength(1);
      expect(out.warnings[0]).toMatch(/errors\.json: h is 0\.5, but the largest cell diameter of the mesh in .*solution\.vtk is 0\.707107 \(29\.3% apart\)/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
