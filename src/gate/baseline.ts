import { readFileSync } from 'node:fs';
import { writeFileAtomic } from '../report/write.ts';
import { RungsInputError } from '../errors.ts';
import { compactJson } from '../report/compact-json.ts';
import { sciShort } from '../report/numbers.ts';
import { shortHash } from './declaration-hash.ts';
import type { StudyResult } from '../study/result.ts';
import {
  BASELINE_FORMAT,
  BASELINE_VERSION,
  DEFAULT_REL_TOL,
  baselineSchema,
  type Baseline,
  type BaselineLevel,
  type BaselineStudy,
} from './baseline-format.ts';

export type { Baseline, BaselineLevel, BaselineStudy };
export { DEFAULT_REL_TOL };

/** What the gate knows of a study beyond its result: the hash of its declaration and its declared tolerance. */
export interface StudyFacts {
  declaration?: string;
  relTol?: number;
}

/** One study's entry, recorded from its result (with the hash of its declaration when known). */
export function baselineStudyOf(result: StudyResult, relTol = DEFAULT_REL_TOL, declaration?: string): BaselineStudy {
  const norms: Record<string, BaselineLevel[]> = {};
  const names = new Set([...result.analyses.map((a) => a.name), ...result.levels.flatMap((l) => Object.keys(l.errors))]);
  for (const norm of names) {
    const analysis = result.analyses.find((a) => a.name === norm);
    const floorFrom = analysis?.floorFrom ?? null;
    const levels: BaselineLevel[] = [];
    result.levels.forEach((l, i) => {
      const error = l.errors[norm];
      if (error === undefined || !Number.isFinite(error)) return;
      const entry: BaselineLevel = { level: l.index + 1, h: l.h, dofs: l.dofs, error };
      if (floorFrom !== null && i >= floorFrom) entry.floor = true;
      levels.push(entry);
    });
    norms[norm] = levels;
  }
  const entry: BaselineStudy = {
    ladder: { levels: result.levels.length, h: result.levels.map((l) => l.h), dofs: result.levels.map((l) => l.dofs) },
    relTol,
    recordedAt: result.startedAt,
    norms,
  };
  if (declaration !== undefined) entry.declaration = declaration;
  return entry;
}

/**
 * A baseline from these results; studies of `existing` that did not run now are kept unchanged. The tolerance of a
 * study is the one it declares (`baselineTolerance`), else the one of its earlier entry, else 0.05.
 */
export function makeBaseline(results: readonly StudyResult[], existing?: Baseline, facts: Record<string, StudyFacts> = {}): Baseline {
  const studies: Record<string, BaselineStudy> = { ...(existing?.studies ?? {}) };
  for (const r of results) {
    const f = facts[r.study] ?? {};
    studies[r.study] = baselineStudyOf(r, f.relTol ?? existing?.studies[r.study]?.relTol ?? DEFAULT_REL_TOL, f.declaration);
  }
  return { format: BASELINE_FORMAT, version: BASELINE_VERSION, studies };
}

/** Sorted keys, one level per line: re-recording a baseline changes only the lines whose numbers changed. */
export function baselineJson(baseline: Baseline): string {
  return compactJson(baseline, { width: 100, sortKeys: true }) + '\n';
}

export function writeBaseline(path: string, baseline: Baseline): void {
  try {
    writeFileAtomic(path, baselineJson(baseline));
  } catch (err) {
    throw new RungsInputError(`cannot write the baseline file ${path}: ${(err as Error).message}`, path);
  }
}

/** "studies.tile-p2.norms.L2[3].error" from a zod issue path. */
function fieldPath(path: readonly PropertyKey[]): string {
  return path.reduce<string>((acc, key) => (typeof key === 'number' ? `${acc}[${key}]` : acc === '' ? String(key) : `${acc}.${String(key)}`), '');
}

