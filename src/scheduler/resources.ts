// What each level's job asks for, from the study's rules (SchedulerSettings): one value for all levels, a list per
// level, or the finest level's value scaled to the coarser ones.
import { RungsInputError } from '../errors.ts';
import { MEMORY_TEXT } from './schema.ts';
import type { JobResources, PerLevel, SchedulerSettings } from './types.ts';

/** One minute more than the level's own timeout: the job starts its shell, and may measure the errors after the
 *  solver (common practice, no source). */
export const TIME_MARGIN_MINUTES = 1;

const UNIT_MB: Record<string, number> = { K: 1 / 1024, M: 1, G: 1024, T: 1024 * 1024 };

/** Megabytes of a memory value (a number is megabytes already); whole megabytes, rounded up. */
export function memoryMegabytes(v: number | string, where: string): number {
  if (typeof v === 'number') return Math.ceil(v);
  const m = MEMORY_TEXT.exec(v);
  if (!m) throw new RungsInputError(`${where}: '${v}' is not an amount of memory; give megabytes or text such as '512M' or '4G'`, where);
  return Math.ceil(Number(m[1]) * UNIT_MB[(m[2] ?? 'M').toUpperCase()]!);
}

/** The ladder a rule is resolved over: n of every level of the whole ladder and the domain's dimension. */
export interface LadderShape {
  n: readonly number[];
  dim: number;
}

/** The value of a per-level rule at level `index` (0-based); `num` turns a value into a number. */
function atLevel<T>(rule: PerLevel<T>, index: number, ladder: LadderShape, num: (v: T) => number, where: string): number {
  if (Array.isArray(rule)) {
    if (rule.length !== ladder.n.length) {
      throw new RungsInputError(
        `${where}: ${rule.length} value${rule.length === 1 ? '' : 's'} for a ladder of ${ladder.n.length} levels; give one per level, ` +
          "one for all, or { finest: …, scale: 'dofs' }", where);
    }
    return num(rule[index]!);
  }
  if (rule !== null && typeof rule === 'object' && 'finest' in rule) {
    const finest = ladder.n[ladder.n.length - 1]!;
    const ratio = (ladder.n[index]! / finest) ** (rule.scale === 'dofs' ? ladder.dim : 1);
    const lowest = rule.min !== undefined ? num(rule.min) : 1;
    return Math.max(lowest, Math.ceil(num(rule.finest) * ratio));
  }
  return num(rule as T);
}

/** The resources of level `index` of a ladder; `timeoutSeconds` is the level's own timeout (the job's time limit
 *  follows it unless the study gives minutes). */
export function levelResources(s: SchedulerSettings, index: number, ladder: LadderShape, timeoutSeconds: number, where: string): JobResources {
  const id = (v: number) => v;
  const tasks = s.tasks !== undefined ? atLevel(s.tasks, index, ladder, id, `${where}.tasks`) : 1;
  const memoryMB = s.memory !== undefined ? atLevel(s.memory, index, ladder, (v) => memoryMegabytes(v, `${where}.memory`), `${where}.memory`) : undefined;
  const minutes = s.minutes !== undefined
    ? atLevel(s.minutes, index, ladder, id, `${where}.minutes`)
    : Math.ceil(timeoutSeconds / 60) + TIME_MARGIN_MINUTES;
  return { tasks, memoryMB, minutes, partition: s.partition, extra: s.sbatch ?? [] };
}

/** Groups jobs whose resources agree (one job array each), keeping the levels' order within a group. */
export function groupByResources<T extends { resources: JobResources }>(jobs: readonly T[]): T[][] {
  const groups = new Map<string, T[]>();
  for (const j of jobs) {
    const r = j.resources;
    const key = JSON.stringify([r.tasks, r.memoryMB ?? null, r.minutes, r.partition ?? null, r.extra]);
    groups.set(key, [...(groups.get(key) ?? []), j]);
  }
  return [...groups.values()];
}
