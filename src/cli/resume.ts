// The record of finished levels that `rungs run --resume` reuses: one JSON file per study under <out>/.rungs/levels/,
// rewritten (atomically) each time a level finishes. A level is reused only when its key is unchanged: a hash of the
// study's declaration (without the ladder's list of n, which the level's own n replaces, so that changing one level's
// n recomputes that level only), rungs's version, the level's index and n, and the norms measured. Levels are
// independent of each other (DEVELOPERS.md: the solver target uses the level's own interpolation error).
import { ladderRungs } from '../study/time-ladder.ts';
import { createHash } from 'node:crypto';
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { canonicalText, declarationHash } from '../gate/declaration-hash.ts';
import { writeFileAtomic } from '../report/write.ts';
import { fileStem } from '../report/series.ts';
import type { StudyDeclaration } from '../study/declaration.ts';
import type { LevelResult } from '../study/result.ts';
import { packageVersions } from '../study/versions.ts';

const FORMAT = 'rungs finished levels 1';

/** The folder of the records in an output folder. */
export const levelRecordFolder = (out: string): string => join(out, '.rungs', 'levels');

export interface LevelRecordEntry {
  key: string;
  level: LevelResult;
}

/** The key of one level: what it computes from, and nothing it does not. */
export function levelKey(decl: StudyDeclaration, index: number, norms: readonly string[]): string {
  const { n: _n, quick: _quick, steps: _steps, dt: _dt, ...ladder } = decl.ladder;
  // Where an external level runs (its scheduler and resources) does not change what it computes.
  const disc = decl.discretization;
  const discretization = disc.kind === 'external' && disc.scheduler ? { ...disc, scheduler: undefined } : disc;
  const rest = declarationHash({ ...decl, discretization, ladder: ladder as StudyDeclaration['ladder'] });
  const text = canonicalText({ declaration: rest, rungs: packageVersions().rungs, index, n: ladderRungs(decl)[index]!.n, steps: ladderRungs(decl)[index]!.steps, norms: [...norms] });
  return `sha256:${createHash('sha256').update(text).digest('hex')}`;
}

// JSON has no NaN or ±Infinity; a level may hold them (an error at round-off, a missing rate). They are stored as
// {"$number": "NaN"} so that a reused level is the level that was computed, bit for bit.
const TAG = '$number';
/** JSON.stringify / JSON.parse helpers keeping NaN and ±Infinity (also for a level row written by a job, jobs-lane.ts). */
export { encode as encodeRecordValue, decode as decodeRecordValue };
function encode(_key: string, v: unknown): unknown {
  if (typeof v === 'number' && !Number.isFinite(v)) return { [TAG]: String(v) };
  return v;
}
function decode(_key: string, v: unknown): unknown {
  if (v && typeof v === 'object' && !Array.isArray(v)) {
    const keys = Object.keys(v);
    if (keys.length === 1 && keys[0] === TAG) return Number((v as Record<string, string>)[TAG]);
  }
  return v;
}

/** Reads a study's record; a missing, unreadable or foreign file reads as no levels (they are computed again). */
export function readLevelRecord(out: string, study: string): Map<number, LevelRecordEntry> {
  const found = new Map<number, LevelRecordEntry>();
  let parsed: { format?: string; study?: string; levels?: LevelRecordEntry[] };
  try {
    parsed = JSON.parse(readFileSync(join(levelRecordFolder(out), `${fileStem(study)}.json`), 'utf8'), decode);
  } catch {
    return found;
  }
  if (parsed.format !== FORMAT || parsed.study !== study || !Array.isArray(parsed.levels)) return found;
  for (const e of parsed.levels) {
    if (typeof e?.key === 'string' && e.level && typeof e.level.index === 'number') found.set(e.level.index, e);
  }
  return found;
}

/** Writes a study's record of finished levels (atomically; a failure is left for the reports' own write to show). */
export function writeLevelRecord(out: string, study: string, entries: readonly LevelRecordEntry[]): void {
  try {
    mkdirSync(levelRecordFolder(out), { recursive: true });
    const text = JSON.stringify({ format: FORMAT, study, levels: [...entries].sort((a, b) => a.level.index - b.level.index) }, encode, 1) + '\n';
    writeFileAtomic(join(levelRecordFolder(out), `${fileStem(study)}.json`), text);
  } catch {
    // Without the record a later --resume computes these levels again; the run itself is not affected.
  }
}
