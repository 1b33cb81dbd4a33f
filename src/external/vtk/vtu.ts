// Reader for VTK XML unstructured grids (.vtu) ("VTK File Formats", Kitware, section "XML File Formats":
// <VTKFile type="UnstructuredGrid"> <UnstructuredGrid> <Piece NumberOfPoints NumberOfCells> with <Points> (one
// 3-component DataArray), <Cells> (DataArrays named connectivity, offsets — the END of each cell's connectivity —
// and types) and <PointData> / <CellData>, whose arrays hold NumberOfComponents values per point or cell).
// DataArrays in every format VTK writes: format="ascii" (numbers as text), format="binary" (inline base64) and
// format="appended" (offset="…" into the <AppendedData encoding="raw|base64"> after the '_' that starts it), each
// uncompressed or compressed with compressor="vtkZLibDataCompressor", with header_type="UInt32" (the default) or
// "UInt64" and either byte_order; types Int8 … Int64, UInt8 … UInt64, Float32, Float64 (binary.ts has the layouts).
// Every layout was checked against files written by VTK 9.1's vtkXMLUnstructuredGridWriter in each of its data modes
// (test/external/vtu-binary.test.ts), which also showed two things the format description does not say: VTK writes
// <InformationKey> elements after a DataArray's values (xml.ts reads the data up to them), and an appended array's
// offset counts characters of the base64 text, not decoded bytes. A file without header_type has UInt32 headers
// (VTK 9.1's reader reads such a file so; its writer always writes the attribute).
// Truncation is found by structure: the XML must close its root element (xml.ts; a file with appended data must end
// with </AppendedData></VTKFile>), and every DataArray must hold exactly the number of values its declared counts
// give: ASCII ones as many numbers, binary ones a header declaring count × width bytes, followed by those bytes (a
// base64 run cut short, a block that does not inflate to its declared size and an offset past the end are refused).
// Counts are checked before anything is allocated: against a hard limit, and against the characters or bytes of
// their DataArray (for compressed data, its declared sizes and deflate's largest ratio). Messages name the file and
// the line, or the byte offset in raw appended data. Binary data keeps NaN and infinities in point and cell data;
// coordinates must be finite, as in ASCII.
import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';
import type { VtkGrid, VtkPointArray } from './grid.ts';
import { MAX_ENTRIES, readNumbers, TokenCursor } from './number-reader.ts';
import { parseDigits } from '../../csv/read.ts';
import { childrenNamed, scanXml, type XmlElement } from './xml.ts';
import { bufferSource, CHUNK_BYTES, type ByteSource } from './source.ts';
import { showBytes, type OutputLimit } from './limits.ts';
import { openBinaryArray, VTK_TYPE_WIDTH, VTK_TYPES, type BinaryLayout, type BinarySource, type Fail as BinaryFail } from './binary.ts';

/** Parses .vtu text (as the tests and callers holding text do); see readVtu. */
export function parseVtu(text: string, file: string, ref?: LevelRef, chunkBytes?: number): VtkGrid {
  return readVtu(bufferSource(Buffer.from(text, 'utf8')), file, ref, chunkBytes);
}

/**
 * Reads a .vtu file in two passes over its bytes, a chunk at a time: the XML structure first (the data's byte ranges
 * located and checked, not kept; markup is not scanned past the start of appended data), then each DataArray rungs
 * needs, parsed or decoded from its range straight into typed arrays. Every problem names the level, the file and
 * the line (the byte, in raw appended data).
 */
