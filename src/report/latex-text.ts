// Text from a study (names, descriptions, reasons, units) written for pdflatex with nothing but the LaTeX kernel and
// booktabs: no inputenc, fontenc or textcomp options needed, so a table pasted into any document compiles. pdflatex
// reads UTF-8 since LaTeX 2018-04-01, but only for the characters its current font encoding declares; θ, ‖, ² and most
// other symbols stop a document with "Unicode character not set up for use with LaTeX". Each is therefore spelled as a
// kernel command (LaTeX2e font selection guide, fntguide, and "The LaTeX Companion", 2nd ed., ch. 7, for the accent
// and symbol commands); a character with no spelling here is written as its code point, "[U+2603]", so the document
// still compiles and the reader sees what was there.

const SPECIALS: Record<string, string> = {
  '\\': '\\textbackslash{}',
  '{': '\\{',
  '}': '\\}',
  $: '\\$',
  '&': '\\&',
  '#': '\\#',
  '%': '\\%',
  _: '\\_',
  '^': '\\textasciicircum{}',
  '~': '\\textasciitilde{}',
};

/** The ten characters LaTeX treats specially in text (common practice, no source). */
export function escapeLatex(text: string): string {
  return text.replace(/[\\{}$&#%_^~]/g, (c) => SPECIALS[c]!);
}

// Characters of the OT1 text encoding that print as something else: '<' as '¡', '>' as '¿', '|' as an em dash.
const OT1_TRAPS: Record<string, string> = { '<': '\\textless{}', '>': '\\textgreater{}', '|': '\\textbar{}' };

const GREEK_LOWER = 'alpha beta gamma delta epsilon zeta eta theta iota kappa lambda mu nu xi o pi rho varsigma sigma tau upsilon phi chi psi omega'.split(' ');
const GREEK_UPPER: Record<string, string> = { Γ: 'Gamma', Δ: 'Delta', Θ: 'Theta', Λ: 'Lambda', Ξ: 'Xi', Π: 'Pi', Σ: 'Sigma', Υ: 'Upsilon', Φ: 'Phi', Ψ: 'Psi', Ω: 'Omega' };

/** Symbols written in math mode (each becomes `$…$`; neighbouring spans are joined). */
const MATH: Record<string, string> = {
  '×': '\\times', '·': '\\cdot', '⋅': '\\cdot', '±': '\\pm', '∓': '\\mp', '−': '-', '≤': '\\leq', '≥': '\\geq', '≠': '\\neq',
  '≈': '\\approx', '∼': '\\sim', '≃': '\\simeq', '≡': '\\equiv', '∝': '\\propto', '∞': '\\infty', '→': '\\to', '←': '\\leftarrow',
  '↔': '\\leftrightarrow', '⇒': '\\Rightarrow', '⇔': '\\Leftrightarrow', '‖': '\\|', '∂': '\\partial', '∇': '\\nabla',
  '∑': '\\sum', '∫': '\\int', '√': '\\surd', '∈': '\\in', '∉': '\\notin', '⊂': '\\subset', '⊆': '\\subseteq', '∪': '\\cup',
  '∩': '\\cap', '∘': '\\circ', '°': '^\\circ', '′': "'", '″': "''", '½': '\\frac{1}{2}', '¼': '\\frac{1}{4}', '¾': '\\frac{3}{4}',
  'µ': '\\mu', 'ϵ': '\\epsilon', 'ε': '\\varepsilon', 'ϑ': '\\vartheta', 'φ': '\\phi', 'ϕ': '\\phi', 'ℓ': '\\ell', '∆': '\\Delta',
  'Ω': '\\Omega', '✓': '\\surd', '✔': '\\surd', '✗': '\\times', '✘': '\\times', '⟨': '\\langle', '⟩': '\\rangle', '∅': '\\emptyset',
  '∀': '\\forall', '∃': '\\exists', '¬': '\\neg', '∧': '\\wedge', '∨': '\\vee', '⊗': '\\otimes', '⊕': '\\oplus', '†': '\\dagger',
};
for (let k = 0; k < GREEK_LOWER.length; k++) {
  const c = String.fromCodePoint(0x3b1 + k);
  if (!(c in MATH)) MATH[c] = GREEK_LOWER[k] === 'o' ? 'o' : `\\${GREEK_LOWER[k]}`;
}
for (const [c, name] of Object.entries(GREEK_UPPER)) MATH[c] = `\\${name}`;
'⁰¹²³⁴⁵⁶⁷⁸⁹'.split('').forEach((c, d) => { MATH[c] = `^{${d}}`; });
'₀₁₂₃₄₅₆₇₈₉'.split('').forEach((c, d) => { MATH[c] = `_{${d}}`; });
Object.assign(MATH, { '⁺': '^{+}', '⁻': '^{-}', '₊': '_{+}', '₋': '_{-}', 'ⁿ': '^{n}', 'ᵢ': '_{i}', 'ₕ': '_{h}' });

/** Characters written in text mode. */
const TEXT: Record<string, string> = {
  '–': '--', '—': '---', '‐': '-', '‑': '-', '‘': '`', '’': "'", '‚': ',', '“': '``', '”': "''", '„': ',,', '…': '\\ldots{}',
  '\u00a0': '~', '\u2009': '\\,', '\u202f': '\\,', 'ß': '\\ss{}', 'æ': '\\ae{}', 'Æ': '\\AE{}', 'œ': '\\oe{}', 'Œ': '\\OE{}',
  'ø': '\\o{}', 'Ø': '\\O{}', 'ł': '\\l{}', 'Ł': '\\L{}', 'ı': '\\i{}', '§': '\\S{}', '¶': '\\P{}', '©': '\\copyright{}',
  '£': '\\pounds{}', '€': 'EUR', '•': '$\\bullet$', '⚠': '(!)', '¡': '!`', '¿': '?`', '«': '<<', '»': '>>',
};

/** Combining marks of NFD and the kernel accent command for each (é = e + U+0301 → \'{e}). */
const ACCENTS: Record<string, string> = {
  '\u0300': '\\`', '\u0301': "\\'", '\u0302': '\\^', '\u0303': '\\~', '\u0304': '\\=', '\u0306': '\\u', '\u0307': '\\.',
  '\u0308': '\\"', '\u030a': '\\r', '\u030b': '\\H', '\u030c': '\\v', '\u0327': '\\c', '\u0328': '\\k',
};

function accented(c: string): string | null {
  const parts = [...c.normalize('NFD')];
  if (parts.length < 2 || !/^[A-Za-z]$/.test(parts[0]!)) return null;
  let out = parts[0] === 'i' ? '\\i' : parts[0] === 'j' ? '\\j' : parts[0]!;
  for (const mark of parts.slice(1)) {
    const command = ACCENTS[mark];
    if (!command) return null;
    out = `${command}{${out}}`;
  }
  return out;
}

/** One non-ASCII character as LaTeX source. */
function spell(c: string): string {
  if (c in MATH) return `$${MATH[c]}$`;
  if (c in TEXT) return TEXT[c]!;
  const a = accented(c);
  if (a !== null) return a;
  return `[U+${c.codePointAt(0)!.toString(16).toUpperCase().padStart(4, '0')}]`;
}

/**
 * Any text as pdflatex input: the ten specials escaped, '<', '>' and '|' as text commands, every non-ASCII character
 * spelled as a command (math symbols in `$…$`, joined with their neighbours: "θ²" → `$\theta^{2}$`), control
 * characters dropped, line breaks as spaces. "Δt" is written as one formula, `$\Delta t$`.
 */
export function latexText(text: string): string {
  const escaped = escapeLatex(text.replace(/\r\n?|\n|\t/g, ' ').replace(/[\u0000-\u001f\u007f]/g, ''))
    .replace(/[<>|]/g, (c) => OT1_TRAPS[c]!)
    .replace(/Δt(?![A-Za-z])/g, '$\\Delta t$')
    .replace(/[^\u0000-\u007f$][\u0300-\u036f]*|[A-Za-z][\u0300-\u036f]+/gu, (c) => (c === '$' ? c : spell(c.normalize('NFC'))));
  // Two math spans side by side ("$\theta$$^{2}$") would open display math; join them. An escaped dollar "\$" is text.
  // Then "10⁻³" reads ^{-}^{3}, a double superscript to TeX: neighbouring scripts are merged into one, ^{-3}.
  let out = escaped.replace(/(?<!\\)\$\$/g, '');
  for (let prev = ''; prev !== out; ) { prev = out; out = out.replace(/\^\{([^{}$]*)\}\^\{([^{}$]*)\}/g, '^{$1$2}').replace(/_\{([^{}$]*)\}_\{([^{}$]*)\}/g, '_{$1$2}'); }
  return out;
}
