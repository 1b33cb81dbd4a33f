// Writer of VTK XML unstructured grids (.vtu) for the error maps: the mesh, values at its vertices (point data) and
// values per cell (cell data). Format: "VTK File Formats", Kitware (VTK User's Guide, XML file formats):
// <VTKFile type="UnstructuredGrid"> <UnstructuredGrid> <Piece NumberOfPoints NumberOfCells> with <PointData>,
// <CellData>, <Points> (one 3-component DataArray) and <Cells> (DataArrays connectivity, offsets — the END of each
// cell's connectivity — and types).
//
// Cells are linear, from the mesh's vertices, in rungs's vertex order, which is VTK's for every kind (src/mesh/
// types.ts: triangles and quadrilaterals counter-clockwise, tetrahedra with a positive Jacobian determinant, i.e. the
// first three vertices seen counter-clockwise from the fourth, hexahedra in VTK_HEXAHEDRON's order). A field of a
// higher degree goes in as its values at the vertices (`vertexValues`); quadratic VTK cells are not written.
//
// Three encodings: 'ascii' (the default) writes each number in the shortest form that reads back as the same double
// (ECMAScript Number::toString, which round-trips exactly), so values come back bit for bit; 'binary' writes each
// DataArray inline as base64 of a UInt64 byte count followed by the raw little- or big-endian bytes of this machine
// (header_type="UInt64", no compression); 'raw' writes the same byte count and bytes without any encoding, one block
// per DataArray, in <AppendedData encoding="raw"> after the '_' that starts it (each DataArray format="appended"
// with the byte offset of its block), the smallest and fastest to write. rungs's own reader reads all three
// (src/external/vtk/vtu.ts). The two binary ones keep NaN and ±Infinity (refused in ASCII, whose numbers rungs's
// reader takes as plain decimals only, src/csv/read.ts parseDecimal).
//
// The file goes to disk a piece at a time through one reused 4 MiB buffer (writeFileAtomicFrom: temporary file,
// then rename), never whole in memory. Measured on the 1M-unknown P1 level (999² squares in triangles, u_h and u at
// the vertices, two densities per cell; 2 shared cores AMD EPYC, test/bench/error-densities.bench.ts): ASCII 4.2 s
// for 230 MB, binary 1.4 s for 152 MB. Raw against binary on the 2M-cell level of the P1 ladder (u_h, u and the
// error at the vertices, two densities per cell), same process alternating: see docs/performance-history.md.
import { endianness } from 'node:os';
import { RungsInputError } from '../../errors.ts';
import { VTK_CELL_TYPES, vtkCellTypeName } from './cell-types.ts';
import { REFERENCE_VERTICES } from '../../fem/element/nodes.ts';
import type { DiscreteField } from '../../fem/field/types.ts';
import { lagrangeFieldData } from '../../fem/field/lagrange-field.ts';
import type { CellKind, Mesh } from '../../mesh/types.ts';
import { writeFileAtomicFrom } from '../../files/atomic-write.ts';
import { writeFileAtomicInBackground } from '../../files/background-write.ts';

/** The encodings writeVtu can write, in one list (the check of the format option and its message read it). */
export const VTU_FORMATS = ['ascii', 'binary', 'raw'] as const;
export type VtuFormat = (typeof VTU_FORMATS)[number];

/** A data array: plain values (components = length / count) or values with their number of components given. */
export type VtuArray = Float64Array | { values: Float64Array; components: number };

export interface VtuInput {
  mesh: Mesh;
  /** Values at the mesh's vertices, vertex-major: nVertices × components (names are the arrays' names in the file). */
  pointData?: Record<string, VtuArray>;
  /** Values per cell: nCells × components (an error density is one value per cell). */
  cellData?: Record<string, VtuArray>;
  /** 'ascii' (default), 'binary' (inline base64) or 'raw' (appended raw bytes); see the head of this file. */
  format?: VtuFormat;
}

/** VTK's linear cell type of each rungs cell kind: taken from the reader's table (src/external/vtk/cell-types.ts),
 *  the one place rungs writes VTK's numbers down. Hexahedra have no entry there yet (the reader does not build
 *  hexahedral meshes); their number is found by name in the same file's list of other types. */
function linearCellType(kind: CellKind): number {
  const entry = Object.values(VTK_CELL_TYPES).find((t) => t.cellKind === kind && t.degree === 1);
  if (entry) return entry.id;
  const name = `VTK_${kind.toUpperCase()}`;
  for (let id = 0; id < 256; id++) if (vtkCellTypeName(id) === name) return id;
  throw new Error(`internal: no VTK cell type named ${name} in src/external/vtk/cell-types.ts`);
}

