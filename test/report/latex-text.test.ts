import { describe, expect, it } from 'vitest';
import { latexText } from '../../src/report/latex-text.ts';
import { sentence } from '../../src/report/numbers.ts';

// Command names from the LaTeX2e kernel (fntguide; "The LaTeX Companion", 2nd ed., ch. 7), from memory.
describe('latexText: any text as pdflatex input with only the kernel', () => {
  it.each([
    ['θ', '$\\theta$'],
    ['θ²', '$\\theta^{2}$'],
    ['2×10⁻³', '2$\\times$10$^{-3}$'],
    ['x₁₂', 'x$_{12}$'],
    ['a ≤ b', 'a $\\leq$ b'],
    ['‖e‖', '$\\|$e$\\|$'],
    ['5 µm', '5 $\\mu$m'],
    ['Δt = 0.1', '$\\Delta t$ = 0.1'],
    ['Δx', '$\\Delta$x'],
    ['Eça', 'E\\c{c}a'],
    ['naïve café', 'na\\"{\\i}ve caf\\\'{e}'],
    ['x < y | z', 'x \\textless{} y \\textbar{} z'],
    ['a_b 50% $5', 'a\\_b 50\\% \\$5'],
    ['2–3 — yes', '2--3 --- yes'],
    ['☃', '[U+2603]'],
    ['🙂', '[U+1F642]'],
  ])('%s → %s', (input, output) => expect(latexText(input)).toBe(output));

  it('keeps an escaped dollar apart from a formula after it (no "$$", which would open display math)', () => {
    expect(latexText('$θ')).toBe('\\$$\\theta$');
    expect(latexText('θ$')).toBe('$\\theta$\\$');
  });
});

describe('sentence: one full stop at the end of a caption', () => {
  it.each([['edge', 'edge.'], ['edge.', 'edge.'], ['why?', 'why?'], ['edge. ', 'edge.'], ['', '']])('%j → %j', (a, b) => expect(sentence(a)).toBe(b));
});
