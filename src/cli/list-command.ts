import { findStudyFiles, loadStudy } from '../study/load.ts';
import { defaultNorms, expectedOrders } from '../study/expected.ts';
import type { NormName, StudyDeclaration } from '../study/declaration.ts';
import { ladderRungs, timeAxis } from '../study/time-ladder.ts';
import { RungsInputError } from '../errors.ts';
import { problemLine } from './output.ts';

/** `rungs list`: one block per study with its domain, discretization, ladder and expected orders. */
export async function listCommand(paths: string[]): Promise<number> {
  let status = 0;
  let files: string[];
  try { files = findStudyFiles(paths); } catch (err) {
    if (err instanceof RungsInputError) { process.stderr.write(problemLine('', err.message) + '\n'); return 2; }
    throw err;
  }
  for (const file of files) {
    try {
      const { declaration: d, file: shown } = await loadStudy(file);
      const norms = (d.norms ?? defaultNorms(d)) as NormName[];
      const exp = expectedOrders(d, norms);
      const disc = d.discretization.kind === 'lagrange' ? `Lagrange degree ${d.discretization.degree}` : d.discretization.label;
      const orders = norms.map((nm) => `${nm} ${exp[nm] ?? '?'}`).join(', ');
      process.stdout.write(
        `${d.name}  (${shown})\n` +
        `  ${d.domain.label}; ${disc}\n` +
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
