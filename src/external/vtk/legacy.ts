// Reader for legacy ASCII VTK files holding an unstructured grid ("VTK File Formats", Kitware: the legacy format
// has a version line "# vtk DataFile Version x.y", a title line, ASCII or BINARY, then DATASET UNSTRUCTURED_GRID with
// POINTS n type, CELLS, CELL_TYPES n, and attribute sections POINT_DATA n / CELL_DATA n holding SCALARS (with
// LOOKUP_TABLE), VECTORS, NORMALS, TENSORS, TEXTURE_COORDINATES, COLOR_SCALARS and FIELD arrays). Point data kept:
// SCALARS (1 to 4 components), VECTORS (3 components) and FIELD arrays (any count); the others are skipped. CELL_DATA
// arrays are read and checked like point data but not kept: the grid's cellData is empty. Both cell layouts
// are read: "CELLS n size" followed by "k i0 … ik-1" per cell (versions up to 4.2), and "CELLS nOffsets nConn" followed
// by OFFSETS and CONNECTIVITY arrays (version 5.1).
// Truncation is found by structure: every declared count must be met before the next keyword or the end of the file,
// each count must fit in what is left of the file before anything is allocated, and the file must end with a line
// break (every VTK writer ends its last line), so a file cut inside its last number ("0.12345" cut to "0.12") is
// refused. The file is read chunk by chunk (source.ts), so memory holds the grid being built and one chunk of text,
// never the whole file. A file cut exactly at the end of a complete optional section (a second SCALARS array, CELL_DATA) cannot be
// told from a shorter file; the reader then returns what that shorter file holds.
import { placeOf, type LevelRef } from '../where.ts';
import { RungsInputError } from '../../errors.ts';
import type { VtkGrid, VtkPointArray } from './grid.ts';
import { readNumbers, TokenCursor } from './number-reader.ts';
import { bufferSource, CHUNK_BYTES, utf8, type ByteSource } from './source.ts';
import { parseDigits } from '../../csv/read.ts';

const ATTRIBUTE_KEYWORDS = 'POINTS, CELLS, CELL_TYPES, POINT_DATA, CELL_DATA, SCALARS, LOOKUP_TABLE, VECTORS, NORMALS, TENSORS, TEXTURE_COORDINATES, COLOR_SCALARS, FIELD, METADATA';

/** Parses legacy ASCII VTK text (as the tests and callers holding text do); see readLegacyVtk. */
export function parseLegacyVtk(text: string, file: string, ref?: LevelRef, chunkBytes?: number): VtkGrid {
  return readLegacyVtk(bufferSource(Buffer.from(text, 'utf8')), file, ref, chunkBytes);
}