/** The VTK cell type written for each cell kind. */
export const VTU_CELL_TYPE: Readonly<Record<CellKind, number>> = Object.freeze({
  interval: linearCellType('interval'),
  triangle: linearCellType('triangle'),
  quadrilateral: linearCellType('quadrilateral'),
  tetrahedron: linearCellType('tetrahedron'),
  hexahedron: linearCellType('hexahedron'),
});

/** Writes the mesh and its data as a .vtu file, atomically (a temporary file renamed over the target:
 *  writeFileAtomicFrom), a piece at a time: the file is never held whole in memory. Throws RungsInputError for data
 *  that does not fit the mesh, before anything is written. */
export function writeVtu(path: string, input: VtuInput): void {
  const arrays = dataArrays(input);
  writeFileAtomicFrom(path, (write) => writePieces(input, arrays, write));
}

/** writeVtu's file, written while the caller goes on (src/files/background-write.ts): the same bytes, checked the same
 *  way before this returns. The input's arrays go to the file system as they are (with the 'raw' format, most of the
 *  file), so they must not change until the caller has settled the write (settleBackgroundWrites); the pieces made
 *  through the reused buffer are copied. */
export function writeVtuInBackground(path: string, input: VtuInput): void {
  const arrays = dataArrays(input);
  const pieces: Uint8Array[] = [];
  writePieces(input, arrays, (bytes) => pieces.push(bytes.buffer === CHUNK.buffer ? Uint8Array.from(bytes) : bytes));
  writeFileAtomicInBackground(path, pieces);
}

/** The bytes of the .vtu file writeVtu writes, in memory. */
export function vtuBytes(input: VtuInput): Uint8Array {
  const arrays = dataArrays(input);
  const pieces: Buffer[] = [];
  writePieces(input, arrays, (bytes) => pieces.push(Buffer.from(bytes)));
  return Buffer.concat(pieces);
}

/** The bytes of a 'raw' .vtu's appended data (each block's UInt64 byte count and its bytes) for `mesh` with point
 *  arrays and cell arrays of these component counts: the file's size but for its XML text (about 1 KB), known
 *  before the values are (a background write's reservation: where.ts, reserveLevelVtu). The blocks dataArrays
 *  lists: the data arrays (Float64), the points (3 × Float64), connectivity (Int32), offsets (Int64), types (UInt8). */
export function rawVtuDataBytes(mesh: Mesh, pointComponents: readonly number[], cellComponents: readonly number[]): number {
  const block = (count: number, width: number): number => 8 + count * width;
  const nv = mesh.nVertices, nc = mesh.nCells;
  return pointComponents.reduce((n, c) => n + block(nv * c, WIDTH.Float64), 0)
    + cellComponents.reduce((n, c) => n + block(nc * c, WIDTH.Float64), 0)
    + block(3 * nv, WIDTH.Float64) + block(nc * mesh.verticesPerCell, WIDTH.Int32) + block(nc, WIDTH.Int64) + block(nc, WIDTH.UInt8);
}

/** The input checked, and every DataArray of the file in its order. */
function dataArrays(input: VtuInput): DataArray[] {
  const { mesh } = input;
  const format = input.format ?? 'ascii';
  if (!(VTU_FORMATS as readonly string[]).includes(format)) {
    throw new RungsInputError(`writeVtu: format must be ${VTU_FORMATS.map((f) => `'${f}'`).join(', ')}, got ${JSON.stringify(format)}`, 'writeVtu.format');
  }
  const pointArrays = checkArrays(input.pointData ?? {}, mesh.nVertices, 'pointData', 'vertices (mesh.nVertices)', format);
  const cellArrays = checkArrays(input.cellData ?? {}, mesh.nCells, 'cellData', 'cells (mesh.nCells)', format);
  const vpc = mesh.verticesPerCell, nCells = mesh.nCells;
  return [
    ...pointArrays.map((a) => ({ ...a, section: 'PointData', type: 'Float64' as const })),
    ...cellArrays.map((a) => ({ ...a, section: 'CellData', type: 'Float64' as const })),
    { section: 'Points', name: null, type: 'Float64', components: 3, values: pointsOf(mesh) },
    { section: 'Cells', name: 'connectivity', type: 'Int32', components: 1, values: mesh.cells.subarray(0, nCells * vpc), perLine: vpc },
    // Offsets (the end of each cell's connectivity) and types are produced as they are written, not stored; raw
    // appended data takes their bytes made in one pass instead (a DataView call per number cost about 60 ms for the
    // 2M cells of a 1024² P1 level).
    { section: 'Cells', name: 'offsets', type: 'Int64', components: 1, count: nCells, at: (c) => (c + 1) * vpc, ...(format === 'raw' ? { bytes: () => offsetBytes(nCells, vpc) } : {}) },
    { section: 'Cells', name: 'types', type: 'UInt8', components: 1, count: nCells, at: () => VTU_CELL_TYPE[mesh.cellKind], ...(format === 'raw' ? { bytes: () => new Uint8Array(nCells).fill(VTU_CELL_TYPE[mesh.cellKind]) } : {}) },
  ];
}