/** Every norm array must follow the study's ladder, level by level. */
function checkConsistency(path: string, baseline: Baseline): void {
  for (const [study, entry] of Object.entries(baseline.studies)) {
    const { levels, h, dofs } = entry.ladder;
    const where = `studies.${study}.ladder`;
    if (h.length !== levels || dofs.length !== levels) {
      throw new RungsInputError(`${path}: field ${where}: h and dofs must list ${levels} levels (found ${h.length} h, ${dofs.length} dofs)`, path);
    }
    for (const [norm, rows] of Object.entries(entry.norms)) {
      for (const [k, row] of rows.entries()) {
        const i = row.level - 1;
        if (i >= levels || h[i] !== row.h || dofs[i] !== row.dofs) {
          throw new RungsInputError(
            `${path}: field studies.${study}.norms.${norm}[${k}]: level ${row.level} (h ${row.h}, dofs ${row.dofs}) is not on the study's ladder`,
            path,
          );
        }
      }
    }
  }
}

export interface ReadOptions {
  /** Accept a file whose `studies` is empty (only when the file is about to be written again). */
  allowEmpty?: boolean;
}

/** Reads and checks a baseline file; a missing file, bad JSON, a wrong field or (unless allowed) no studies at all is
 *  a RungsInputError naming it: a baseline that holds nothing would let every run pass unexamined. */
export function readBaseline(path: string, options: ReadOptions = {}): Baseline {
  let text: string;
  try {
    text = readFileSync(path, 'utf8');
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    const why = code === 'ENOENT' ? 'does not exist' : `cannot be read (${(err as Error).message})`;
    throw new RungsInputError(`baseline file ${path} ${why}; record one first from a trusted run`, path);
  }
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (err) {
    throw new RungsInputError(`baseline file ${path} is not valid JSON: ${(err as Error).message}`, path);
  }
  const parsed = baselineSchema.safeParse(data);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const field = fieldPath(issue.path) || '(top level)';
    throw new RungsInputError(
      `baseline file ${path}: field ${field}: ${issue.message} (expected a ${BASELINE_FORMAT} version ${BASELINE_VERSION} file)`,
      path,
    );
  }
  if (!options.allowEmpty && Object.keys(parsed.data.studies).length === 0) {
    throw new RungsInputError(
      `baseline file ${path}: field studies: holds no studies, so it can vouch for nothing; record it from a trusted run (rungs check --baseline ${path} --update-baseline)`,
      path,
    );
  }
  checkConsistency(path, parsed.data);
  return parsed.data;
}

export type FindingKind =
  | 'regression' // an error grew beyond the tolerance
  | 'improvement' // an error shrank beyond the tolerance
  | 'norm-missing' // the baseline has a norm (or a level of it) this run did not measure
  | 'ladder-mismatch' // the run's ladder is not the baseline's
  | 'baseline-short' // the baseline holds fewer levels than the run
  | 'norm-new' // the run measured a norm the baseline lacks
  | 'level-new' // the run measured levels of a norm the baseline lacks
  | 'study-new' // the baseline has no entry for the study
  | 'declaration-changed' // the study's declaration differs from the one recorded
  | 'declaration-unrecorded' // the entry predates declaration hashes
  | 'partial' // --quick or --levels: the first levels of a longer baseline were compared
  | 'study-not-run'; // the baseline has a study this run did not run

/**
 * error: the baseline cannot vouch for this run (bad input, exit 2); failure: the run departs from the baseline
 * (exit 1); warning and note: reported, the exit status does not change.
 */
export type FindingSeverity = 'error' | 'failure' | 'warning' | 'note';

export interface BaselineFinding {
  kind: FindingKind;
  severity: FindingSeverity;
  study: string;
  norm?: string;
  /** 1-based level number (for 'partial': the number of levels compared). */
  level?: number;
  current?: number;
  /** The baseline's error (for 'partial': the number of levels it holds). */
  baseline?: number;
  /** (current - baseline) / baseline. */
  change?: number;
  /** The finding on one line, e.g. "tile-p2  L2  level 5  2.1e-7 vs baseline 1.3e-7 (+62%)". */
  line: string;
}

function percent(change: number): string {
  const pct = change * 100;
  const text = Math.abs(pct) >= 10 ? Math.round(pct).toString() : pct.toFixed(1);
  return `${pct >= 0 ? '+' : ''}${text}%`;
}

/** "level 4" or "levels 4–5" (1-based numbers, given sorted). */
function levelsText(levels: readonly number[]): string {
  if (levels.length === 1) return `level ${levels[0]}`;
  const consecutive = levels.every((l, i) => i === 0 || l === levels[i - 1] + 1);
  return consecutive ? `levels ${levels[0]}–${levels.at(-1)}` : `levels ${levels.join(', ')}`;
}

