// `rungs level-errors` (hidden): run inside a level's job after the solver (scheduler.errors: 'job'), so that a VTK
// solution is measured where it was written and never travels. It reads the solution in the job's folder exactly as a
// collecting rungs would (the same level runner, the same reader, the same norms), writes the level's errors.vtu
// there, and writes errors.json: the errors protocol any reader understands, with the whole level row in `info` (the
// interpolant's errors, the Céa ratio and where the error lives, which the protocol has no fields for).
import { existsSync, renameSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { RungsInputError } from '../errors.ts';
import { writeFileAtomic } from '../files/atomic-write.ts';
import { settleBackgroundWrites } from '../files/background-write.ts';
import { loadStudy } from '../study/load.ts';
import { runLevel } from '../study/level.ts';
import { fileStem } from '../study/names.ts';
import { buildProblem } from '../study/problem.ts';
import type { LevelResult } from '../study/result.ts';
import { solverSettings } from '../study/runner.ts';
import { expandSweeps } from '../study/sweep.ts';
import { decodeRecordValue, encodeRecordValue } from './resume.ts';

/** `info.format` of an errors.json written by this command. */
export const LEVEL_ROW_FORMAT = 'rungs level row 1';

export interface LevelErrorsFlags {
  study: string;
  /** 1-based level number. */
  level: number;
  out: string;
  /** The job's folder, holding the solver's output. */
  folder: string;
  /** The norms the study measures, comma-separated. */
  norms: string;
  /** Levels the study runs (its finest two get error files and maps). */
  total: number;
}

/** The level row from errors.json's info (NaN and ±Infinity kept as {"$number": …}). */
export function decodeLevelRow(v: unknown): LevelResult | null {
  const row = JSON.parse(JSON.stringify(v), decodeRecordValue) as LevelResult | null;
  return row && typeof row.index === 'number' && row.errors && typeof row.errors === 'object' ? row : null;
}

export async function levelErrorsCommand(file: string, flags: LevelErrorsFlags): Promise<number> {
  try {
    const loaded = expandSweeps([await loadStudy(file)]).find((l) => l.declaration.name === flags.study);
    if (!loaded) throw new RungsInputError(`${file}: no study named '${flags.study}'`, file);
    const decl = loaded.declaration;
    const index = flags.level - 1;
    const norms = flags.norms.split(',').filter(Boolean);
    const problem = buildProblem(decl, loaded.file);
    // The level runner writes errors.vtu into <out>/<study>/level-k; here that is a folder inside the job's folder.
    const whereRoot = join(flags.folder, '.where');
    const level = await runLevel(decl, loaded.file, problem, index, norms, solverSettings(decl), {
      out: whereRoot, total: flags.total, errorFiles: true,
      levelRunner: () => ({
        folder: flags.folder, prepare: false, move: false,
        run: async () => ({ argv: [], exitCode: 0, stdout: '', stderr: '', seconds: 0 }),
      }),
    });
    await settleBackgroundWrites(whereRoot);
    const vtu = join(whereRoot, fileStem(decl.name), `level-${index + 1}`, 'errors.vtu');
    if (existsSync(vtu)) renameSync(vtu, join(flags.folder, 'errors.vtu'));
    rmSync(whereRoot, { recursive: true, force: true });
    delete level.cellErrors;
    const finite = (o: Record<string, number> | undefined) => Object.fromEntries(Object.entries(o ?? {}).filter(([, v]) => Number.isFinite(v)));
    const text = JSON.stringify({
      dofs: level.dofs,
      h: level.h,
      ...(Number.isInteger(level.cells) && level.cells > 0 ? { cells: level.cells } : {}),
      errors: finite(level.errors),
      quantities: finite(level.quantities),
      info: { format: LEVEL_ROW_FORMAT, level: JSON.parse(JSON.stringify(level, encodeRecordValue)) },
    }, null, 1);
    writeFileAtomic(join(flags.folder, 'errors.json'), text + '\n');
    return 0;
  } catch (err) {
    process.stderr.write(`error: ${(err as Error).message}\n`);
    return 2;
  }
}
