import type { LoadedStudy } from './load.ts';
import type { StudyDeclaration } from './declaration.ts';
import type { StudyResult } from './result.ts';
import { judgeRobustness, DEFAULT_ROBUSTNESS_GROWTH, type RobustnessFinding } from '../analysis/robustness.ts';

/** The name of the study a sweep runs for one value: `<name>-<coefficient>-<value>` (value written plainly, `e` for
 *  powers of ten: lambda-1e4). */
export function memberName(name: string, coefficient: string, value: number): string {
  const v = Math.abs(value) >= 1e4 || (value !== 0 && Math.abs(value) < 1e-3) ? value.toExponential().replace('e+', 'e') : String(value);
  return `${name}-${coefficient}-${v}`;
}

/** The declaration of one member: the coefficient replaced by the value wherever the study gives it (the pde's
 *  coefficients and its preset's arguments, or today's equation's coefficients). */
export function sweepMember(decl: StudyDeclaration, index: number): StudyDeclaration {
  const sweep = decl.sweep!;
  const value = sweep.values[index];
  const c = sweep.coefficient;
  const out: StudyDeclaration = { ...decl, name: memberName(decl.name, c, value), sweep: undefined, sweepMember: { group: decl.name, coefficient: c, value, index, count: sweep.values.length, expect: sweep.expect ?? 'robust', growth: sweep.growth ?? DEFAULT_ROBUSTNESS_GROWTH } };
  if (decl.pde) {
    out.pde = {
      ...decl.pde,
      coefficients: { ...decl.pde.coefficients, [c]: value },
      preset: decl.pde.preset ? { ...decl.pde.preset, args: Object.hasOwn(decl.pde.preset.args, c) ? { ...decl.pde.preset.args, [c]: value } : decl.pde.preset.args } : undefined,
    };
  } else {
    out.coefficients = { ...decl.coefficients, [c]: value };
  }
  return out;
}

/** Every study with a sweep becomes one study per value; others pass through. */
export function expandSweeps(loaded: readonly LoadedStudy[]): LoadedStudy[] {
  return loaded.flatMap((l) => (l.declaration.sweep
    ? l.declaration.sweep.values.map((_, i) => ({ file: l.file, declaration: sweepMember(l.declaration, i) }))
    : [l]));
}

export interface SweepVerdict {
  group: string;
  coefficient: string;
  values: number[];
  findings: RobustnessFinding[];
  robust: boolean;
  expected: 'robust' | 'not-robust';
  asExpected: boolean;
}

/**
 * Judges each sweep whose members all finished: per norm, the growth of the error constant on the finest level. The
 * verdict is written into every member's result (`robustness`, a warning with the reason), and a member is as
 * expected only when the sweep is: robust, or not robust where the study declares the demonstration of locking (its
 * members' own order verdicts are then reported without deciding).
 */
export function judgeSweeps(results: StudyResult[], declarations: ReadonlyMap<string, StudyDeclaration>, expected: Record<string, Record<string, number | null>>): SweepVerdict[] {
  const groups = new Map<string, StudyResult[]>();
  for (const r of results) {
    const m = declarations.get(r.study)?.sweepMember;
    if (m) groups.set(m.group, [...(groups.get(m.group) ?? []), r]);
  }
  const verdicts: SweepVerdict[] = [];
  for (const [group, members] of groups) {
    const decls = members.map((r) => declarations.get(r.study)!);
    const { coefficient, count, expect, growth: allowed } = decls[0].sweepMember!;
    if (members.length < count || members.some((r) => r.levels.length === 0)) continue;
    const order = members.map((_, i) => i).sort((a, b) => decls[a].sweepMember!.index - decls[b].sweepMember!.index);
    const norms = members[0].analyses.map((a) => a.name);
    const findings: RobustnessFinding[] = [];
    for (const norm of norms) {
      const p = expected[members[0].study]?.[norm];
      if (p === null || p === undefined) continue;
      findings.push(judgeRobustness(norm, coefficient, p, order.map((i) => {
        const last = members[i].levels[members[i].levels.length - 1];
        return { value: decls[i].sweepMember!.value, h: last.h, error: last.errors[norm] };
      }), allowed));
    }
    const robust = findings.every((f) => f.robust);
    const verdict: SweepVerdict = {
      group, coefficient, values: order.map((i) => decls[i].sweepMember!.value), findings, robust, expected: expect,
      asExpected: robust === (expect === 'robust'),
    };
    verdicts.push(verdict);
    for (const r of members) {
      r.robustness = verdict;
      // A growing constant is worth a warning in every member's report; a bounded one is in `robustness` and the
      // sweep's line.
      r.warnings.push(...findings.filter((f) => !f.robust).map((f) => `sweep over ${coefficient}: ${f.reason}`));
      r.asExpected = verdict.asExpected && (expect === 'not-robust' || r.asExpected);
    }
  }
  return verdicts;
}

