import { findStudyFiles, loadStudy } from '../study/load.ts';
import { defaultNorms, expectedOrders } from '../study/expected.ts';
import type { NormName, StudyDeclaration } from '../study/declaration.ts';
import { ladderRungs, timeAxis } from '../study/time-ladder.ts';
import { RungsInputError } from '../errors.ts';
import { problemLine } from './output.ts';
import { selectStudyFiles } from './select.ts';
import { showArgv } from '../external/command.ts';
import { splitCommandWords } from '../external/words.ts';
import type { Discretization } from '../study/declaration.ts';

export interface ListOptions {
  /** Only the study names, one a line. */
  quiet?: boolean;
  /** --study: only studies whose name or file name matches one of these patterns. */
  study?: string[];
}

/** `rungs list`: one block per study with its domain, discretization, ladder and expected orders. */
export async function listCommand(paths: string[], o: ListOptions = {}): Promise<number> {
  let status = 0;
  let files: string[];
  try { files = await selectStudyFiles(findStudyFiles(paths), o.study, paths); } catch (err) {
    if (err instanceof RungsInputError) { process.stderr.write(problemLine('', err.message) + '\n'); return 2; }
    throw err;
  }
  for (const file of files) {
    try {
      const { declaration: d, file: shown } = await loadStudy(file);
      const norms = (d.norms ?? defaultNorms(d)) as NormName[];
      const exp = expectedOrders(d, norms);
      if (o.quiet) { process.stdout.write(`${d.name}\n`); continue; }
      const orders = norms.map((nm) => `${nm} ${exp[nm] ?? '?'}`).join(', ');
      process.stdout.write(
        `${d.name}  (${shown})\n` +
        (d.description ? `  ${d.description}\n` : '') +
        `  ${d.domain.label}; ${discretizationText(d.discretization)}\n` +
        `  ladder n = ${d.ladder.n.join(', ')}${d.ladder.perturb ? ` perturbed by ${d.ladder.perturb.fraction}·h` : ''}${timeText(d)}\n` +
        `  expected orders: ${orders}${d.expect ? `; demonstrates: ${d.expect.flaw} (expects ${d.expect.verdict})` : ''}\n`,
      );
    } catch (err) {
      if (!(err instanceof RungsInputError)) throw err;
      process.stderr.write(problemLine('', err.message) + '\n');
      status = 2;
    }
  }
  return status;
}

/** "; T = 1, steps 16, 32, 64 (bdf2): refines Δt" for a study with time; '' for a steady one. */
function timeText(d: StudyDeclaration): string {
  if (!d.time) return '';
  const steps = ladderRungs(d).map((r) => r.steps);
  const distinct = [...new Set(steps)].join(', ');
  const axis = { dt: 'refines Δt', h: 'refines h', coupled: `coupled Δt = ${d.ladder.coupled?.c}·h^${d.ladder.coupled?.exponent}`, grid: 'every (h, Δt) pair, fitted jointly' }[timeAxis(d)!];
  return `; T = ${d.time.final}, steps ${distinct} (${d.time.stepper ?? `the code's own stepper, order ${d.time.order}`}): ${axis}`;
}

/** Every field a discretization declares, none left out: "Lagrange degree 2, load quadrature degree 1"; "custom: P1 …
 *  (degree 1)"; "external code (VTK output, degree 1): python3 solver.py --n {n} --out {out}". */
export function discretizationText(d: Discretization): string {
  if (d.kind === 'lagrange') {
    const q = Object.entries(d.quadrature ?? {}).map(([term, deg]) => `${term} quadrature degree ${deg}`);
    return [`Lagrange degree ${d.degree}`, ...q].join(', ') + (d.label ? ` (${d.label})` : '');
  }
  if (d.kind === 'custom') return `custom: ${d.label}${d.degree !== undefined ? ` (degree ${d.degree})` : ''}`;
  const show = (c: string | string[]) => { try { return showArgv(typeof c === 'string' ? splitCommandWords(c) : c); } catch { return String(c); } };
  const facts = [d.output === 'vtk' ? 'VTK output' : 'errors output', d.degree !== undefined ? `degree ${d.degree}` : '',
    d.timeoutSeconds !== undefined ? `timeout ${d.timeoutSeconds} s` : '', d.cwd ? `in ${d.cwd}` : ''].filter(Boolean);
  return `${d.label ?? 'external code'} (${facts.join(', ')}): ${show(d.command)}` + (d.preflight ? `; preflight: ${show(d.preflight)}` : '');
}
