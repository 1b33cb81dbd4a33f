/**
 * Maps of per-cell values. Every expected pixel below is worked out by hand from the pixel centres
 * x0 + (i + ½)·dx, y0 + (j + ½)·dy and the cells' vertices, chosen so that no centre lies on a cell edge.
 */
import { describe, expect, it } from 'vitest';
import { RungsInputError } from '../../src/errors.ts';
import { boxMesh, intervalMesh, lShapeMesh, meshFromArrays, rectangleMesh } from '../../src/mesh/index.ts';
import { cellDensities, decodeErrorMap, encodeErrorMap, rasterizeCells, type ErrorMap } from '../../src/mesh/raster.ts';

type Raster = Extract<ErrorMap, { kind: 'raster' }>;
type Profile = Extract<ErrorMap, { kind: 'profile' }>;

/** Four unit squares on [0, 2]^2, numbered row by row from the bottom left. */
function twoByTwoSquares() {
  return meshFromArrays({
    cellKind: 'quadrilateral',
    coords: [0, 0, 1, 0, 2, 0, 0, 1, 1, 1, 2, 1, 0, 2, 1, 2, 2, 2],
    cells: [0, 1, 4, 3, 1, 2, 5, 4, 3, 4, 7, 6, 4, 5, 8, 7],
  });
}

/** Pixel (i, j) of a 4 × 4 map of [0, 2]^2 lies in square (⌊i/2⌋, ⌊j/2⌋), number ⌊i/2⌋ + 2⌊j/2⌋ (by hand). */
const SQUARES_4X4 = [
  0, 0, 1, 1,
  0, 0, 1, 1,
  2, 2, 3, 3,
  2, 2, 3, 3,
];

describe('rasterizeCells in 2D', () => {
  it('gives each pixel the value of the quadrilateral holding its centre', () => {
    const mesh = twoByTwoSquares();
    const map = rasterizeCells(mesh, Float64Array.of(0, 1, 2, 3), { maxPixels: 4 }) as Raster;
    expect(map.kind).toBe('raster');
    expect([map.nx, map.ny]).toEqual([4, 4]);
    expect(map.bbox).toEqual([0, 2, 0, 2]);
    expect(Array.from(map.values)).toEqual(SQUARES_4X4);
    expect(map.slice).toBeUndefined();
  });

  it('tells the two triangles of a cut rectangle apart and keeps the aspect', () => {
    // [0, 2] × [0, 1] cut along y = x/2: lower-right triangle 10, upper-left 20. A 4 × 2 map has centres
    // x ∈ {0.25, 0.75, 1.25, 1.75}, y ∈ {0.25, 0.75}; a centre is in the upper triangle when y > x/2 (by hand):
    // row y = 0.25: only x = 0.25; row y = 0.75: x = 0.25, 0.75, 1.25.
    const mesh = meshFromArrays({ cellKind: 'triangle', coords: [0, 0, 2, 0, 2, 1, 0, 1], cells: [0, 1, 2, 0, 2, 3] });
    const map = rasterizeCells(mesh, Float64Array.of(10, 20), { maxPixels: 4 }) as Raster;
    expect([map.nx, map.ny]).toEqual([4, 2]);
    expect(Array.from(map.values)).toEqual([20, 10, 10, 10, 20, 20, 20, 10]);
  });

  it('keeps the aspect of a long rectangle with the default size', () => {
    // 4 : 1 box, longer side 128 pixels → 32 rows (by hand).
    const mesh = rectangleMesh({ x: [0, 4], y: [0, 1], nx: 8, ny: 2, cells: 'quadrilaterals' });
    const map = rasterizeCells(mesh, new Float64Array(mesh.nCells).fill(1)) as Raster;
    expect([map.nx, map.ny]).toEqual([128, 32]);
    expect(map.values.every((v) => v === 1)).toBe(true);
  });

  it('leaves the L-shape\'s notch empty (NaN) and covers the rest', () => {
    // [−1, 1]^2 in 16 × 16 pixels of side 1/8: the notch x > 0, y < 0 holds exactly the centres with i ≥ 8, j < 8,
    // 64 of 256 (by hand); every other centre lies inside some triangle.
    const mesh = lShapeMesh(4);
    const map = rasterizeCells(mesh, new Float64Array(mesh.nCells).fill(5), { maxPixels: 16 }) as Raster;
    expect([map.nx, map.ny]).toEqual([16, 16]);
    const wrong: string[] = [];
    for (let j = 0; j < 16; j++) {
      for (let i = 0; i < 16; i++) {
        const v = map.values[i + 16 * j];
        const inNotch = i >= 8 && j < 8;
        if (inNotch ? !Number.isNaN(v) : v !== 5) wrong.push(`(${i}, ${j}) = ${v}`);
      }
    }
    expect(wrong).toEqual([]);
  });

  it('keeps every pixel of a structured triangle mesh inside its own square', () => {
    // rectangleMesh lists its cells square by square, two triangles each ('right' cut); a 4 × 4 map of [0, 2]^2 puts
    // four centres in each unit square, none on a diagonal, so each pixel's cell is 2·square or 2·square + 1.
    const mesh = rectangleMesh({ x: [0, 2], y: [0, 2], nx: 2, ny: 2, cells: 'triangles', diagonal: 'right' });
    const map = rasterizeCells(mesh, new Float64Array(mesh.nCells).map((_, c) => c), { maxPixels: 4 }) as Raster;
    // Every pixel's value is one of the two triangles of its own square.
    const bad: string[] = [];
    for (let j = 0; j < 4; j++) {
      for (let i = 0; i < 4; i++) {
        const square = Math.floor(i / 2) + 2 * Math.floor(j / 2);
        const v = map.values[i + 4 * j];
        if (Math.floor(v / 2) !== square) bad.push(`(${i}, ${j}) = ${v}`);
      }
    }
    expect(bad).toEqual([]);
  });
});

