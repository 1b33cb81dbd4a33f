import { readFileSync, writeFileSync } from 'node:fs';
import { RungsInputError } from '../errors.ts';
import { compactJson } from '../report/compact-json.ts';
import { sciShort } from '../report/numbers.ts';
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

/** One study's entry, recorded from its result; the tolerance is kept from an earlier entry when there is one. */
export function baselineStudyOf(result: StudyResult, relTol = DEFAULT_REL_TOL): BaselineStudy {
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
  return {
    ladder: { levels: result.levels.length, h: result.levels.map((l) => l.h), dofs: result.levels.map((l) => l.dofs) },
    relTol,
    recordedAt: result.startedAt,
    norms,
  };
}

/** A baseline from these results; studies of `existing` that did not run now are kept unchanged. */
export function makeBaseline(results: readonly StudyResult[], existing?: Baseline): Baseline {
  const studies: Record<string, BaselineStudy> = { ...(existing?.studies ?? {}) };
  for (const r of results) studies[r.study] = baselineStudyOf(r, existing?.studies[r.study]?.relTol ?? DEFAULT_REL_TOL);
  return { format: BASELINE_FORMAT, version: BASELINE_VERSION, studies };
}

/** Sorted keys, one level per line: re-recording a baseline changes only the lines whose numbers changed. */
export function baselineJson(baseline: Baseline): string {
  return compactJson(baseline, { width: 100, sortKeys: true }) + '\n';
}

export function writeBaseline(path: string, baseline: Baseline): void {
  try {
    writeFileSync(path, baselineJson(baseline));
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

/** Reads and checks a baseline file; a missing file, bad JSON or a wrong field is a RungsInputError naming it. */
export function readBaseline(path: string): Baseline {
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
  checkConsistency(path, parsed.data);
  return parsed.data;
}

export type FindingKind = 'regression' | 'improvement' | 'ladder-mismatch' | 'norm-missing' | 'norm-new' | 'study-new';

export interface BaselineFinding {
  kind: FindingKind;
  /** Failures fail the gate; notes are reported only. */
  severity: 'failure' | 'note';
  study: string;
  norm?: string;
  /** 1-based level number. */
  level?: number;
  current?: number;
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

/** The first level where the run's ladder departs from the baseline's, or null when they agree. */
function ladderMismatch(result: StudyResult, entry: BaselineStudy): string | null {
  const s = result.study;
  if (result.levels.length !== entry.ladder.levels) {
    return `${s}  ladder  ${result.levels.length} levels vs baseline ${entry.ladder.levels} levels: the baseline was recorded on another ladder; record it again`;
  }
  for (const [i, l] of result.levels.entries()) {
    const h = entry.ladder.h[i];
    if (Math.abs(l.h - h) > 1e-9 * Math.max(Math.abs(h), Math.abs(l.h))) {
      return `${s}  ladder  level ${i + 1}  h ${l.h} vs baseline ${h}: the baseline was recorded on another ladder; record it again`;
    }
    if (l.dofs !== entry.ladder.dofs[i]) {
      return `${s}  ladder  level ${i + 1}  dofs ${l.dofs} vs baseline ${entry.ladder.dofs[i]}: the baseline was recorded on another ladder; record it again`;
    }
  }
  return null;
}

export interface CompareOptions {
  /** Allowed relative growth of an error (default: the baseline's own tolerance, else 0.05). */
  relTol?: number;
}

/**
 * Compares one study's errors with its baseline, level by level. An error that grew by more than the tolerance is a
 * regression (failure); one that shrank by more is an improvement (note). Levels that sit on an error floor in both
 * runs are not compared: round-off differs from machine to machine. A different ladder is one mismatch failure.
 */
export function compareToBaseline(result: StudyResult, entry: BaselineStudy, options: CompareOptions = {}): BaselineFinding[] {
  const relTol = options.relTol ?? entry.relTol ?? DEFAULT_REL_TOL;
  const s = result.study;
  const mismatch = ladderMismatch(result, entry);
  if (mismatch) return [{ kind: 'ladder-mismatch', severity: 'failure', study: s, line: mismatch }];
  const findings: BaselineFinding[] = [];
  const current = baselineStudyOf(result, relTol);
  for (const [norm, rows] of Object.entries(entry.norms)) {
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
  }
  for (const norm of Object.keys(current.norms)) {
    if (!(norm in entry.norms)) {
      findings.push({ kind: 'norm-new', severity: 'note', study: s, norm, line: `${s}  ${norm}  not in the baseline yet` });
    }
  }
  return findings;
}

/** All studies against a baseline; a study the baseline does not know is a note, not a failure. */
export function compareAll(results: readonly StudyResult[], baseline: Baseline, options: CompareOptions = {}): BaselineFinding[] {
  return results.flatMap((r) => {
    const entry = baseline.studies[r.study];
    if (!entry) return [{ kind: 'study-new' as const, severity: 'note' as const, study: r.study, line: `${r.study}  not in the baseline yet` }];
    return compareToBaseline(r, entry, options);
  });
}
