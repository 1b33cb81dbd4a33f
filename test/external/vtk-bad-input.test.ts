import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { parseVtkText } from '../../src/external/vtk/read.ts';
import { gridToField } from '../../src/external/vtk/to-field.ts';
import type { LevelRef } from '../../src/external/where.ts';
import { legacyVtk, nodalGrid, vtuText } from './vtk-writers.ts';

const level: LevelRef = { study: 'tile-ext', index: 2, n: 16 };
const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'triangles' });
const u = (x: number, y: number) => 1 + x + 2 * y;
const good = legacyVtk(nodalGrid(mesh, 1, u));
const goodP2 = legacyVtk(nodalGrid(mesh, 2, u));
const goodVtu = vtuText(nodalGrid(mesh, 2, u));

/** Reads text as a level's output; returns the RungsInputError it must raise. */
function problem(text: string, file = 'out/level-3/solution.vtk', opts: { field?: string; degree?: number } = {}): RungsInputError {
  try {
    gridToField(parseVtkText(text, file, level), { ...opts, level });
  } catch (err) {
    expect(err).toBeInstanceOf(RungsInputError);
    return err as RungsInputError;
  }
  throw new Error('expected a RungsInputError');
}

const lines = (t: string) => t.split('\n');
/** 1-based number of the first line satisfying pred (from line `after`). */
const lineOf = (t: string, pred: (l: string) => boolean, after = 0) => lines(t).findIndex((l, i) => i >= after && pred(l)) + 1;
const replaceLine = (t: string, line: number, text: string) => lines(t).map((l, i) => (i === line - 1 ? text : l)).join('\n');
const prefix = (file: string, line: number) => `study 'tile-ext' level 3 (n = 16): ${file} line ${line}: `;