export function readVtu(source: ByteSource, file: string, ref?: LevelRef, chunkBytes = CHUNK_BYTES, limit?: OutputLimit): VtkGrid {
  const fail = (line: number, message: string): never => {
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${message}`, file);
  };
  const { root, endLine } = scanXml(source, file, ref, chunkBytes);
  if (root.name !== 'VTKFile') fail(root.line, `the root element is <${root.name}>, expected <VTKFile type="UnstructuredGrid">`);
  if (root.attrs.type !== 'UnstructuredGrid') fail(root.line, `VTKFile type="${root.attrs.type ?? ''}" is not read; rungs reads type="UnstructuredGrid"`);
  const data: Data = { source, chunkBytes, file, ref, root, fail, layout: null, appended: null };
  const grid = one(root, 'UnstructuredGrid', fail);
  const pieces = childrenNamed(grid, 'Piece');
  if (pieces.length !== 1) fail(pieces[1]?.line ?? grid.line, `the file has ${pieces.length} <Piece> elements; rungs reads exactly one`);
  const piece = pieces[0]!;
  const nPoints = countAttr(piece, 'NumberOfPoints', fail);
  const nCells = countAttr(piece, 'NumberOfCells', fail);
  // A compressed file can hold far more values than its size suggests (zlib packs up to about 1000:1), so the limit
  // on output files (limits.ts), which readVtkFile checked against the file's size, is checked again against the
  // values it declares, at 8 bytes each: the size of the same data uncompressed.
  if (limit && root.attrs.compressor) {
    let values = 3 * nPoints + 2 * nCells;
    for (const [section, count] of [['PointData', nPoints], ['CellData', nCells]] as const) {
      for (const el of childrenNamed(piece, section)) {
        for (const da of childrenNamed(el, 'DataArray')) values += count * (parseDigits(da.attrs.NumberOfComponents ?? '1') ?? 1);
      }
    }
    if (8 * values > limit.bytes) {
      fail(piece.line, `the file is compressed, and the ${values} values its counts declare (NumberOfPoints="${nPoints}", ` +
        `NumberOfCells="${nCells}" and its arrays) would be ${showBytes(8 * values)} uncompressed, more than the limit of ` +
        `${showBytes(limit.bytes)} on a solver's output file (${limit.source}); it was not read. Write a smaller file ` +
        '(a coarser level, fewer arrays) or, on a machine with the memory, raise external({ maxOutputBytes })');
    }
  }

  const pointsEl = one(piece, 'Points', fail);
  const pointsArray = one(pointsEl, 'DataArray', fail);
  const components = pointsArray.attrs.NumberOfComponents ?? '1';
  if (components !== '3') fail(pointsArray.line, `the Points DataArray has NumberOfComponents="${pointsArray.attrs.NumberOfComponents ?? ''}"; VTK points have 3`);
  const pointsWhat = `coordinates of NumberOfPoints="${nPoints}"`;
  const pointsReader = open(data, pointsArray, nPoints * 3, false, pointsWhat);
  const points = new Float64Array(nPoints * 3);
  pointsReader(points);
  if (pointsArray.attrs.format !== undefined && pointsArray.attrs.format !== 'ascii') {
    // ASCII refuses non-finite numbers as it reads them; binary coordinates are checked here.
    for (let i = 0; i < points.length; i++) {
      if (!Number.isFinite(points[i])) fail(pointsArray.line, `coordinate ${i + 1} of ${pointsWhat} is ${points[i]}, not a finite number`);
    }
  }

  const cellsEl = one(piece, 'Cells', fail);
  const byName = (name: string): XmlElement => {
    const el = childrenNamed(cellsEl, 'DataArray').find((d) => d.attrs.Name === name);
    if (!el) fail(cellsEl.line, `<Cells> has no DataArray Name="${name}"; it needs connectivity, offsets and types`);
    return el!;
  };
  const offsetsEl = byName('offsets');
  const offsetsReader = open(data, offsetsEl, nCells, true, `offsets of NumberOfCells="${nCells}"`);
  const ends = new Int32Array(nCells);
  offsetsReader(ends);
  const offsets = new Int32Array(nCells + 1);
  for (let c = 0; c < nCells; c++) {
    if (!(ends[c]! >= offsets[c]!)) fail(dataLine(offsetsEl), `offsets must not decrease: entry ${c + 1} is ${ends[c]} after ${offsets[c]}`);
    offsets[c + 1] = ends[c]!;
  }
  const connEl = byName('connectivity');
  const total = offsets[nCells]!;
  const connReader = open(data, connEl, total, true, `connectivity entries the offsets declare (last offset ${total})`);
  const connectivity = new Int32Array(total);
  const connectivityLines = new Int32Array(total);
  connReader(connectivity, connectivityLines);
  const typesEl = byName('types');
  const typesReader = open(data, typesEl, nCells, true, `types of NumberOfCells="${nCells}"`);
  const types = new Int32Array(nCells);
  const typeLines = new Int32Array(nCells);
  typesReader(types, typeLines);

  const pointData = attributeArrays(data, piece, 'PointData', nPoints, 'NumberOfPoints', 'point');
  const cellData = attributeArrays(data, piece, 'CellData', nCells, 'NumberOfCells', 'cell');
  return { file, nPoints, points, nCells, offsets, connectivity, connectivityLines, types, typeLines, pointData, cellData, endLine };
}