const RECORD_AGAIN = 'record it again (--update-baseline) from a trusted run';

/**
 * How the run's ladder sits on the baseline's: the number of levels to compare, or the finding that stops the
 * comparison. Levels run must be the baseline's first levels, h and dofs alike; a shorter run is compared on the
 * levels it ran only when `partial` allows it (--quick or --levels), and a baseline shorter than the run cannot vouch for it.
 */
function ladderFit(result: StudyResult, entry: BaselineStudy, partial: boolean): { compared: number } | BaselineFinding {
  const s = result.study;
  const run = result.levels.length;
  const recorded = entry.ladder.levels;
  const mismatch = (line: string): BaselineFinding => ({ kind: 'ladder-mismatch', severity: 'error', study: s, line });
  for (const [i, l] of result.levels.slice(0, Math.min(run, recorded)).entries()) {
    const h = entry.ladder.h[i];
    if (Math.abs(l.h - h) > 1e-9 * Math.max(Math.abs(h), Math.abs(l.h))) {
      return mismatch(`${s}  ladder  level ${i + 1}  h ${l.h} vs baseline ${h}: the baseline was recorded on another ladder; record it again`);
    }
    if (l.dofs !== entry.ladder.dofs[i]) {
      return mismatch(`${s}  ladder  level ${i + 1}  dofs ${l.dofs} vs baseline ${entry.ladder.dofs[i]}: the baseline was recorded on another ladder; record it again`);
    }
  }
  if (run === recorded || (run < recorded && partial)) return { compared: run };
  if (run < recorded) {
    return mismatch(`${s}  ladder  ${run} levels vs baseline ${recorded} levels: the baseline was recorded on another ladder; record it again (only --quick and --levels compare a shorter run with a baseline's first levels)`);
  }
  const lacking = Array.from({ length: run - recorded }, (_, i) => recorded + i + 1);
  return {
    kind: 'baseline-short',
    severity: 'error',
    study: s,
    line: `${s}  ladder  ${run} levels vs baseline ${recorded} levels: the baseline lacks ${levelsText(lacking)} (recorded with --quick or --levels?); ${RECORD_AGAIN}`,
  };
}

export interface CompareOptions {
  /** Allowed relative growth of an error (default: the baseline's own tolerance, else 0.05). */
  relTol?: number;
  /** Compare a run shorter than the baseline on the levels it ran: true or the option that shortened it ('--quick',
   *  the default wording, or '--levels 3'), named in the note. */
  partial?: boolean | string;
  /** The hash of the study's declaration now; compared with the recorded one. */
  declaration?: string;
}

/**
 * Compares one study's errors with its baseline, level by level. An error that grew by more than the tolerance is a
 * regression (failure); one that shrank by more is an improvement (note). Levels that sit on an error floor in both
 * runs are not compared: round-off differs from machine to machine. A ladder that is not the baseline's, and a
 * baseline that lacks levels or norms this run measured, are errors: the baseline cannot vouch for the run. A norm
 * or level the run lost is a failure. A declaration that changed since the baseline is a warning: its errors are
 * still compared, so a change that moved them fails through them, and one that did not is said so.
 */