/** Reads a legacy ASCII VTK unstructured grid chunk by chunk; every problem names the level, the file and the line. */
export function readLegacyVtk(source: ByteSource, file: string, ref?: LevelRef, chunkBytes = CHUNK_BYTES): VtkGrid {
  const fail = (line: number, message: string): never => {
    throw new RungsInputError(`${placeOf(ref, file, line)}: ${message}`, file);
  };
  const cur = new TokenCursor(source, file, ref, 0, 1, source.size, chunkBytes);
  const header: string[] = [];
  for (let k = 0; k < 3; k++) {
    const line = cur.restOfLine();
    if (line === null) fail(k + 1, `the file ends inside its ${k + 1 === 1 ? 'version' : k + 1 === 2 ? 'title' : 'format'} line; a legacy VTK file starts with "# vtk DataFile Version x.y", a title line and "ASCII"`);
    header.push(utf8(line!));
  }
  const line1 = header[0]!.replace(/^\uFEFF/, '').trim();
  if (!/^#\s*vtk\s+DataFile\s+Version\s+\d+(\.\d+)?\s*$/i.test(line1)) {
    fail(1, `not a legacy VTK file: the first line is "${line1.slice(0, 60)}", expected "# vtk DataFile Version x.y"`);
  }
  const format = header[2]!.trim().toUpperCase();
  if (format === 'BINARY') fail(3, 'BINARY legacy VTK files are not read; write the file as ASCII');
  if (format !== 'ASCII') fail(3, `the third line must be ASCII, found "${format.slice(0, 40)}"`);

  let dataset = false;
  let nPoints = -1;
  let points = new Float64Array(0);
  let nCells = -1;
  let offsets = new Int32Array(0);
  let connectivity = new Int32Array(0);
  let connectivityLines = new Int32Array(0);
  let types = new Int32Array(0);
  let typeLines = new Int32Array(0);
  let typesCount = -1;
  const pointData: VtkPointArray[] = [];
  let section: 'none' | 'point' | 'cell' = 'none';
  let sectionCount = 0;

  const requireSection = (keyword: string): number => {
    if (section === 'none') cur.fail(`${keyword} must follow POINT_DATA n or CELL_DATA n`);
    return sectionCount;
  };
  const skipValues = (count: number, what: string): void => {
    cur.room(count, what, cur.tokLine);
    readNumbers(cur, count, { what, declaredAt: cur.tokLine, item: 'value' }, new Float64Array(count), false);
  };

  const seenAt = new Map<string, number>();
  while (cur.next()) {
    const keyword = cur.tok.toUpperCase();
    const at = cur.tokLine;
    if (keyword === 'POINTS' || keyword === 'CELLS' || keyword === 'CELL_TYPES' || keyword === 'POINT_DATA' || keyword === 'CELL_DATA') {
      if (seenAt.has(keyword)) cur.fail(`${keyword} appears a second time (first at line ${seenAt.get(keyword)}); an unstructured grid has one`);
      seenAt.set(keyword, at);
    }
    switch (keyword) {
      case 'DATASET': {
        const kind = cur.need('the dataset type').toUpperCase();
        if (kind !== 'UNSTRUCTURED_GRID') cur.fail(`DATASET ${kind} is not read; rungs reads DATASET UNSTRUCTURED_GRID`);
        dataset = true;
        break;
      }
      case 'POINTS': {
        if (!dataset) cur.fail('POINTS before DATASET UNSTRUCTURED_GRID');
        nPoints = cur.count('the number of POINTS');
        cur.need('the data type of POINTS');
        cur.room(nPoints * 3, `POINTS ${nPoints}`, at);
        points = new Float64Array(nPoints * 3);
        readNumbers(cur, nPoints * 3, { what: `coordinates of POINTS ${nPoints}`, declaredAt: at, item: 'coordinate' }, points, false);
        break;
      }
      case 'CELLS': {
        if (!dataset) cur.fail('CELLS before DATASET UNSTRUCTURED_GRID');
        const first = cur.count('the number of CELLS');
        const second = cur.count('the size of CELLS');
        if (cur.peek()?.toUpperCase() === 'OFFSETS') {
          // Version 5.1: CELLS nOffsets nConnectivity, OFFSETS type, values, CONNECTIVITY type, values.
          cur.next(); cur.need('the data type of OFFSETS');
          cur.room(first + second, `CELLS ${first} ${second} (OFFSETS and CONNECTIVITY)`, at);
          nCells = Math.max(first - 1, 0);
          offsets = new Int32Array(first);
          readNumbers(cur, first, { what: `OFFSETS of CELLS ${first} ${second}`, declaredAt: at, item: 'offset' }, offsets, true);
          const kw = cur.need('CONNECTIVITY');
          if (kw.toUpperCase() !== 'CONNECTIVITY') cur.fail(`expected CONNECTIVITY after the OFFSETS of CELLS (line ${at}), found '${kw}'`);
          cur.need('the data type of CONNECTIVITY');
          connectivity = new Int32Array(second);
          connectivityLines = new Int32Array(second);
          readNumbers(cur, second, { what: `CONNECTIVITY entries of CELLS ${first} ${second}`, declaredAt: at, item: 'index' }, connectivity, true, 0, connectivityLines);
          if (first === 0 || offsets[0] !== 0 || offsets[first - 1] !== second) {
            fail(at, `OFFSETS must start at 0 and end at the CONNECTIVITY size ${second}; found ${offsets[0]} … ${offsets[first - 1]}`);
          }
          for (let c = 0; c < nCells; c++) {
            if (!(offsets[c + 1]! >= offsets[c]!)) fail(at, `OFFSETS must not decrease: entry ${c + 2} is ${offsets[c + 1]} after ${offsets[c]}`);
          }
        } else {
          nCells = first;
          cur.room(second, `CELLS ${first} ${second}`, at);
          if (first > second) fail(at, `CELLS ${first} ${second} declares more cells than integers; each cell needs its node count and its nodes`);
          offsets = new Int32Array(nCells + 1);
          connectivity = new Int32Array(Math.max(second - nCells, 0));
          connectivityLines = new Int32Array(connectivity.length);
          let used = 0;
          for (let c = 0; c < nCells; c++) {
            if (!cur.next()) {
              cur.fail(`the file ends after ${c} of the ${nCells} cells of CELLS (declared at line ${at}): the file is truncated or the declared count does not match the data`, cur.line);
            }
            const k = parseDigits(cur.tok) ?? -1;
            if (k < 0) {
              cur.fail(`cell ${c + 1} of CELLS (declared at line ${at}) should start with its node count, found '${utf8(cur.tok).slice(0, 40)}'` +
                (/^[A-Za-z_]/.test(cur.tok) ? ': the count in the file does not match the declared count' : ''));
            }
            used += 1 + k;
            if (used > second) fail(cur.tokLine, `cell ${c + 1} lists ${k} nodes, more than the size ${second} declared by CELLS at line ${at} allows`);
            readNumbers(cur, k, { what: `node indices of cell ${c + 1}`, declaredAt: cur.tokLine, item: 'index' }, connectivity, true, offsets[c]!, connectivityLines);
            offsets[c + 1] = offsets[c]! + k;
          }
          if (used !== second) fail(at, `CELLS ${nCells} ${second} declares ${second} integers, but its ${nCells} cells hold ${used}`);
        }
        break;
      }
      case 'CELL_TYPES': {
        typesCount = cur.count('the number of CELL_TYPES');
        cur.room(typesCount, `CELL_TYPES ${typesCount}`, at);
        types = new Int32Array(typesCount);
        typeLines = new Int32Array(typesCount);
        readNumbers(cur, typesCount, { what: `entries of CELL_TYPES ${typesCount}`, declaredAt: at, item: 'cell type' }, types, true, 0, typeLines);
        break;
      }
      case 'POINT_DATA':
      case 'CELL_DATA': {
        section = keyword === 'POINT_DATA' ? 'point' : 'cell';
        sectionCount = cur.count(`the count of ${keyword}`);
        if (section === 'point' && nPoints >= 0 && sectionCount !== nPoints) {
          cur.fail(`POINT_DATA ${sectionCount} does not match POINTS ${nPoints}: give one value per point`);
        }
        if (section === 'cell' && nCells >= 0 && sectionCount !== nCells) {
          cur.fail(`CELL_DATA ${sectionCount} does not match the ${nCells} cells`);
        }
        break;
      }
      case 'SCALARS': {
        const count = requireSection('SCALARS');
        const name = cur.need('the SCALARS name');
        cur.need('the SCALARS data type');
        let components = 1;
        const maybe = cur.peek();
        if (maybe !== null && /^\d+$/.test(maybe)) { cur.next(); components = Number(maybe); }
        if (components < 1 || components > 4) cur.fail(`SCALARS ${name} has ${components} components; VTK allows 1 to 4`);
        if (cur.peek()?.toUpperCase() === 'LOOKUP_TABLE') { cur.next(); cur.need('the LOOKUP_TABLE name'); }
        cur.room(count * components, `SCALARS ${name}`, at);
        const values = new Float64Array(count * components);
        readNumbers(cur, count * components, { what: `values of SCALARS ${name}`, declaredAt: at, item: 'value' }, values, false);
        if (section === 'point') pointData.push({ name, components, values, line: at });
        break;
      }
      case 'LOOKUP_TABLE': {
        requireSection('LOOKUP_TABLE');
        cur.need('the LOOKUP_TABLE name');
        const size = cur.count('the LOOKUP_TABLE size');
        skipValues(4 * size, `RGBA entries of LOOKUP_TABLE (line ${at})`);
        break;
      }
      case 'VECTORS': {
        // VECTORS name type: three components per point (a 2D code writes z = 0; gridToFields checks that).
        const count = requireSection('VECTORS');
        const name = cur.need('the VECTORS name');
        cur.need('the VECTORS data type');
        cur.room(count * 3, `VECTORS ${name}`, at);
        const values = new Float64Array(count * 3);
        readNumbers(cur, count * 3, { what: `values of VECTORS ${name}`, declaredAt: at, item: 'value' }, values, false);
        if (section === 'point') pointData.push({ name, components: 3, values, line: at });
        break;
      }
      case 'NORMALS':
      case 'TENSORS':
      case 'TENSORS6': {
        const count = requireSection(keyword);
        cur.need(`the ${keyword} name`);
        cur.need(`the ${keyword} data type`);
        const per = keyword === 'TENSORS' ? 9 : keyword === 'TENSORS6' ? 6 : 3;
        skipValues(per * count, `values of ${keyword} (line ${at})`);
        break;
      }
      case 'TEXTURE_COORDINATES': {
        const count = requireSection(keyword);
        cur.need('the TEXTURE_COORDINATES name');
        const dim = cur.count('the TEXTURE_COORDINATES dimension');
        cur.need('the TEXTURE_COORDINATES data type');
        skipValues(dim * count, `values of TEXTURE_COORDINATES (line ${at})`);
        break;
      }
      case 'COLOR_SCALARS': {
        const count = requireSection(keyword);
        cur.need('the COLOR_SCALARS name');
        const per = cur.count('the COLOR_SCALARS component count');
        skipValues(per * count, `values of COLOR_SCALARS (line ${at})`);
        break;
      }
      case 'FIELD': {
        cur.need('the FIELD name');
        const arrays = cur.count('the number of FIELD arrays');
        for (let a = 0; a < arrays; a++) {
          const name = cur.need(`array ${a + 1} of FIELD (line ${at})`);
          if (name === 'NULL_ARRAY') continue;
          const arrayLine = cur.tokLine;
          const components = cur.count(`the component count of FIELD array ${name}`);
          const tuples = cur.count(`the tuple count of FIELD array ${name}`);
          cur.need(`the data type of FIELD array ${name}`);
          cur.room(components * tuples, `FIELD array ${name}`, arrayLine);
          const values = new Float64Array(components * tuples);
          readNumbers(cur, components * tuples, { what: `values of FIELD array ${name}`, declaredAt: arrayLine, item: 'value' }, values, false);
          if (section === 'point') {
            if (tuples !== sectionCount) fail(arrayLine, `FIELD array ${name} has ${tuples} tuples, but POINT_DATA declares ${sectionCount}`);
            pointData.push({ name, components, values, line: arrayLine });
          }
        }
        break;
      }
      case 'METADATA':
        cur.skipPastBlankLine();
        break;
      default:
        cur.fail(`unexpected '${utf8(cur.tok).slice(0, 40)}'; expected one of the keywords ${ATTRIBUTE_KEYWORDS}`);
    }
  }

  const endLine = cur.line;
  if (!dataset) fail(endLine, 'no DATASET UNSTRUCTURED_GRID in the file');
  if (nPoints < 0) fail(endLine, 'no POINTS section in the file (truncated file?)');
  if (nCells < 0) fail(endLine, 'no CELLS section in the file (truncated file?)');
  if (typesCount < 0) fail(endLine, 'no CELL_TYPES section in the file (truncated file?)');
  if (typesCount !== nCells) fail(typeLines[0] ?? endLine, `CELL_TYPES ${typesCount} does not match the ${nCells} cells of CELLS`);
  for (const a of pointData) {
    if (a.values.length !== nPoints * a.components) {
      fail(a.line, `point data '${a.name}' holds ${a.values.length / a.components} tuples, but POINTS declares ${nPoints}; give one per point`);
    }
  }
  // Every writer ends the file with a line break; without it the last number may have been cut short.
  const last = cur.w.lastNonBlank;
  if (last !== 10 && last !== 13) {
    fail(endLine, `the file does not end with a line break, so its last line may be cut off (truncated file?): '${utf8(cur.tok).slice(0, 40)}' ` +
      'may be part of a longer number; a complete legacy VTK file ends with a line break');
  }
  return { file, nPoints, points, nCells, offsets, connectivity, connectivityLines, types, typeLines, pointData, cellData: [], endLine };
}
