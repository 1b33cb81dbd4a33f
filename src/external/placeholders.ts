import { RungsInputError } from '../errors.ts';

/** What a level tells the external solver, through {placeholders} in the command and RUNGS_* variables. */
export interface LevelValues {
  study: string;
  /** 1-based level number. */
  level: number;
  /** Ladder parameter (cells per unit length). */
  n: number;
  /** Mesh size rungs associates with the level. */
  h: number;
  /** Element degree, when the study declares one. */
  degree?: number;
  /** Folder the solver writes its output into (created by rungs). */
  out: string;
  /** Folder holding the study's manufactured data as code (rungs_data.h, .f90, .py, …) and problem.json. */
  data?: string;
  /** Studies with time: the number of equal time steps of the level, their size Δt = T/steps and the final time. */
  steps?: number;
  dt?: number;
  T?: number;
  /** Tasks (MPI ranks) of the level's job when it runs under a scheduler (src/scheduler/); 1 otherwise. */
  tasks?: number;
}

export const PLACEHOLDERS = ['n', 'h', 'level', 'degree', 'out', 'study', 'data', 'steps', 'dt', 'T', 'tasks'] as const;
export type PlaceholderName = (typeof PLACEHOLDERS)[number];

/** Numbers as JavaScript prints them (shortest form that reads back to the same double). */
function valueOf(values: LevelValues, name: PlaceholderName, where: string): string {
  if (name === 'degree') {
    if (values.degree === undefined) {
      throw new RungsInputError(`${where}: the command uses {degree}, but the discretization declares no degree; add degree to external({ … })`, where);
    }
    return String(values.degree);
  }
  if (name === 'data') {
    if (values.data === undefined) {
      throw new RungsInputError(`${where}: the command uses {data}, but this study has no manufactured data to hand over (its exact solution is not given as formulas)`, where);
    }
    return values.data;
  }
  if (name === 'steps' || name === 'dt' || name === 'T') {
    const v = values[name];
    if (v === undefined) {
      throw new RungsInputError(`${where}: the command uses {${name}}, but the study has no time; give time: { final, order } and a time ladder (ladder.steps), or leave {${name}} out`, where);
    }
    return String(v);
  }
  if (name === 'tasks') return String(values.tasks ?? 1);
  return String(values[name]);
}

/** Replaces {n} {h} {level} {degree} {out} {study} {data} {steps} {dt} {T} {tasks} inside one argv word; {{ and }} stand for literal braces. */
export function substituteWord(word: string, values: LevelValues, where = 'command'): string {
  let out = '';
  let i = 0;
  while (i < word.length) {
    const ch = word[i]!;
    if (ch === '{' && word[i + 1] === '{') { out += '{'; i += 2; continue; }
    if (ch === '}' && word[i + 1] === '}') { out += '}'; i += 2; continue; }
    if (ch === '{') {
      const close = word.indexOf('}', i + 1);
      const name = close < 0 ? word.slice(i + 1) : word.slice(i + 1, close);
      if (close < 0 || !(PLACEHOLDERS as readonly string[]).includes(name)) {
        throw new RungsInputError(
          `${where}: unknown placeholder {${name}} in "${word}"; valid placeholders: ${PLACEHOLDERS.map((p) => `{${p}}`).join(' ')} ` +
            '(write {{ and }} for literal braces)',
          where,
        );
      }
      out += valueOf(values, name as PlaceholderName, where);
      i = close + 1;
      continue;
    }
    out += ch;
    i++;
  }
  return out;
}

/** The argv of one level: every template word with its placeholders replaced (values never split a word). */
export function substituteWords(words: readonly string[], values: LevelValues, where = 'command'): string[] {
  return words.map((w) => substituteWord(w, values, where));
}

/** The same values as environment variables for the solver. */
export function levelEnvironment(values: LevelValues): Record<string, string> {
  const env: Record<string, string> = {
    RUNGS_STUDY: values.study,
    RUNGS_LEVEL: String(values.level),
    RUNGS_N: String(values.n),
    RUNGS_H: String(values.h),
    RUNGS_OUT: values.out,
  };
  if (values.degree !== undefined) env.RUNGS_DEGREE = String(values.degree);
  if (values.data !== undefined) env.RUNGS_DATA = values.data;
  if (values.steps !== undefined) env.RUNGS_STEPS = String(values.steps);
  if (values.dt !== undefined) env.RUNGS_DT = String(values.dt);
  if (values.T !== undefined) env.RUNGS_T = String(values.T);
  if (values.tasks !== undefined) env.RUNGS_TASKS = String(values.tasks);
  return env;
}