/** The offsets (c + 1)·vpc of nCells cells as VTK's Int64 in this machine's byte order: two 32-bit words each, the
 *  high one zero (the offsets of a mesh rungs holds stay below 2^31), the low one first on a little-endian machine. */
function offsetBytes(nCells: number, vpc: number): Uint8Array {
  if ((nCells + 1) * vpc >= 2 ** 31) throw new Error(`internal: ${nCells} cells of ${vpc} vertices overflow VTK offsets written as 32-bit words`);
  const words = new Uint32Array(2 * nCells);
  const low = endianness() === 'LE' ? 0 : 1;
  for (let c = 0; c < nCells; c++) words[2 * c + low] = (c + 1) * vpc;
  return new Uint8Array(words.buffer);
}

/** The file, handed to `write` in pieces of at most CHUNK's size (and CHUNK itself is reused between pieces). */
function writePieces(input: VtuInput, arrays: DataArray[], write: (bytes: Uint8Array) => void): void {
  const { mesh } = input;
  const format = input.format ?? 'ascii';
  const out = new Out(write);
  const byteOrder = endianness() === 'LE' ? 'LittleEndian' : 'BigEndian';
  out.text('<?xml version="1.0"?>\n');
  out.text(`<VTKFile type="UnstructuredGrid" version="1.0" byte_order="${byteOrder}" header_type="UInt64">\n<UnstructuredGrid>\n`);
  out.text(`<Piece NumberOfPoints="${mesh.nVertices}" NumberOfCells="${mesh.nCells}">\n`);
  let open = '';
  let offset = 0;
  for (const a of arrays) {
    if (a.section !== open) {
      if (open) out.text(`</${open}>\n`);
      out.text(`<${a.section}>\n`);
      open = a.section;
    }
    const nameAttr = a.name === null ? '' : ` Name="${attributeText(a.name)}"`;
    const head = `<DataArray type="${a.type}"${nameAttr} NumberOfComponents="${a.components}"`;
    if (format === 'raw') {
      // The block of this array in the appended data: its UInt64 byte count, then its bytes.
      out.text(`${head} format="appended" offset="${offset}"/>\n`);
      offset += 8 + countOf(a) * WIDTH[a.type];
      continue;
    }
    out.text(`${head} format="${format}">\n`);
    if (format === 'ascii') out.ascii(a);
    else out.base64(a);
    out.text('</DataArray>\n');
  }
  out.text(`</${open}>\n</Piece>\n</UnstructuredGrid>\n`);
  if (format === 'raw') {
    out.text('<AppendedData encoding="raw">\n_');
    for (const a of arrays) out.raw(a);
    out.text('\n</AppendedData>\n');
  }
  out.text('</VTKFile>\n');
  out.done();
}

/** Values of a field at the mesh's vertices (nVertices × components, vertex-major), for a field of any degree: the
 *  field is evaluated at each cell's reference vertices (a continuous field has one value per vertex; for a
 *  discontinuous one the last cell listed wins). */
export function vertexValues(field: DiscreteField): Float64Array {
  const { mesh } = field;
  const nc = field.components ?? 1, vpc = mesh.verticesPerCell, dim = mesh.dim;
  // A Lagrange field of rungs's own numbers its vertex unknowns first, unknown v at vertex v (src/fem/dofmap/
  // dofmap.ts), and a nodal basis takes its coefficient there: the values are its first nVertices coefficients (the
  // field's own value, where evaluating the basis at the reference vertex may be an ulp off for degree ≥ 2).
  const lagrange = lagrangeFieldData(field);
  if (lagrange && nc === 1 && lagrange.space.mesh === mesh) return lagrange.coeffs.slice(0, mesh.nVertices);
  const ref = new Float64Array(REFERENCE_VERTICES[mesh.cellKind].flat());
  const vals = new Float64Array(vpc * nc), grads = new Float64Array(vpc * nc * dim);
  const out = new Float64Array(mesh.nVertices * nc);
  for (let c = 0; c < mesh.nCells; c++) {
    field.evaluate(c, ref, vpc, vals, grads);
    for (let i = 0; i < vpc; i++) {
      const v = mesh.cells[c * vpc + i];
      for (let k = 0; k < nc; k++) out[v * nc + k] = vals[i * nc + k];
    }
  }
  return out;
}

