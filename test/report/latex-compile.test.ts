// The LaTeX tables compiled by a real pdflatex (Debian's texlive-latex-base and texlive-latex-recommended; booktabs
// is in the latter) inside a minimal article: every study of the fixtures, studies with time, a table with quantities
// of interest, and a study whose name and description hold the symbols people write (θ, Δ, ×, ≤, ², µ, ‖, accents).
// A character pdflatex cannot print either stops the run ("Unicode character … not set up for use with LaTeX") or is
// dropped with "Missing character" in the log; both fail the test. Skipped, with a message, when pdflatex is absent.
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { fitTable } from '../../src/fit/fit-table.ts';
import { latexTable } from '../../src/report/tables.ts';
import type { StudyResult } from '../../src/study/result.ts';
import { demoResults, tileP2 } from './fixture.ts';
import { timeResults } from './time-fixture.ts';

const pdflatex = spawnSync('pdflatex', ['--version'], { encoding: 'utf8' }).status === 0;

function withQuantities(): StudyResult {
  // Invented tile data: a flux 1.5 + 0.8 h² on five meshes, the L2 error 0.3 h² beside it.
  const hs = [0.4, 0.2, 0.1, 0.05, 0.025];
  const text = ['h,L2,flux_θ', ...hs.map((h) => `${h},${0.3 * h * h},${1.5 + 0.8 * h * h}`)].join('\n') + '\n';
  const { result, quantities } = fitTable(text, { file: 'q.csv', quantities: ['flux_θ'], expect: 'L2=2' });
  result.quantities = quantities;
  return result;
}

function symbols(): StudyResult {
  const r = tileP2();
  r.study = 'glaze_θ-µ#1';
  r.description = 'Conductivity k(θ) = 1 + θ², Δx ≤ 2×10⁻³, ‖u − u_h‖ ≈ Ch^p; Eça & Hoekstra, Roy’s “fit” — 100% <ok> | 50 µm, ½ of Ω, ✓ done…';
  return r;
}

describe.skipIf(!pdflatex)(`LaTeX tables compiled by pdflatex${pdflatex ? '' : ' (skipped: pdflatex not found; apt-get install texlive-latex-base texlive-latex-recommended)'}`, () => {
  const dir = mkdtempSync(join(tmpdir(), 'rungs-latex-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));
  const studies = [...demoResults(), ...timeResults(), withQuantities(), symbols()];
  const tables = studies.map(latexTable);

  it('every table compiles without an error and without a missing character', () => {
    const body = tables.map((t, i) => `% study ${i + 1}\n${t}\n\\clearpage`).join('\n');
    writeFileSync(join(dir, 'doc.tex'), `\\documentclass{article}\n\\usepackage{booktabs}\n\\begin{document}\n${body}\n\\end{document}\n`);
    let failure = '';
    try {
      execFileSync('pdflatex', ['-interaction=nonstopmode', '-halt-on-error', 'doc.tex'], { cwd: dir, encoding: 'utf8', stdio: 'pipe' });
    } catch (err) {
      failure = String((err as { stdout?: string }).stdout ?? err).split('\n').filter((l) => l.startsWith('!') || l.startsWith('l.')).join('\n');
    }
    expect(failure).toBe('');
    const log = readFileSync(join(dir, 'doc.log'), 'latin1');
    expect(log.match(/Missing character[^\n]*/g) ?? []).toEqual([]);
    // At least one page per study (each ends with \clearpage; the quantity tables take more), none lost on the way.
    const pages = Number(/Output written on doc\.pdf \((\d+) pages?/.exec(log)?.[1] ?? 0);
    expect(pages).toBeGreaterThanOrEqual(studies.length);
  });

  it('spells the symbols as LaTeX, with nothing outside ASCII left', () => {
    const sym = tables[tables.length - 1]!;
    expect(sym).toMatch(/^[\x00-\x7f]*$/);
    for (const s of ['$\\theta^{2}$', '$\\times$10$^{-3}$', '$\\|$', '$\\leq$', '$\\approx$', "E\\c{c}a", '$\\mu$m', '\\textless{}ok\\textgreater{}', '\\#1', '100\\%', '$\\Delta$x']) expect(sym).toContain(s);
  });

  it('never doubles a full stop in a caption (a description that ends in one)', () => {
    const captions = tables.flatMap((t) => t.match(/\\caption\{.*\}/g) ?? []);
    expect(captions.length).toBeGreaterThan(studies.length);
    expect(captions.filter((c) => /\.\s*\./.test(c.replace(/\\ldots\{\}/g, '')))).toEqual([]);
  });
});