describe('rasterizeCells in 3D: the mid-plane slice', () => {
  it('slices hexahedra at z = middle of the box', () => {
    // [0, 2] × [0, 2] × [0, 1] in 2 × 2 × 1 boxes: the slice z = ½ crosses each box once; same pixels as the squares.
    const mesh = boxMesh({ x: [0, 2], y: [0, 2], z: [0, 1], nx: 2, ny: 2, nz: 1, cells: 'hexahedra' });
    const map = rasterizeCells(mesh, Float64Array.of(0, 1, 2, 3), { maxPixels: 4 }) as Raster;
    expect(map.slice).toEqual({ axis: 'z', at: 0.5 });
    expect(Array.from(map.values)).toEqual(SQUARES_4X4);
  });

  it('slices Kuhn tetrahedra: each pixel in a tetrahedron of its own box', () => {
    // boxMesh lists six tetrahedra per box, box by box; giving each the number of its box must reproduce the squares.
    const mesh = boxMesh({ x: [0, 2], y: [0, 2], z: [0, 1], nx: 2, ny: 2, nz: 1, cells: 'tetrahedra' });
    const map = rasterizeCells(mesh, new Float64Array(mesh.nCells).map((_, c) => Math.floor(c / 6)), { maxPixels: 4 }) as Raster;
    expect(Array.from(map.values)).toEqual(SQUARES_4X4);
  });

  it('picks the layer below or above when the plane runs along cell faces, never a cell of another column', () => {
    // nz = 2: z = ½ is the face between the two layers; the value is the box's column i + 2j either way.
    const mesh = boxMesh({ x: [0, 2], y: [0, 2], z: [0, 1], nx: 2, ny: 2, nz: 2, cells: 'hexahedra' });
    const map = rasterizeCells(mesh, new Float64Array(mesh.nCells).map((_, c) => c % 4), { maxPixels: 4 }) as Raster;
    expect(Array.from(map.values)).toEqual(SQUARES_4X4);
  });
});

describe('rasterizeCells in 1D: the profile', () => {
  it('gives the cell midpoints and values', () => {
    // Cells [0, ¼], [¼, ½], [½, ¾], [¾, 1]: midpoints ⅛, ⅜, ⅝, ⅞ (by hand).
    const map = rasterizeCells(intervalMesh(0, 1, 4), Float64Array.of(1, 2, 3, 4)) as Profile;
    expect(map.kind).toBe('profile');
    expect(Array.from(map.x)).toEqual([0.125, 0.375, 0.625, 0.875]);
    expect(Array.from(map.values)).toEqual([1, 2, 3, 4]);
  });

  it('sorts cells listed right to left', () => {
    // Vertices 0, 1, ½; cells [½, 1] (value 7) then [0, ½] (value 3): the profile runs 0 → 1 (by hand).
    const mesh = meshFromArrays({ cellKind: 'interval', coords: [0, 1, 0.5], cells: [2, 1, 0, 2] });
    const map = rasterizeCells(mesh, Float64Array.of(7, 3)) as Profile;
    expect(Array.from(map.x)).toEqual([0.25, 0.75]);
    expect(Array.from(map.values)).toEqual([3, 7]);
  });

  it('samples a mesh with more cells than the profile holds', () => {
    // 10 cells of length 0.1, 4 samples at ⅛, ⅜, ⅝, ⅞, inside cells ⌊10x⌋ = 1, 3, 6, 8 (by hand).
    const map = rasterizeCells(intervalMesh(0, 1, 10), Float64Array.from({ length: 10 }, (_, c) => c), { maxProfilePoints: 4 }) as Profile;
    expect(Array.from(map.x)).toEqual([0.125, 0.375, 0.625, 0.875]);
    expect(Array.from(map.values)).toEqual([1, 3, 6, 8]);
  });
});

