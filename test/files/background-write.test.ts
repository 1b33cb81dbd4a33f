import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { backgroundWritesPending, reserveBackgroundWrite, settleBackgroundWrites, writeFileAtomicInBackground } from '../../src/files/background-write.ts';
import { rawVtuDataBytes, vtuBytes, writeVtuInBackground } from '../../src/external/vtk/write.ts';
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

describe('reserveBackgroundWrite', () => {
  const bytes = (n: number, seed: number): Uint8Array => {
    const rand = mulberry32(seed);
    return Uint8Array.from({ length: n }, () => Math.floor(rand() * 256));
  };

  it.each([
    ['longer than the file (cut to it)', 3_000_000, 1_234_567],
    ['shorter than the file', 100_000, 1_500_001],
    ['of several zero pieces, the last one partial', 9_000_001, 8_999_999],
  ])('a reservation %s: the write leaves exactly its own bytes, and no temporary file', async (_name, reserved, size) => {
    const dir = mkdtempSync(join(root, 'reserve-'));
    const path = join(dir, 'errors.vtu');
    reserveBackgroundWrite(path, reserved);
    expect(readdirSync(dir).filter((n) => n.endsWith('.tmp'))).toHaveLength(1); // its file is open, beside the target
    const content = bytes(size, size);
    writeFileAtomicInBackground(path, [content.subarray(0, 1000), content.subarray(1000)]);
    await settleBackgroundWrites(dir);
    expect(readFileSync(path).equals(Buffer.from(content))).toBe(true);
    expect(readdirSync(dir)).toEqual(['errors.vtu']);
  });

  it('a reservation no write takes is removed when its folder is settled; other folders keep theirs', async () => {
    const a = mkdtempSync(join(root, 'reserve-a-')), b = mkdtempSync(join(root, 'reserve-b-'));
    reserveBackgroundWrite(join(a, 'errors.vtu'), 50_000);
    reserveBackgroundWrite(join(b, 'errors.vtu'), 50_000);
    await settleBackgroundWrites(a);
    expect(readdirSync(a)).toEqual([]);
    expect(readdirSync(b)).toHaveLength(1);
    await settleBackgroundWrites();
    expect(readdirSync(b)).toEqual([]);
  });

  it('a reservation no write took is removed when the process exits without settling (a level that failed)', () => {
    const dir = mkdtempSync(join(root, 'reserve-exit-'));
    const module = new URL('../../src/files/background-write.ts', import.meta.url).href;
    const script = `import { reserveBackgroundWrite } from ${JSON.stringify(module)};
      reserveBackgroundWrite(${JSON.stringify(join(dir, 'errors.vtu'))}, 2_000_000);
      setTimeout(() => process.exit(3), 50);`;
    const r = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], { encoding: 'utf8' });
    expect(r.status).toBe(3);
    expect(readdirSync(dir)).toEqual([]);
  });

  it('a reservation that cannot be made (no such folder) changes nothing: the write reports its own failure', async () => {
    const missing = join(root, 'no-reserve-folder', 'errors.vtu');
    reserveBackgroundWrite(missing, 1000);
    writeFileAtomicInBackground(missing, [Buffer.from('x')]);
    await expect(settleBackgroundWrites(join(root, 'no-reserve-folder'))).rejects.toThrow(`${missing} could not be written`);
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

  it('rawVtuDataBytes is the size of a raw file\'s appended data, known before its values', () => {
    const tail = '\n</AppendedData>\n</VTKFile>\n';
    for (const cells of ['triangles', 'quadrilaterals'] as const) {
      const mesh = rectangleMesh({ x: [0, 1], y: [0, 1], nx: 7, ny: 5, cells });
      const u = new Float64Array(mesh.nVertices), grad = new Float64Array(2 * mesh.nVertices), d = new Float64Array(mesh.nCells);
      const file = Buffer.from(vtuBytes({ mesh, pointData: { u, grad: { values: grad, components: 2 } }, cellData: { d }, format: 'raw' }));
      const data = file.length - (file.indexOf('<AppendedData encoding="raw">\n_') + '<AppendedData encoding="raw">\n_'.length) - tail.length;
      expect(data).toBe(rawVtuDataBytes(mesh, [1, 2], [1]));
    }
  });
});