/** The arrays of every <PointData> or <CellData> of the piece: `n` tuples of NumberOfComponents values each. */
function attributeArrays(data: Data, piece: XmlElement, section: string, n: number, countName: string, per: string): VtkPointArray[] {
  const { fail } = data;
  const out: VtkPointArray[] = [];
  for (const pd of childrenNamed(piece, section)) {
    for (const da of childrenNamed(pd, 'DataArray')) {
      const name = da.attrs.Name ?? '';
      if (name === '') fail(da.line, `a ${section} DataArray has no Name attribute`);
      const comps = parseDigits(da.attrs.NumberOfComponents ?? '1') ?? 0;
      if (comps < 1 || comps > 64) fail(da.line, `DataArray "${name}" has NumberOfComponents="${da.attrs.NumberOfComponents}"; expected an integer from 1 to 64 written with digits`);
      const what = `values of ${per} data "${name}" (${comps} per ${per}, ${countName}="${n}")`;
      const reader = open(data, da, n * comps, false, what);
      const values = new Float64Array(n * comps);
      reader(values);
      out.push({ name, components: comps, values, line: da.line });
    }
  }
  return out;
}

/** What reading DataArrays needs: the source, the file's root (its binary layout) and the appended data, found once. */
interface Data {
  source: ByteSource;
  chunkBytes: number;
  file: string;
  ref: LevelRef | undefined;
  root: XmlElement;
  fail: Fail;
  layout: BinaryLayout | null;
  appended: { el: XmlElement; encoding: 'raw' | 'base64' } | null;
}

type Reader = (into: Float64Array | Int32Array, lines?: Int32Array) => void;

/** The line a DataArray's values start on (inline data), or the DataArray's own line (appended data). */
const dataLine = (el: XmlElement): number => (el.attrs.format === 'appended' ? el.line : el.textLine);

/**
 * Checks that `count` values can be in the DataArray (at most MAX_ENTRIES, no more than its characters or bytes can
 * hold; for binary data its header is read and checked) and returns the function that reads them, to be called once
 * the caller has allocated the array.
 */
function open(data: Data, el: XmlElement, count: number, integers: boolean, what: string): Reader {
  const { fail } = data;
  const name = el.attrs.Name ? ` "${el.attrs.Name}"` : '';
  if (count > MAX_ENTRIES) fail(el.line, `DataArray${name} would need ${count} ${what}, more than the limit of ${MAX_ENTRIES} entries`);
  const format = el.attrs.format ?? 'ascii';
  if (format === 'ascii') {
    room(el, count, what, fail);
    return (into, lines) => readAscii(data, el, count, into, integers, what, lines);
  }
  if (format !== 'binary' && format !== 'appended') {
    fail(el.line, `DataArray${name} has format="${format}"; VTK's formats are "ascii", "binary" (inline base64) and "appended"`);
  }
  const type = el.attrs.type ?? '';
  if (!Object.hasOwn(VTK_TYPE_WIDTH, type)) fail(el.line, `DataArray${name} has type="${type}"; binary DataArrays need one of ${VTK_TYPES}`);
  if (integers && type.startsWith('Float')) fail(el.line, `DataArray${name} has type="${type}"; ${what} are integers: write them as Int8 … Int64 or UInt8 … UInt64`);
  const layout = binaryLayout(data);
  let src: BinarySource;
  if (format === 'binary') {
    src = { kind: 'inline', source: data.source, start: el.textStart, end: el.textEnd, line: el.textLine };
  } else {
    const appended = appendedData(data, el);
    const raw = el.attrs.offset;
    const offset = raw === undefined ? null : parseDigits(raw);
    if (offset === null) fail(el.line, `DataArray${name} has format="appended" and needs offset="…", a non-negative integer written with digits, found "${(raw ?? '').slice(0, 40)}"`);
    const size = appended.el.textEnd - appended.el.textStart;
    if (offset! >= size && !(offset === size && count === 0)) {
      fail(el.line, `DataArray${name} has offset="${raw}", past the end of the appended data (${size} ${appended.encoding === 'raw' ? 'bytes' : 'characters'}, ` +
        `<AppendedData> at line ${appended.el.line}): ${size === 0 ? 'it is empty' : `valid offsets are 0 to ${size - 1}`}; the file is truncated or the offset is wrong`);
    }
    src = { kind: 'appended', encoding: appended.encoding, source: data.source, start: appended.el.textStart + offset!, end: appended.el.textEnd, line: appended.el.textLine };
  }
  const where = format === 'binary' ? `DataArray${name} (line ${el.line})` : `appended DataArray${name} (line ${el.line}, offset ${el.attrs.offset})`;
  const binaryFail: BinaryFail = (message, at) => {
    if ('line' in at) throw new RungsInputError(`${placeOf(data.ref, data.file, at.line)}: ${message}`, data.file);
    throw new RungsInputError(`${placeOf(data.ref, data.file)} byte ${at.byte}: ${message}`, data.file);
  };
  const arr = openBinaryArray(src, layout, { type, count, integers, what: where, meaning: what }, binaryFail, data.chunkBytes);
  return (into, lines) => {
    arr.read(into);
    lines?.fill(dataLine(el));
  };
}