export function compareToBaseline(result: StudyResult, entry: BaselineStudy, options: CompareOptions = {}): BaselineFinding[] {
  const relTol = options.relTol ?? entry.relTol ?? DEFAULT_REL_TOL;
  const s = result.study;
  const findings: BaselineFinding[] = [];
  const fit = ladderFit(result, entry, !!options.partial);
  if ('compared' in fit) {
    const compared = fit.compared;
    const current = baselineStudyOf(result, relTol);
    for (const [norm, allRows] of Object.entries(entry.norms)) {
      const rows = allRows.filter((r) => r.level <= compared);
      const now = current.norms[norm];
      if (!now) {
        findings.push({ kind: 'norm-missing', severity: 'failure', study: s, norm, line: `${s}  ${norm}  in the baseline but not measured by this run` });
        continue;
      }
      for (const base of rows) {
        const cur = now.find((r) => r.level === base.level);
        if (!cur) {
          findings.push({ kind: 'norm-missing', severity: 'failure', study: s, norm, level: base.level, line: `${s}  ${norm}  level ${base.level}  no error in this run` });
          continue;
        }
        if (base.floor && cur.floor) continue;
        const change = base.error === 0 ? (cur.error === 0 ? 0 : Number.POSITIVE_INFINITY) : (cur.error - base.error) / base.error;
        if (Math.abs(change) <= relTol) continue;
        const kind = change > 0 ? 'regression' : 'improvement';
        const pct = Number.isFinite(change) ? percent(change) : 'from zero';
        findings.push({
          kind,
          severity: kind === 'regression' ? 'failure' : 'note',
          study: s,
          norm,
          level: base.level,
          current: cur.error,
          baseline: base.error,
          change,
          line: `${s}  ${norm}  level ${base.level}  ${sciShort(cur.error)} vs baseline ${sciShort(base.error)} (${pct})`,
        });
      }
      const unrecorded = now.filter((r) => r.level <= compared && !rows.some((b) => b.level === r.level)).map((r) => r.level);
      if (unrecorded.length) {
        findings.push({
          kind: 'level-new', severity: 'error', study: s, norm, level: unrecorded[0],
          line: `${s}  ${norm}  ${levelsText(unrecorded)} measured by this run but not in the baseline; ${RECORD_AGAIN}`,
        });
      }
    }
    for (const norm of Object.keys(current.norms)) {
      if (!(norm in entry.norms)) {
        findings.push({ kind: 'norm-new', severity: 'error', study: s, norm, line: `${s}  ${norm}  measured by this run but not in the baseline; ${RECORD_AGAIN}` });
      }
    }
    if (compared < entry.ladder.levels) {
      findings.push({
        kind: 'partial', severity: 'note', study: s, level: compared, baseline: entry.ladder.levels,
        line: `${s}  compared ${levelsText(Array.from({ length: compared }, (_, i) => i + 1))} of the baseline's ${entry.ladder.levels} (${typeof options.partial === 'string' ? options.partial : '--quick'})`,
      });
    }
  } else {
    findings.push(fit);
  }
  if (options.declaration !== undefined) {
    if (entry.declaration === undefined) {
      findings.push({ kind: 'declaration-unrecorded', severity: 'note', study: s, line: `${s}  the baseline entry has no declaration hash, so changes to the study cannot be told; record it again to add one` });
    } else if (entry.declaration !== options.declaration) {
      const departs = findings.some((f) => f.severity === 'error' || f.severity === 'failure');
      const what = `${s}  declaration changed since the baseline was recorded (${shortHash(entry.declaration)} → ${shortHash(options.declaration)})`;
      findings.push({
        kind: 'declaration-changed',
        severity: 'warning',
        study: s,
        line: departs
          ? `${what}; the differences above may come from that change: if it was intended, record the baseline again (--update-baseline)`
          : `${what}, but its errors still match the baseline: if the change was intended, record the baseline again (--update-baseline)`,
      });
    }
  }
  return findings;
}

export interface CompareAllOptions {
  /** Compare runs shorter than the baseline on the levels they ran (`rungs check --quick` or `--levels N`). */
  partial?: boolean | string;
  /** Per study: the hash of its declaration now and its declared tolerance (which overrides the recorded one). */
  facts?: Record<string, StudyFacts>;
}

/**
 * All studies against a baseline. A study the baseline lacks is an error (the baseline cannot vouch for it); a study
 * of the baseline this run did not run is a note (running a few studies against a full baseline is allowed).
 */
export function compareAll(results: readonly StudyResult[], baseline: Baseline, options: CompareAllOptions = {}): BaselineFinding[] {
  const findings = results.flatMap((r): BaselineFinding[] => {
    const entry = baseline.studies[r.study];
    if (!entry) return [{ kind: 'study-new', severity: 'error', study: r.study, line: `${r.study}  not in the baseline; record it (--update-baseline) from a trusted run` }];
    const f = options.facts?.[r.study] ?? {};
    return compareToBaseline(r, entry, { partial: options.partial, relTol: f.relTol, declaration: f.declaration });
  });
  const ran = new Set(results.map((r) => r.study));
  for (const study of Object.keys(baseline.studies).sort()) {
    if (!ran.has(study)) findings.push({ kind: 'study-not-run', severity: 'note', study, line: `${study}  in the baseline but not run, so not compared` });
  }
  return findings;
}