interface Checked {
  name: string;
  components: number;
  values: Float64Array;
}

function checkArrays(arrays: Record<string, VtuArray>, count: number, where: string, what: string, format: VtuFormat): Checked[] {
  if (typeof arrays !== 'object' || arrays === null) {
    throw new RungsInputError(`writeVtu: ${where} must be an object of named Float64Arrays`, `writeVtu.${where}`);
  }
  return Object.entries(arrays).map(([name, a]) => {
    const field = `writeVtu.${where}.${name}`;
    if (name.trim() === '') throw new RungsInputError(`writeVtu: every ${where} array needs a non-blank name`, `writeVtu.${where}`);
    const values = a instanceof Float64Array ? a : a?.values;
    if (!(values instanceof Float64Array)) throw new RungsInputError(`writeVtu: ${where} "${name}" must be a Float64Array (or { values, components })`, field);
    let components = a instanceof Float64Array ? (count > 0 ? values.length / count : 1) : a.components;
    if (!(Number.isInteger(components) && components >= 1) || values.length !== count * components) {
      const given = a instanceof Float64Array ? '' : ` with components = ${String(components)}`;
      throw new RungsInputError(`writeVtu: ${where} "${name}" has ${values.length} values${given} for ${count} ${what}; ` +
        `give ${count} × components values (components a whole number ≥ 1)`, field);
    }
    components = Math.round(components);
    if (format === 'ascii') {
      for (let i = 0; i < values.length; i++) {
        if (!Number.isFinite(values[i])) {
          throw new RungsInputError(`writeVtu: ${where} "${name}" holds ${values[i]} at index ${i}; ASCII files are written with finite numbers only — ` +
            "write with format: 'binary' to keep it (rungs's own reader takes plain decimal numbers only)", field);
        }
      }
    }
    return { name, components, values };
  });
}

/** The mesh's vertices as VTK's points: three coordinates each, missing ones 0. */
function pointsOf(mesh: Mesh): Float64Array {
  const { dim, coords, nVertices } = mesh;
  if (dim === 3) return coords.subarray(0, 3 * nVertices);
  const p = new Float64Array(3 * nVertices);
  if (dim === 2) {
    for (let v = 0; v < nVertices; v++) { p[3 * v] = coords[2 * v]!; p[3 * v + 1] = coords[2 * v + 1]!; }
    return p;
  }
  for (let v = 0; v < nVertices; v++) for (let d = 0; d < dim; d++) p[3 * v + d] = coords[v * dim + d];
  return p;
}

type VtkType = 'Float64' | 'Int32' | 'Int64' | 'UInt8';

/** One DataArray: stored values, or `count` values produced by `at` (integers). */
type DataArray = {
  section: string;
  name: string | null;
  type: VtkType;
  components: number;
  /** Values to a line in ASCII (default: one tuple of a vector, six scalars). */
  perLine?: number;
} & ({ values: Float64Array | Int32Array } | { count: number; at: (i: number) => number; bytes?: () => Uint8Array });

const countOf = (a: DataArray): number => ('values' in a ? a.values.length : a.count);
const WIDTH: Record<VtkType, number> = { Float64: 8, Int32: 4, Int64: 8, UInt8: 1 };

/** The file's bytes, collected in a reused buffer and handed on whenever it fills (no fresh memory per file: first
 *  touches of fresh pages are slow on these machines, DEVELOPERS.md, "Numerical choices"). */
class Out {
  private readonly buf = CHUNK;
  private pos = 0;

  constructor(private readonly write: (bytes: Uint8Array) => void) {}

  /** Makes room for `n` more bytes, handing on what the buffer holds when they would not fit. */
  private room(n: number): void {
    if (this.pos + n > this.buf.length) this.flush();
  }

  private flush(): void {
    if (this.pos > 0) this.write(this.buf.subarray(0, this.pos));
    this.pos = 0;
  }

  /** Markup (UTF-8: array names may hold any character). */
  text(s: string): void {
    const most = 3 * s.length; // UTF-8 bytes per UTF-16 unit
    if (most > this.buf.length) { this.flush(); this.write(Buffer.from(s, 'utf8')); return; }
    this.room(most);
    this.pos += this.buf.write(s, this.pos, 'utf8');
  }

  /** ASCII text (numbers, base64) shorter than the buffer. */
  private latin1(s: string): void {
    this.room(s.length);
    this.pos += this.buf.write(s, this.pos, 'latin1');
  }

