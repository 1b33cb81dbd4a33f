// Reader for VTK XML unstructured grids (.vtu) with ASCII DataArrays ("VTK File Formats", Kitware, XML file formats:
// <VTKFile type="UnstructuredGrid"> <UnstructuredGrid> <Piece NumberOfPoints NumberOfCells> with <Points> (one
// 3-component DataArray), <Cells> (DataArrays named connectivity, offsets — the END of each cell's connectivity —
// and types) and <PointData> / <CellData>). Binary (base64) and appended data are rejected with a clear message.
// Truncation is found by structure: the XML must close its root element (xml.ts), and every DataArray must hold
// exactly the number of values its declared counts give. Counts are checked against the characters of their
// DataArray and a hard limit before anything is allocated.
import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';
import type { VtkGrid, VtkPointArray } from './grid.ts';
import { MAX_ENTRIES, readNumbers, TokenCursor } from './number-reader.ts';
import { parseDigits } from '../../csv/read.ts';
import { childrenNamed, scanXml, type XmlElement } from './xml.ts';
import { bufferSource, CHUNK_BYTES, type ByteSource } from './source.ts';

/** Parses .vtu text (as the tests and callers holding text do); see readVtu. */
export function parseVtu(text: string, file: string, ref?: LevelRef, chunkBytes?: number): VtkGrid {
  return readVtu(bufferSource(Buffer.from(text, 'utf8')), file, ref, chunkBytes);
}

/**
 * Reads a .vtu file with ASCII data in two passes over its bytes, a chunk at a time: the XML structure first (the
 * data's byte ranges located and checked, not kept), then each DataArray rungs needs, parsed from its range straight
 * into typed arrays. Every problem names the level, the file and the line.
 */