describe('legacy VTK bad input: every message names the level, the file and the line', () => {
  it('reads the well-formed file (control)', () => {
    expect(gridToField(parseVtkText(good, 'ok.vtk', level), { level }).dofs).toBe(9);
  });

  it('a truncated file', () => {
    const cut = good.slice(0, good.lastIndexOf('LOOKUP_TABLE') + 40); // stops after a few of the 9 values
    const total = lines(cut).length;
    const e = problem(cut);
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', total))).toBe(true);
    expect(e.message).toMatch(/file ends after \d of the 9 values of SCALARS temperature \(declared at line \d+\): the file is truncated/);
  });

  it('a file cut inside POINTS: the count is checked against what is left of the file before reading', () => {
    const cut = lines(good).slice(0, 8).join('\n');
    const e = problem(cut);
    // 27 numbers need at least 53 characters (a digit each, a separator between); 3 lines of coordinates hold fewer.
    expect(e.message).toMatch(/line 5: POINTS 9 \(line 5\) needs 27 values, but the \d+ characters after it can hold at most \d+: the declared count is wrong or the file is truncated/);
  });

  it('an unsupported cell type', () => {
    const at = lineOf(good, (l) => l === '5', lineOf(good, (l) => l.startsWith('CELL_TYPES')));
    const e = problem(replaceLine(good, at, '12'));
    // Cell 1's type is written on the line after CELL_TYPES.
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', at))).toBe(true);
    expect(e.message).toMatch(/cell 1 has type 12 \(VTK_HEXAHEDRON\), which rungs does not read; supported: VTK_LINE \(3\), VTK_TRIANGLE \(5\)/);
  });

  it('a mixed-cell mesh (triangles and boundary lines)', () => {
    const g = nodalGrid(mesh, 1, u);
    g.cells.push([0, 1]);
    const text = legacyVtk(g).replace(/^5$(?![\s\S]*^5$)/m, '5').split('\n');
    const typesAt = text.findIndex((l) => l.startsWith('CELL_TYPES'));
    text[typesAt + g.cells.length] = '3';
    const e = problem(text.join('\n'));
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', typesAt + 1 + g.cells.length))).toBe(true);
    expect(e.message).toMatch(/mixed-cell mesh: cell 9 has type 3 \(VTK_LINE\) but cell 1 has type 5 \(VTK_TRIANGLE\)/);
  });

  it('NaN in the nodal values', () => {
    const start = lineOf(good, (l) => l.startsWith('LOOKUP_TABLE'));
    const bad = replaceLine(good, start + 4, 'nan');
    const e = problem(bad);
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', start + 4))).toBe(true);
    expect(e.message).toContain("value 4 of values of SCALARS temperature is 'nan', not a finite number");
  });

  it('NaN in a coordinate', () => {
    const e = problem(replaceLine(good, 7, '0.5 NaN 0'));
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', 7))).toBe(true);
    // Line 7 holds point 1 (0-based), so its y is the 5th coordinate of the block.
    expect(e.message).toContain("coordinate 5 of coordinates of POINTS 9 is 'NaN'");
  });

  it('fewer points than POINTS declares', () => {
    const bad = good.replace('POINTS 9 double', 'POINTS 10 double');
    const cellsAt = lineOf(bad, (l) => l.startsWith('CELLS'));
    const e = problem(bad);
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', cellsAt))).toBe(true);
    expect(e.message).toMatch(/found 'CELLS' after 27 of the 30 coordinates of POINTS 10 \(declared at line 5\): the count in the file does not match the declared count/);
  });

  it('POINT_DATA with a count other than POINTS', () => {
    const bad = good.replace('POINT_DATA 9', 'POINT_DATA 8');
    const e = problem(bad);
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', lineOf(bad, (l) => l.startsWith('POINT_DATA'))))).toBe(true);
    expect(e.message).toContain('POINT_DATA 8 does not match POINTS 9');
  });

  it('a cell referring to a point that does not exist', () => {
    const at = lineOf(good, (l) => l.startsWith('3 '));
    const e = problem(replaceLine(good, at, '3 0 1 9'));
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', at))).toBe(true);
    expect(e.message).toContain('cell 1 refers to point 9, but the file has points 0..8');
  });

  it('a BINARY file and a non-VTK file', () => {
    expect(problem(good.replace('\nASCII\n', '\nBINARY\n')).message).toMatch(/line 3: BINARY legacy VTK files are not read/);
    expect(problem('hello\nworld\nASCII\n').message).toMatch(/line 1: not a legacy VTK file/);
  });

  it('a P2 file whose mid-edge nodes are in the wrong order', () => {
    // Swap the last two mid-edge nodes of the first quadratic triangle: nodes (1,2) and (2,0) trade places.
    const at = lineOf(goodP2, (l) => l.startsWith('6 '));
    const w = lines(goodP2)[at - 1]!.split(' ');
    [w[5], w[6]] = [w[6]!, w[5]!];
    const e = problem(replaceLine(goodP2, at, w.join(' ')));
    expect(e.message.startsWith(prefix('out/level-3/solution.vtk', at))).toBe(true);
    expect(e.message).toMatch(/cell 1: its node at .* should sit at .*check the VTK node order/);
  });

  it('a degree other than the declared one, several scalar arrays, and a missing array', () => {
    expect(problem(good, undefined, { degree: 2 }).message).toMatch(/declares degree 2, but the cells are VTK_TRIANGLE \(degree 1\)/);
    const two = good + 'SCALARS flux double 1\nLOOKUP_TABLE default\n' + '1\n'.repeat(9);
    expect(problem(two).message).toMatch(/several scalar point arrays \('temperature', 'flux'\); choose the solution with field/);
    expect(gridToField(parseVtkText(two, 'two.vtk'), { field: 'flux' }).fieldName).toBe('flux');
    expect(problem(two, undefined, { field: 'u' }).message).toMatch(/no point data named 'u'; the file has 'temperature', 'flux'/);
  });
});