  /** Numbers as text, joined into blocks of 1024 before they are copied (one copy per block, not per number). */
  ascii(a: DataArray): void {
    const n = countOf(a);
    const perLine = a.perLine ?? (a.components > 1 ? a.components : 6);
    const values = 'values' in a ? a.values : null, at = 'at' in a ? a.at : null;
    let block = '';
    for (let i = 0; i < n; i++) {
      const v = values !== null ? values[i] : at!(i);
      // Number::toString: the shortest decimal that reads back as the same double; -0 kept as "-0".
      block += (Object.is(v, -0) ? '-0' : String(v)) + (i % perLine === perLine - 1 || i === n - 1 ? '\n' : ' ');
      if ((i & 1023) === 1023) { this.latin1(block); block = ''; }
    }
    this.latin1(block);
  }

  /** Base64 of one stream: the UInt64 byte count, then the values' bytes (this machine's byte order), encoded through
   *  a scratch buffer a multiple of 3 bytes long, so the pieces join into one base64 text. */
  base64(a: DataArray): void {
    const n = countOf(a), width = WIDTH[a.type];
    const scratch = SCRATCH;
    const view = new DataView(scratch.buffer, scratch.byteOffset, scratch.length);
    const le = endianness() === 'LE';
    let fill = 0;
    const flush = (final: boolean): void => {
      const whole = final ? fill : fill - (fill % 3);
      this.latin1(scratch.toString('base64', 0, whole));
      scratch.copyWithin(0, whole, fill);
      fill -= whole;
    };
    view.setBigUint64(0, BigInt(n * width), le);
    fill = 8;
    if ('values' in a && a.type !== 'Int64') {
      const bytes = new Uint8Array(a.values.buffer, a.values.byteOffset, n * width);
      for (let i = 0; i < bytes.length;) {
        const take = Math.min(scratch.length - fill, bytes.length - i);
        scratch.set(bytes.subarray(i, i + take), fill);
        fill += take; i += take;
        if (fill === scratch.length) flush(false);
      }
    } else {
      const values = 'values' in a ? a.values : null, at = 'at' in a ? a.at : null;
      for (let i = 0; i < n; i++) {
        if (fill + width > scratch.length) flush(false);
        writeInteger(view, fill, width, values !== null ? values[i] : at!(i), le);
        fill += width;
      }
    }
    flush(true);
    this.text('\n');
  }

  /** One block of raw appended data: the UInt64 byte count, then the values' bytes (this machine's byte order).
   *  Stored arrays go to `write` as views of their own memory, without a copy; produced ones through the buffer. */
  raw(a: DataArray): void {
    const n = countOf(a), width = WIDTH[a.type];
    const le = endianness() === 'LE';
    this.room(8);
    new DataView(this.buf.buffer, this.buf.byteOffset + this.pos, 8).setBigUint64(0, BigInt(n * width), le);
    this.pos += 8;
    if ('values' in a && a.type !== 'Int64') {
      this.flush();
      this.write(new Uint8Array(a.values.buffer, a.values.byteOffset, n * width));
      return;
    }
    if ('bytes' in a && a.bytes) {
      this.flush();
      this.write(a.bytes());
      return;
    }
    const values = 'values' in a ? a.values : null, at = 'at' in a ? a.at : null;
    const view = new DataView(this.buf.buffer, this.buf.byteOffset, this.buf.length);
    for (let i = 0; i < n; i++) {
      this.room(width);
      const v = values !== null ? values[i] : at!(i);
      writeInteger(view, this.pos, width, v, le);
      this.pos += width;
    }
  }

  done(): void {
    this.flush();
  }
}

/** A whole number as UInt8, Int32 or Int64 (below 2^53: low and high 32-bit words) at byte `at` of `view`. */
function writeInteger(view: DataView, at: number, width: number, v: number, le: boolean): void {
  if (width === 1) view.setUint8(at, v);
  else if (width === 4) view.setInt32(at, v, le);
  else { view.setUint32(at + (le ? 0 : 4), v % 2 ** 32, le); view.setUint32(at + (le ? 4 : 0), Math.floor(v / 2 ** 32), le); }
}

/** The output buffer, reused by every file: 4 MiB. */
const CHUNK = Buffer.alloc(4 << 20);
/** Scratch for base64: 3 · 2^16 bytes (a multiple of 3, so whole pieces encode without padding). */
const SCRATCH = Buffer.alloc(3 << 16);

/** An array name as an XML attribute value: the five characters XML reserves, escaped (W3C XML 1.0, §2.4). */
function attributeText(name: string): string {
  return name.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}
