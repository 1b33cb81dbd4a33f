import { describe, expect, it } from 'vitest';
import { parseErrorsCsv, parseErrorsJson } from '../../src/external/errors-file.ts';
import type { LevelRef } from '../../src/external/where.ts';

const level: LevelRef = { study: 'tile-ext', index: 1, n: 8 };
const file = 'out/level-2/errors.json';
const at = `study 'tile-ext' level 2 (n = 8): ${file}`;

describe('errors.json', () => {
  it('reads dofs, h, errors and quantities as written (JSON numbers read back exactly, ECMA-404)', () => {
    const text = '{ "dofs": 1234, "h": 0.01, "errors": { "L2": 1.2345678901234567e-4, "H1semi": 2e-2 }, "quantities": { "flux_top": -1.2345 } }';
    const r = parseErrorsJson(text, file, { level, require: ['L2', 'H1semi'], requireQuantities: ['flux_top'] });
    expect(r).toEqual({ file, dofs: 1234, h: 0.01, cells: null, errors: { L2: 1.2345678901234567e-4, H1semi: 0.02 }, quantities: { flux_top: -1.2345 } });
  });

  it.each([
    ['{ "h": 0.1, "errors": { "L2": 1 } }', /^study 'tile-ext' level 2 \(n = 8\): out\/level-2\/errors\.json line 1: dofs: expected the number of unknowns/],
    ['{ "dofs": 10.5, "errors": {} }', /: dofs: expected an integer/],
    ['{ "dofs": 10, "errors": { "L2": -1 } }', /: errors\.L2: errors must be ≥ 0/],
    ['{ "dofs": 10, "errors": { "L2": "small" } }', /: errors\.L2: expected a number/],
    ['{ "dofs": 10, "error": { "L2": 1 } }', /unknown field 'error'; valid fields: dofs, h, cells, errors, quantities, info/],
    ['{ "dofs": 10, "h": 0, "errors": { "L2": 1 } }', /: h: expected a positive mesh size/],
  ])('rejects %s', (text, message) => {
    expect(() => parseErrorsJson(text, file, { level })).toThrow(message);
  });

  it('names the line of a NaN (Python json.dump writes NaN by default, which is not JSON)', () => {
    const text = '{\n  "dofs": 81,\n  "errors": {\n    "L2": NaN\n  }\n}';
    expect(() => parseErrorsJson(text, file, { level })).toThrow(`${at} line 4: NaN is not a JSON number`);
  });

  it('names the missing norm and what the file holds', () => {
    expect(() => parseErrorsJson('{ "dofs": 9, "errors": { "L2": 0.1 } }', file, { level, require: ['L2', 'H1semi'] }))
      .toThrow(`${at} line 1: no error 'H1semi'; the file has 'L2' and the study measures L2, H1semi`);
  });
});

describe('errors.csv (one row: dofs, h and one column per name)', () => {
  const csvFile = 'out/level-2/errors.csv';
  it('reads the row, quantities by name', () => {
    const r = parseErrorsCsv('dofs,h,L2,H1semi,flux_top\r\n81,0.125,5.4e-3,0.25,-1.5\r\n', csvFile, { level, quantities: ['flux_top'] });
    expect(r).toEqual({ file: csvFile, dofs: 81, h: 0.125, cells: null, errors: { L2: 5.4e-3, H1semi: 0.25 }, quantities: { flux_top: -1.5 } });
  });
  it('rejects a second row, a missing dofs column and a non-number, naming the line', () => {
    expect(() => parseErrorsCsv('dofs,L2\n81,0.1\n289,0.02\n', csvFile, { level })).toThrow(`study 'tile-ext' level 2 (n = 8): ${csvFile} line 3: expected exactly one data row`);
    expect(() => parseErrorsCsv('h,L2\n0.1,0.1\n', csvFile, { level })).toThrow(/line 1: no 'dofs' column/);
    expect(() => parseErrorsCsv('dofs,L2\n81,nan\n', csvFile, { level })).toThrow(`${csvFile} line 2: column 'L2' holds 'nan', not a finite number`);
  });
});

describe('readLevelOutput picks the protocol file in the level folder', () => {
  it('reads errors.csv when there is no errors.json, and uses the level h when the file gives none', async () => {
    const { mkdtempSync, writeFileSync, rmSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const { readLevelOutput } = await import('../../src/external/output.ts');
    const dir = mkdtempSync(join(tmpdir(), 'rungs-out-'));
    try {
      writeFileSync(join(dir, 'errors.csv'), 'dofs,L2,flux\n81,0.004,1.5\n');
      const out = readLevelOutput('errors', dir, { level, h: 0.125, norms: ['L2'], quantities: ['flux'] });
      expect(out).toMatchObject({ kind: 'errors', dofs: 81, h: 0.125, errors: { L2: 0.004 }, quantities: { flux: 1.5 } });
      // The VTK protocol needs its quantities in an errors.json next to the solution.
      writeFileSync(join(dir, 'solution.vtk'), '# vtk DataFile Version 3.0\nt\nASCII\nDATASET UNSTRUCTURED_GRID\nPOINTS 2 double\n0 0 0 1 0 0\n' +
        'CELLS 1 3\n2 0 1\nCELL_TYPES 1\n3\nPOINT_DATA 2\nSCALARS u double\nLOOKUP_TABLE default\n0 1\n');
      // The errors file next to the solution supplies the solver's own dof count (81), not the 2 VTK nodes.
      const field = readLevelOutput('vtk', dir, { level, h: 1 });
      expect(field).toMatchObject({ kind: 'field', dofs: 81, h: 1, fieldName: 'u' });
      rmSync(join(dir, 'errors.csv'));
      expect(readLevelOutput('vtk', dir, { level, h: 1 })).toMatchObject({ dofs: 2 });
      writeFileSync(join(dir, 'errors.csv'), 'dofs,L2,flux\n81,0.004,1.5\n');
      expect(() => readLevelOutput('vtk', dir, { level, h: 1, quantities: ['heat'] })).toThrow(/no quantity 'heat'/);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
