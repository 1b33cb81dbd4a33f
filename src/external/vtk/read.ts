import { readFileSync } from 'node:fs';
import { RungsInputError } from '../../errors.ts';
import { placeOf, type LevelRef } from '../where.ts';
import type { VtkGrid } from './grid.ts';
import { parseLegacyVtk } from './legacy.ts';
import { parseVtu } from './vtu.ts';

/** Parses VTK text by file name: .vtu as XML, anything else as legacy ASCII. */
export function parseVtkText(text: string, file: string, level?: LevelRef): VtkGrid {
  return /\.vtu$/i.test(file) ? parseVtu(text, file, level) : parseLegacyVtk(text, file, level);
}

/** Reads a .vtk (legacy ASCII) or .vtu (XML, ASCII data) file. */
export function readVtkFile(file: string, level?: LevelRef): VtkGrid {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (err) {
    throw new RungsInputError(`${placeOf(level, file)}: cannot read the VTK file (${(err as NodeJS.ErrnoException).code ?? (err as Error).message})`, file);
  }
  return parseVtkText(text, file, level);
}