export function readVtu(source: ByteSource, file: string, ref?: LevelRef, chunkBytes = CHUNK_BYTES): VtkGrid {
  const fail = (line: number, message: string): never => {
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${message}`, file);
  };
  const { root, endLine } = scanXml(source, file, ref, chunkBytes);
  const data = { source, chunkBytes };
  if (root.name !== 'VTKFile') fail(root.line, `the root element is <${root.name}>, expected <VTKFile type="UnstructuredGrid">`);
  if (root.attrs.type !== 'UnstructuredGrid') fail(root.line, `VTKFile type="${root.attrs.type ?? ''}" is not read; rungs reads type="UnstructuredGrid"`);
  const appended = childrenNamed(root, 'AppendedData')[0];
  if (appended) fail(appended.line, '<AppendedData> is not read; write the .vtu file with ASCII DataArrays (format="ascii")');
  const grid = one(root, 'UnstructuredGrid', fail);
  const pieces = childrenNamed(grid, 'Piece');
  if (pieces.length !== 1) fail(pieces[1]?.line ?? grid.line, `the file has ${pieces.length} <Piece> elements; rungs reads exactly one`);
  const piece = pieces[0]!;
  const nPoints = countAttr(piece, 'NumberOfPoints', fail);
  const nCells = countAttr(piece, 'NumberOfCells', fail);

  const pointsEl = one(piece, 'Points', fail);
  const pointsArray = one(pointsEl, 'DataArray', fail);
  const components = pointsArray.attrs.NumberOfComponents ?? '1';
  if (components !== '3') fail(pointsArray.line, `the Points DataArray has NumberOfComponents="${pointsArray.attrs.NumberOfComponents ?? ''}"; VTK points have 3`);
  room(pointsArray, nPoints * 3, `coordinates of NumberOfPoints="${nPoints}"`, fail);
  const points = new Float64Array(nPoints * 3);
  readArray(data, file, ref, pointsArray, nPoints * 3, points, false, `coordinates of NumberOfPoints="${nPoints}"`, fail);

  const cellsEl = one(piece, 'Cells', fail);
  const byName = (name: string): XmlElement => {
    const el = childrenNamed(cellsEl, 'DataArray').find((d) => d.attrs.Name === name);
    if (!el) fail(cellsEl.line, `<Cells> has no DataArray Name="${name}"; it needs connectivity, offsets and types`);
    return el!;
  };
  const offsetsEl = byName('offsets');
  room(offsetsEl, nCells, `offsets of NumberOfCells="${nCells}"`, fail);
  const ends = new Int32Array(nCells);
  readArray(data, file, ref, offsetsEl, nCells, ends, true, `offsets of NumberOfCells="${nCells}"`, fail);
  const offsets = new Int32Array(nCells + 1);
  for (let c = 0; c < nCells; c++) {
    if (!(ends[c]! >= offsets[c]!)) fail(offsetsEl.textLine, `offsets must not decrease: entry ${c + 1} is ${ends[c]} after ${offsets[c]}`);
    offsets[c + 1] = ends[c]!;
  }
  const connEl = byName('connectivity');
  const total = offsets[nCells]!;
  room(connEl, total, `connectivity entries the offsets declare (last offset ${total})`, fail);
  const connectivity = new Int32Array(total);
  const connectivityLines = new Int32Array(total);
  readArray(data, file, ref, connEl, total, connectivity, true, `connectivity entries the offsets declare (last offset ${total})`, fail, connectivityLines);
  const typesEl = byName('types');
  room(typesEl, nCells, `types of NumberOfCells="${nCells}"`, fail);
  const types = new Int32Array(nCells);
  const typeLines = new Int32Array(nCells);
  readArray(data, file, ref, typesEl, nCells, types, true, `types of NumberOfCells="${nCells}"`, fail, typeLines);

  const pointData: VtkPointArray[] = [];
  for (const pd of childrenNamed(piece, 'PointData')) {
    for (const da of childrenNamed(pd, 'DataArray')) {
      const name = da.attrs.Name ?? '';
      if (name === '') fail(da.line, 'a PointData DataArray has no Name attribute');
      const comps = parseDigits(da.attrs.NumberOfComponents ?? '1') ?? 0;
      if (comps < 1 || comps > 64) fail(da.line, `DataArray "${name}" has NumberOfComponents="${da.attrs.NumberOfComponents}"; expected an integer from 1 to 64 written with digits`);
      room(da, nPoints * comps, `values of point data "${name}"`, fail);
      const values = new Float64Array(nPoints * comps);
      readArray(data, file, ref, da, nPoints * comps, values, false, `values of point data "${name}" (${comps} per point, NumberOfPoints="${nPoints}")`, fail);
      pointData.push({ name, components: comps, values, line: da.line });
    }
  }
  return { file, nPoints, points, nCells, offsets, connectivity, connectivityLines, types, typeLines, pointData, endLine };
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

/** Before allocating: `count` values need at most MAX_ENTRIES and at least 2·count − 1 characters (bytes) of the DataArray. */
function room(el: XmlElement, count: number, what: string, fail: Fail): void {
  const name = el.attrs.Name ? ` "${el.attrs.Name}"` : '';
  checkAscii(el, fail);
  if (count > MAX_ENTRIES) fail(el.line, `DataArray${name} would need ${count} ${what}, more than the limit of ${MAX_ENTRIES} entries`);
  const chars = el.textEnd - el.textStart;
  const fits = Math.floor((chars + 1) / 2);
  if (count > fits) {
    fail(el.line, `DataArray${name} would need ${count} ${what}, but its ${chars} characters can hold at most ${fits}: ` +
      'a declared count is wrong or the file is damaged');
  }
}

/** Reads exactly `count` numbers from an ASCII DataArray; more or fewer than declared is an error. */
function readArray(
  data: { source: ByteSource; chunkBytes: number }, file: string, ref: LevelRef | undefined, el: XmlElement, count: number, into: Float64Array | Int32Array,
  integers: boolean, what: string, fail: Fail, lines?: Int32Array,
): void {
  const name = el.attrs.Name ? ` "${el.attrs.Name}"` : '';
  checkAscii(el, fail);
  const cur = new TokenCursor(data.source, file, ref, el.textStart, el.textLine, el.textEnd, data.chunkBytes);
  cur.endWhat = `the DataArray${name} ends`;
  readNumbers(cur, count, { what, declaredAt: el.line, item: 'value' }, into, integers, 0, lines);
  if (cur.next()) cur.fail(`DataArray${name} (line ${el.line}) holds more values than the ${count} ${what}: the counts do not match`);
}

function checkAscii(el: XmlElement, fail: Fail): void {
  const format = el.attrs.format ?? 'ascii';
  const name = el.attrs.Name ? ` "${el.attrs.Name}"` : '';
  if (format !== 'ascii') {
    fail(el.line, `DataArray${name} has format="${format}"; rungs reads ASCII DataArrays only — write the file with format="ascii" ` +
      '(for example vtkXMLWriter::SetDataModeToAscii)');
  }
}