/** The byte order, header type and compressor of <VTKFile>, read and checked once (binary data only). */
function binaryLayout(data: Data): BinaryLayout {
  if (data.layout) return data.layout;
  const { root, fail } = data;
  const order = root.attrs.byte_order;
  if (order !== 'LittleEndian' && order !== 'BigEndian') {
    fail(root.line, `<VTKFile> has byte_order="${order ?? ''}"; a file with binary data needs byte_order="LittleEndian" or "BigEndian"`);
  }
  const header = root.attrs.header_type ?? 'UInt32';
  if (header !== 'UInt32' && header !== 'UInt64') fail(root.line, `<VTKFile> has header_type="${header}"; VTK writes "UInt32" (the default) or "UInt64"`);
  const compressor = root.attrs.compressor ?? '';
  if (compressor !== '' && compressor !== 'vtkZLibDataCompressor') {
    fail(root.line, `<VTKFile> has compressor="${compressor}"; rungs reads uncompressed data and vtkZLibDataCompressor ` +
      '(write with vtkXMLWriter::SetCompressorTypeToZLib or ToNone)');
  }
  data.layout = { littleEndian: order === 'LittleEndian', headerWidth: header === 'UInt64' ? 8 : 4, zlib: compressor !== '' };
  return data.layout;
}

/** The <AppendedData> element and its encoding, checked once. */
function appendedData(data: Data, el: XmlElement): { el: XmlElement; encoding: 'raw' | 'base64' } {
  if (data.appended) return data.appended;
  const { root, fail } = data;
  const found = childrenNamed(root, 'AppendedData');
  const name = el.attrs.Name ? ` "${el.attrs.Name}"` : '';
  if (found.length !== 1) fail(found[1]?.line ?? el.line, `DataArray${name} has format="appended", so the file needs exactly one <AppendedData>, found ${found.length}`);
  const ap = found[0]!;
  const encoding = ap.attrs.encoding;
  if (encoding !== 'raw' && encoding !== 'base64') fail(ap.line, `<AppendedData> has encoding="${encoding ?? ''}"; VTK writes encoding="raw" or encoding="base64"`);
  data.appended = { el: ap, encoding: encoding as 'raw' | 'base64' };
  return data.appended;
}

type Fail = (line: number, message: string) => never;

function one(parent: XmlElement, name: string, fail: Fail): XmlElement {
  const found = childrenNamed(parent, name);
  if (found.length !== 1) fail(found[1]?.line ?? parent.line, `<${parent.name}> must hold exactly one <${name}>, found ${found.length}`);
  return found[0]!;
}

function countAttr(el: XmlElement, name: string, fail: Fail): number {
  const raw = el.attrs[name];
  const v = raw === undefined ? null : parseDigits(raw);
  if (v === null) fail(el.line, `<${el.name}> needs ${name}="…" as a non-negative integer written with digits, found "${(raw ?? '').slice(0, 40)}"`);
  if (v! > MAX_ENTRIES) fail(el.line, `${name}="${raw}" is more than the limit of ${MAX_ENTRIES} entries`);
  return v!;
}

/** Before allocating, for ASCII: `count` values need at least 2·count − 1 characters (bytes) of the DataArray. */
function room(el: XmlElement, count: number, what: string, fail: Fail): void {
  const name = el.attrs.Name ? ` "${el.attrs.Name}"` : '';
  const chars = el.textEnd - el.textStart;
  const fits = Math.floor((chars + 1) / 2);
  if (count > fits) {
    fail(el.line, `DataArray${name} would need ${count} ${what}, but its ${chars} characters can hold at most ${fits}: ` +
      'a declared count is wrong or the file is damaged');
  }
}

/** Reads exactly `count` numbers from an ASCII DataArray; more or fewer than declared is an error. */
function readAscii(data: Data, el: XmlElement, count: number, into: Float64Array | Int32Array, integers: boolean, what: string, lines?: Int32Array): void {
  const name = el.attrs.Name ? ` "${el.attrs.Name}"` : '';
  const cur = new TokenCursor(data.source, data.file, data.ref, el.textStart, el.textLine, el.textEnd, data.chunkBytes);
  cur.endWhat = `the DataArray${name} ends`;
  readNumbers(cur, count, { what, declaredAt: el.line, item: 'value' }, into, integers, 0, lines);
  if (cur.next()) cur.fail(`DataArray${name} (line ${el.line}) holds more values than the ${count} ${what}: the counts do not match`);
}
