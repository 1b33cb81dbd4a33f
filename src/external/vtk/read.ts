import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';
import type { VtkGrid } from './grid.ts';
import { parseLegacyVtk, readLegacyVtk } from './legacy.ts';
import { checkOutputSize, type OutputLimit } from './limits.ts';
import { fileSource, type ByteSource } from './source.ts';
import { parseVtu, readVtu } from './vtu.ts';

const isVtu = (file: string) => /\.vtu$/i.test(file);

/** Parses VTK text by file name: .vtu as XML, anything else as legacy ASCII. */
export function parseVtkText(text: string, file: string, level?: LevelRef, chunkBytes?: number): VtkGrid {
  return isVtu(file) ? parseVtu(text, file, level, chunkBytes) : parseLegacyVtk(text, file, level, chunkBytes);
}

export interface ReadVtkOptions {
  /** Files above this size are refused before they are read. */
  limit?: OutputLimit;
  /** Bytes read at a time (tests use a few, to cross chunk boundaries everywhere). */
  chunkBytes?: number;
}

/** Reads a .vtk (legacy ASCII) or .vtu (XML: ASCII, inline binary or appended data, optionally zlib-compressed) file
 *  chunk by chunk, never holding the whole file. */
export function readVtkFile(file: string, level?: LevelRef, opts: ReadVtkOptions = {}): VtkGrid {
  let source: ByteSource;
  try {
    source = fileSource(file);
  } catch (err) {
    throw new RungsInputError(`${placeOf(level, file)}: cannot read the VTK file (${(err as NodeJS.ErrnoException).code ?? (err as Error).message})`, file);
  }
  try {
    checkOutputSize(file, source.size, opts.limit, level);
    return isVtu(file) ? readVtu(source, file, level, opts.chunkBytes, opts.limit) : readLegacyVtk(source, file, level, opts.chunkBytes);
  } catch (err) {
    if (err instanceof RungsInputError || !(err as NodeJS.ErrnoException).code) throw err;
    throw new RungsInputError(`${placeOf(level, file)}: cannot read the VTK file (${(err as NodeJS.ErrnoException).code})`, file);
  } finally {
    source.close();
  }
}
