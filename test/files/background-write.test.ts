import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { backgroundWritesPending, settleBackgroundWrites, writeFileAtomicInBackground } from '../../src/files/background-write.ts';
import { vtuBytes, writeVtuInBackground } from '../../src/external/vtk/write.ts';
import { rectangleMesh } from '../../src/mesh/rectangle.ts';
import { mulberry32 } from '../../src/mesh/random.ts';

const root = mkdtempSync(join(tmpdir(), 'rungs-background-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

describe('writeFileAtomicInBackground', () => {
  it('writes the pieces in order, whole once settled, with no temporary file left', async () => {
    const dir = join(root, 'kiln');
    mkdirSync(dir);
    const path = join(dir, 'rod.bin');
    // Pieces of odd sizes, one in shared memory (a mesh's cells live there), one empty.
    const shared = new Uint8Array(new SharedArrayBuffer(70_001));
    const plain = new Uint8Array(1_000_003);
    const rand = mulberry32(7);
    for (let i = 0; i < shared.length; i++) shared[i] = Math.floor(rand() * 256);
    for (let i = 0; i < plain.length; i++) plain[i] = Math.floor(rand() * 256);
    const pieces = [plain, new Uint8Array(0), shared, plain.subarray(10, 20)];
    writeFileAtomicInBackground(path, pieces);
    expect(backgroundWritesPending()).toContain(path);
    await settleBackgroundWrites(dir);
    expect(backgroundWritesPending()).not.toContain(path);
    const expected = Buffer.concat(pieces.map((p) => Buffer.from(p)));
    expect(readFileSync(path).equals(expected)).toBe(true);
    expect(readdirSync(dir)).toEqual(['rod.bin']);
  });

  it('a second write of the same file lands after the first', async () => {
    const path = join(root, 'tile.txt');
    writeFileAtomicInBackground(path, [Buffer.from('first')]);
    writeFileAtomicInBackground(path, [Buffer.from('second')]);
    await settleBackgroundWrites(root);
    expect(readFileSync(path, 'utf8')).toBe('second');
  });

  it('a write that fails is reported when settled, naming the file; other folders are not waited for', async () => {
    const missing = join(root, 'no-such-folder', 'errors.vtu');
    const other = join(root, 'elsewhere', 'ok.txt');
    mkdirSync(join(root, 'elsewhere'));
    writeFileAtomicInBackground(missing, [Buffer.from('x')]);
    writeFileAtomicInBackground(other, [Buffer.from('y')]);
    await expect(settleBackgroundWrites(join(root, 'no-such-folder'))).rejects.toThrow(`${missing} could not be written`);
    expect(backgroundWritesPending()).toEqual([other]);
    await settleBackgroundWrites();
    expect(readFileSync(other, 'utf8')).toBe('y');
    expect(existsSync(missing)).toBe(false);
  });
});

describe('writeVtuInBackground', () => {
  it('writes the bytes of vtuBytes, in every format, also with pieces made through the reused buffer', async () => {
    // 300 × 300 squares in triangles: 180k cells, so the offsets (Int64, 1.4 MB) and the ASCII text pass through the
    // writer's 4 MiB buffer more than once.
    const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 300, ny: 300, cells: 'triangles' });
    const rand = mulberry32(11);
    const u = Float64Array.from({ length: mesh.nVertices }, () => rand() - 0.5);
    const d = Float64Array.from({ length: mesh.nCells }, () => rand());
    for (const format of ['ascii', 'binary', 'raw'] as const) {
      const input = { mesh, pointData: { u }, cellData: { kiln_density: d }, format };
      const path = join(root, `map-${format}.vtu`);
      writeVtuInBackground(path, input);
      await settleBackgroundWrites(root);
      expect(readFileSync(path).equals(Buffer.from(vtuBytes(input)))).toBe(true);
    }
  });
});
