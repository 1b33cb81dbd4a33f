// Solution files are read chunk by chunk: the result, and every refusal word for word, must not depend on where the
// chunks end; no read asks for more than one chunk; a file above the size limit is refused before a byte of it is
// read. Chunks here are a few bytes, so every token, tag, reference and line break of these small files is cut
// somewhere; the files are kiln-rod and tile grids written by test/external/vtk-writers.ts.
import { closeSync, ftruncateSync, mkdirSync, mkdtempSync, openSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { parseVtkText, readVtkFile } from '../../src/external/vtk/read.ts';
import { readLegacyVtk } from '../../src/external/vtk/legacy.ts';
import { readVtu } from '../../src/external/vtk/vtu.ts';
import { ByteWindow, bufferSource, fileSource, type ByteSource } from '../../src/external/vtk/source.ts';
import { checkOutputSize, defaultMaxOutputBytes, outputLimit, READ_BYTES_PER_FILE_BYTE } from '../../src/external/vtk/limits.ts';
import { readLevelOutput } from '../../src/external/output.ts';
import { gridToField } from '../../src/external/vtk/to-field.ts';
import type { VtkGrid } from '../../src/external/vtk/grid.ts';
import type { LevelRef } from '../../src/external/where.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { intervalMesh } from '../../src/mesh/interval.ts';
import { validateStudy } from '../../src/study/schema.ts';
import { defineStudy, external, rectangle } from '../../src/index.ts';
import { legacyVtk, nodalGrid, vtuText } from './vtk-writers.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

const level: LevelRef = { study: 'kiln-rod', index: 2, n: 16 };
const dir = mkdtempSync(join(tmpdir(), 'rungs-stream-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// Seeded mutants: the project's own mulberry32, so every run checks the same ones.
const rng = mulberry32;

/** Everything a grid holds, as text (typed arrays listed), or the refusal's message. */
function outcome(read: () => VtkGrid): string {
  try {
    const g = read();
    return JSON.stringify(g, (_k, v: unknown) => (ArrayBuffer.isView(v) ? Array.from(v as Float64Array) : v));
  } catch (err) {
    if (err instanceof RungsInputError) return `refused: ${err.message}`;
    return `CRASH: ${(err as Error).stack}`;
  }
}

const tileTemperature = (x: number, y: number) => 20.123456789 + 7.25 * x + 3.5 * y * y;
const tile = nodalGrid(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 2, ny: 2, cells: 'triangles' }), 1, tileTemperature);
const rodP2 = nodalGrid(intervalMesh(0, 1, 3), 2, (x) => 400 + 30 * x * x);
const quadP2 = nodalGrid(rectangleMesh({ x: [0, 1], y: [0, 1], nx: 1, ny: 2, cells: 'quadrilaterals' }), 2, tileTemperature);

/** Valid files with the features that cross chunk ends: names in UTF-8, a BOM, CRLF, METADATA, comments, references. */
const legacyFiles: [string, string][] = [
  ['classic P1 tile', legacyVtk(tile)],
  ['5.1 P1 tile', legacyVtk(tile, '5.1')],
  ['P2 rod', legacyVtk(rodP2)],
  ['Q2 tile, CRLF', legacyVtk(quadP2).replace(/\n/g, '\r\n')],
  ['UTF-8 name and BOM', '\uFEFF' + legacyVtk(tile, 'classic', 'température_°C')],
  ['METADATA block', legacyVtk(tile).replace('CELL_TYPES', 'METADATA\nINFORMATION 1\nNAME unit LOCATION x\nDATA 1 kelvin\n\nCELL_TYPES')],
];
const vtuFiles: [string, string][] = [
  ['P1 tile', vtuText(tile)],
  ['P2 rod, UTF-8 name', vtuText(rodP2, 'température')],
  ['references and BOM', '\uFEFF' + vtuText(tile).replace('byte_order="LittleEndian"', 'byte_order="Little&#69;ndian" note="a &amp; b &#x20AC;"')],
  ['Q2 tile, CRLF', vtuText(quadP2).replace(/\n/g, '\r\n')],
];

function mutants(text: string, seed: number): string[] {
  const r = rng(seed);
  const out: string[] = [text];
  for (let k = 0; k < text.length; k += 3) out.push(text.slice(0, k));
  const hostile = ['\0', '#', '<', '>', '&', '"', ';', '\uFFFD', 'é', '\n', ' '];
  for (let k = 0; k < 150; k++) {
    const at = Math.floor(r() * text.length);
    out.push(text.slice(0, at) + hostile[Math.floor(r() * hostile.length)]! + text.slice(at + 1));
  }
  return out;
}

describe('the result does not depend on where chunks end', () => {
  const check = (files: [string, string][], file: string) => {
    const differ: string[] = [];
    let read = 0, refused = 0;
    files.forEach(([name, good], f) => {
      for (const [m, text] of mutants(good, 100 + f).entries()) {
        const whole = outcome(() => parseVtkText(text, file, level));
        if (whole.startsWith('CRASH')) differ.push(`${name} #${m}: ${whole}`);
        if (whole.startsWith('refused')) refused++; else read++;
        for (const chunk of [16, 17, 29]) {
          const cut = outcome(() => parseVtkText(text, file, level, chunk));
          if (cut !== whole) differ.push(`${name} mutant #${m}, chunks of ${chunk}: ${cut.slice(0, 300)} ≠ ${whole.slice(0, 300)}`);
        }
      }
    });
    return { differ, read, refused };
  };

  it('legacy VTK: valid files, every third truncation and 150 seeded substitutions each, in chunks of 16, 17 and 29 bytes', () => {
    const { differ, read, refused } = check(legacyFiles, 'out/level-3/solution.vtk');
    expect(differ.slice(0, 5)).toEqual([]);
    // Both kinds occur, so the comparison covers grids and messages.
    expect(read).toBeGreaterThan(legacyFiles.length);
    expect(refused).toBeGreaterThan(500);
  });

  it('VTK XML: the same for .vtu files, whose structure is read in one pass and each DataArray in another', () => {
    const { differ, read, refused } = check(vtuFiles, 'out/level-3/solution.vtu');
    expect(differ.slice(0, 5)).toEqual([]);
    expect(read).toBeGreaterThan(vtuFiles.length);
    expect(refused).toBeGreaterThan(500);
  });

  it('names in UTF-8 and character references read as the text they are', () => {
    const legacy = parseVtkText(legacyFiles[4]![1], 'a.vtk', level, 16);
    expect(legacy.pointData.map((a) => a.name)).toEqual(['température_°C']);
    const vtu = parseVtkText(vtuFiles[1]![1], 'a.vtu', level, 16);
    expect(vtu.pointData.map((a) => a.name)).toEqual(['température']);
    expect(outcome(() => parseVtkText(vtuFiles[2]![1], 'a.vtu', level, 16))).toBe(outcome(() => parseVtkText(vtuText(tile), 'a.vtu', level)));
    expect(outcome(() => parseVtkText(legacyFiles[3]![1], 'a.vtk', level, 17))).toBe(outcome(() => parseVtkText(legacyVtk(quadP2), 'a.vtk', level)));
  });

  it('a message quoting a damaged token shows it as UTF-8, cut or not', () => {
    const bad = legacyVtk(tile).replace('SCALARS temperature double 1\nLOOKUP_TABLE default\n20.123456789', 'SCALARS temperature double 1\nLOOKUP_TABLE default\n20,1°C');
    for (const chunk of [16, 1 << 20]) {
      expect(outcome(() => parseVtkText(bad, 'b.vtk', level, chunk))).toContain("value 1 of values of SCALARS temperature is '20,1°C', not a finite number");
    }
  });
});

/** A source that records the largest read it is asked for and the bytes it hands out. */
function counting(inner: ByteSource): ByteSource & { largest: number; total: number } {
  const s = {
    size: inner.size, largest: 0, total: 0,
    read(into: Buffer, at: number, length: number, position: number): number {
      s.largest = Math.max(s.largest, length);
      const got = inner.read(into, at, length, position);
      s.total += got;
      return got;
    },
    close: () => inner.close(),
  };
  return s;
}

describe('files are read a chunk at a time', () => {
  const grid = nodalGrid(rectangleMesh({ x: [0, 2], y: [0, 1], nx: 40, ny: 20, cells: 'triangles' }), 2, tileTemperature);
  const vtk = join(dir, 'solution.vtk');
  const vtu = join(dir, 'solution.vtu');
  writeFileSync(vtk, legacyVtk(grid));
  writeFileSync(vtu, vtuText(grid));

  it('a legacy file is read once, in reads of at most one chunk, to the grid of the whole text', () => {
    const src = counting(fileSource(vtk));
    const g = readLegacyVtk(src, vtk, level, 4096);
    src.close();
    const size = statSync(vtk).size;
    expect(size).toBeGreaterThan(100_000);
    expect(src.largest).toBeLessThanOrEqual(4096);
    expect(src.total).toBe(size);
    expect(outcome(() => g)).toBe(outcome(() => parseVtkText(legacyVtk(grid), vtk, level)));
  });

  it('a .vtu file is read twice at most (structure, then its DataArrays), in reads of at most one chunk', () => {
    const src = counting(fileSource(vtu));
    const g = readVtu(src, vtu, level, 4096);
    src.close();
    const size = statSync(vtu).size;
    expect(src.largest).toBeLessThanOrEqual(4096);
    expect(src.total).toBeGreaterThanOrEqual(size);
    expect(src.total).toBeLessThanOrEqual(2 * size);
    expect(outcome(() => g)).toBe(outcome(() => parseVtkText(vtuText(grid), vtu, level)));
  });

  it('readVtkFile gives what the text gives, and the same field', () => {
    for (const [file, text] of [[vtk, legacyVtk(grid)], [vtu, vtuText(grid)]] as const) {
      expect(outcome(() => readVtkFile(file, level))).toBe(outcome(() => parseVtkText(text, file, level)));
      expect(gridToField(readVtkFile(file, level, { chunkBytes: 100 })).dofs).toBe(grid.points.length);
    }
  });

  it('a piece longer than the window may grow to is refused, not read into memory', () => {
    const src = bufferSource(Buffer.from(`${'7'.repeat(300)} 1\n`));
    const w = new ByteWindow(src, 0, src.size, (bytes) => { throw new RungsInputError(`piece over ${bytes} bytes`); }, 16, 64);
    w.more(0);
    expect(() => { while (w.more(0)); }).toThrow('piece over 64 bytes');
  });
});

describe('a file above the size limit is refused before it is read', () => {
  it('a 12 GB solution (a sparse file: no disk used) is refused naming the file, its size and the limit', () => {
    const file = join(dir, 'huge.vtk');
    closeSync(openSync(file, 'w'));
    try {
      // truncate grows the file without writing it; the reader must refuse it from its size alone.
      const fd = openSync(file, 'r+');
      try { ftruncateSync(fd, 12e9); } finally { closeSync(fd); }
    } catch {
      return expect.fail('could not make a sparse file in the temporary folder');
    }
    const msg = outcome(() => readVtkFile(file, level, { limit: outputLimit(4e9) }));
    expect(msg).toBe(
      `refused: study 'kiln-rod' level 3 (n = 16): ${file}: the file is 12 GB (12000000000 bytes), more than the limit of 4 GB (4000000000 bytes) ` +
        "on a solver's output file (maxOutputBytes in the study's external({ … })); it was not read. Write a smaller file (a coarser level, " +
        'fewer arrays, fewer digits) or, on a machine with the memory, raise external({ maxOutputBytes })',
    );
  });

  it('the limit is checked before parsing: garbage above it is refused for its size, below it for its content', () => {
    const file = join(dir, 'garbage.vtk');
    writeFileSync(file, 'not a VTK file at all\n'.repeat(10));
    expect(outcome(() => readVtkFile(file, level, { limit: outputLimit(100) }))).toMatch(/garbage\.vtk: the file is 220 bytes, more than the limit of 100 bytes/);
    expect(outcome(() => readVtkFile(file, level, { limit: outputLimit(220) }))).toMatch(/garbage\.vtk line 1: not a legacy VTK file/);
  });

  it('readLevelOutput applies maxOutputBytes to the solution and to errors files', () => {
    const out = join(dir, 'level-3');
    rmSync(out, { recursive: true, force: true });
    mkdirSync(out);
    const text = legacyVtk(tile);
    writeFileSync(join(out, 'solution.vtk'), text);
    expect(readLevelOutput('vtk', out, { level, h: 0.5, maxOutputBytes: text.length }).dofs).toBe(9);
    expect(() => readLevelOutput('vtk', out, { level, h: 0.5, maxOutputBytes: text.length - 1 }))
      .toThrow(`study 'kiln-rod' level 3 (n = 16): ${join(out, 'solution.vtk')}: the file is ${text.length} bytes, more than the limit of ${text.length - 1} bytes`);
    rmSync(join(out, 'solution.vtk'));
    writeFileSync(join(out, 'errors.json'), '{ "dofs": 81, "errors": { "L2": 0.004 } }\n');
    expect(readLevelOutput('errors', out, { level, h: 0.5, norms: ['L2'] }).dofs).toBe(81);
    expect(() => readLevelOutput('errors', out, { level, h: 0.5, norms: ['L2'], maxOutputBytes: 10 }))
      .toThrow(/errors\.json: the file is 42 bytes, more than the limit of 10 bytes/);
  });

  it('the default follows the memory available, and checkOutputSize lets a file at the limit through', () => {
    expect(defaultMaxOutputBytes({ total: 32e9, available: 12e9, heapLimit: 4e9 })).toBe(12e9 / READ_BYTES_PER_FILE_BYTE);
    const limit = outputLimit(undefined);
    expect(limit.bytes).toBeGreaterThan(0);
    expect(limit.source).toMatch(/^the default: .* of memory available \/ \d+ bytes of memory per byte read$/);
    expect(() => checkOutputSize('x.vtk', 1000, { bytes: 1000, source: 'test' }, level)).not.toThrow();
    expect(() => checkOutputSize('x.vtk', 1001, { bytes: 1000, source: 'test' }, level)).toThrow(/x\.vtk: the file is 1 kB \(1001 bytes\), more than the limit of 1 kB \(1000 bytes\)/);
  });

  it('external({ maxOutputBytes }) is part of the study schema; a bad value names the field', () => {
    const decl = (maxOutputBytes: number) => defineStudy({
      name: 'tile-ext', domain: rectangle([0, 1], [0, 1]), exact: 'x*y',
      discretization: external({ command: 'true', output: 'vtk', maxOutputBytes }), ladder: { n: [2, 4] },
    });
    expect(() => validateStudy(decl(2e9), 'tile-ext.study.ts')).not.toThrow();
    expect(() => validateStudy(decl(-5), 'tile-ext.study.ts')).toThrow(/tile-ext\.study\.ts \(study 'tile-ext'\): discretization\.maxOutputBytes: expected a positive number of bytes/);
    expect(() => validateStudy(decl(1.5), 'tile-ext.study.ts')).toThrow(/discretization\.maxOutputBytes: expected a whole number of bytes/);
  });
});