describe('VTU bad input', () => {
  const file = 'out/level-3/solution.vtu';
  it('reads the well-formed file (control)', () => {
    expect(gridToField(parseVtkText(goodVtu, file, level), { level }).degree).toBe(2);
  });

  it('a DataArray marked binary or appended whose data is not what the mark says', () => {
    // ASCII numbers under format="binary": the digits and blanks read as base64, whose first word (the byte count)
    // does not fit the 48 connectivity entries; the message names the line of the data.
    const at = lineOf(goodVtu, (l) => l.includes('Name="connectivity"'));
    const e = problem(goodVtu.replace('Name="connectivity" format="ascii"', 'Name="connectivity" format="binary"'), file);
    expect(e.message.startsWith(prefix(file, at + 1))).toBe(true);
    expect(e.message).toMatch(/DataArray "connectivity" \(line \d+\) holds \d+ bytes of Int64 \(not a whole number of values\), but the 48 connectivity entries the offsets declare \(last offset 48\) need 384 bytes/);
    // An <AppendedData> no array uses is read past; an array pointing into an empty one is refused.
    const appended = goodVtu.replace('</UnstructuredGrid>', '</UnstructuredGrid>\n  <AppendedData encoding="raw">_</AppendedData>');
    expect(gridToField(parseVtkText(appended, file, level), { level }).degree).toBe(2);
    const pointing = appended.replace('Name="connectivity" format="ascii"', 'Name="connectivity" format="appended" offset="0"');
    const p = problem(pointing, file);
    expect(p.message.startsWith(prefix(file, at))).toBe(true);
    expect(p.message).toContain('DataArray "connectivity" has offset="0", past the end of the appended data (0 bytes');
  });

  it('a truncated file', () => {
    const cut = goodVtu.slice(0, goodVtu.indexOf('</Points>'));
    const e = problem(cut, file);
    expect(e.message).toMatch(/the file ends before <\/Points> \(opened at line \d+\): truncated file\?/);
    expect(e.message.startsWith(`study 'tile-ext' level 3 (n = 16): ${file} line ${lines(cut).length}: `)).toBe(true);
  });

  it('fewer and more values than NumberOfPoints declares', () => {
    const fewer = goodVtu.replace(/NumberOfPoints="(\d+)"/, (_m, k) => `NumberOfPoints="${Number(k) + 1}"`);
    // Points are read first: 26 declared points need 78 coordinates, the file holds 75.
    expect(problem(fewer, file).message).toMatch(/the DataArray ends after 75 of the 78 coordinates of NumberOfPoints="26" \(declared at line \d+\)/);
    const more = goodVtu.replace(/NumberOfPoints="(\d+)"/, (_m, k) => `NumberOfPoints="${Number(k) - 1}"`);
    expect(problem(more, file).message).toMatch(/DataArray \(line \d+\) holds more values than the 72 coordinates of NumberOfPoints="24": the counts do not match/);
    const fewerValues = goodVtu.replace(/(Name="temperature" format="ascii">\n)[^\n]*\n/, '$1');
    expect(problem(fewerValues, file).message).toMatch(/the DataArray "temperature" ends after 24 of the 25 values of point data "temperature"/);
  });

  it('NaN, a wrong cell type and mismatched tags', () => {
    const nanAt = lineOf(goodVtu, (l) => l.includes('Name="temperature"')) + 3;
    const e = problem(replaceLine(goodVtu, nanAt, 'NaN'), file);
    expect(e.message.startsWith(prefix(file, nanAt))).toBe(true);
    expect(e.message).toContain("is 'NaN', not a finite number");
    const typesAt = lineOf(goodVtu, (l) => l.includes('Name="types"')) + 1;
    expect(problem(replaceLine(goodVtu, typesAt, lines(goodVtu)[typesAt - 1]!.replace(/^22/, '23')), file).message)
      .toMatch(new RegExp(`${file} line ${typesAt}: cell 1 has type 23 \\(VTK_QUADRATIC_QUAD\\)`));
    expect(problem(goodVtu.replace('</Points>', '</Point>'), file).message).toMatch(/closing tag <\/Point> does not match <Points> opened at line \d+/);
  });
});

describe('legacy VTK CELLS block', () => {
  it('fewer cells than CELLS declares, and a cell list longer than its size', () => {
    const g = nodalGrid(mesh, 1, u);
    const text = legacyVtk(g).replace('CELLS 8 32', 'CELLS 9 36');
    const typesAt = lineOf(text, (l) => l.startsWith('CELL_TYPES'));
    expect(problem(text).message).toContain(`solution.vtk line ${typesAt}: cell 9 of CELLS (declared at line 15) should start with its node count, found 'CELL_TYPES': the count in the file does not match the declared count`);
    expect(problem(legacyVtk(g).replace('CELLS 8 32', 'CELLS 8 30')).message).toMatch(/cell 8 lists 3 nodes, more than the size 30 declared by CELLS at line 15 allows/);
  });
});