describe('cellDensities', () => {
  it('is sqrt(∫_K e² / |K|), with round-off negatives as 0', () => {
    // Unit squares: |K| = 1, so the density is the square root of the integral (by hand).
    const d = cellDensities(twoByTwoSquares(), Float64Array.of(4, 9, 0, -1e-30));
    expect(Array.from(d)).toEqual([2, 3, 0, 0]);
    // Triangles of area ½ on the unit square: ∫ = ½ · 9 → density 3 (by hand).
    const t = meshFromArrays({ cellKind: 'triangle', coords: [0, 0, 1, 0, 1, 1, 0, 1], cells: [0, 1, 2, 0, 2, 3] });
    expect(Array.from(cellDensities(t, Float64Array.of(4.5, 0.5)))).toEqual([3, 1]);
  });
});

describe('the JSON form', () => {
  it('round-trips a raster with NaN pixels, as float32', () => {
    const mesh = lShapeMesh(4);
    const values = new Float64Array(mesh.nCells).map((_, c) => 1 / (c + 3));
    const map = rasterizeCells(mesh, values, { maxPixels: 16 }) as Raster;
    const encoded = encodeErrorMap(map);
    const text = JSON.stringify(encoded);
    expect(text).not.toContain('null');
    const back = decodeErrorMap(JSON.parse(text)) as Raster;
    expect([back.nx, back.ny, back.bbox]).toEqual([map.nx, map.ny, map.bbox]);
    // Object.is treats NaN as equal to NaN and tells the bits apart otherwise.
    expect(Array.from(back.values).every((v, k) => Object.is(v, map.values[k]))).toBe(true);
  });

  it('round-trips a profile and a 3D slice', () => {
    const p = rasterizeCells(intervalMesh(0, 1, 5), Float64Array.of(0.1, 0.2, 0.3, 0.4, 0.5)) as Profile;
    const pb = decodeErrorMap(JSON.parse(JSON.stringify(encodeErrorMap(p)))) as Profile;
    expect(Array.from(pb.x)).toEqual(Array.from(p.x, Math.fround));
    expect(Array.from(pb.values)).toEqual(Array.from(p.values, Math.fround));
    const s = rasterizeCells(boxMesh({ x: [0, 1], y: [0, 1], z: [0, 1], nx: 1, ny: 1, nz: 1, cells: 'hexahedra' }), Float64Array.of(2), { maxPixels: 2 });
    expect((decodeErrorMap(encodeErrorMap(s)) as Raster).slice).toEqual({ axis: 'z', at: 0.5 });
  });

  it('keeps a 128 × 128 map under 100 KB of JSON', () => {
    // The budget set for a map in a study's JSON (design requirement, no source); 128² float32 are 65 536 bytes,
    // 4 · ⌈65 536 / 3⌉ = 87 384 characters of base64 (RFC 4648 §4; by hand).
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 20, ny: 20, cells: 'triangles' });
    const map = rasterizeCells(mesh, new Float64Array(mesh.nCells).map((_, c) => Math.sqrt(c)));
    const text = JSON.stringify(encodeErrorMap(map));
    expect((map as Raster).nx * (map as Raster).ny).toBe(128 * 128);
    expect(text.length).toBeLessThan(100_000);
    expect((encodeErrorMap(map) as { values: string }).values.length).toBe(87_384);
  });
});

describe('mistakes', () => {
  it('names the field', () => {
    const mesh = twoByTwoSquares();
    expect(() => rasterizeCells(mesh, Float64Array.of(1, 2))).toThrow(RungsInputError);
    expect(() => rasterizeCells(mesh, Float64Array.of(1, 2))).toThrow(/one per cell \(4\), got 2/);
    expect(() => rasterizeCells(mesh, new Float64Array(4), { maxPixels: 0 })).toThrow(/maxPixels must be an integer from 1/);
    const good = encodeErrorMap(rasterizeCells(mesh, new Float64Array(4), { maxPixels: 4 }));
    expect(() => decodeErrorMap({ ...good, values: 'AAAA' })).toThrow(/expected 16 float32 numbers/);
    expect(() => decodeErrorMap({ ...good, bbox: [1, 0, 0, 1] } as typeof good)).toThrow(/bbox must be/);
    expect(() => decodeErrorMap({ ...good, encoding: 'png' } as unknown as typeof good)).toThrow(/encoding must be/);
  });
});
