import { cBody, cSyntax } from './c.ts';
import { comment, commentSafe, headerLines } from './header.ts';
import type { Prepared } from './prepared.ts';

export function cppData(p: Prepared, file: string): string {
  const syntax = cSyntax('std::');
  const functions = p.functions.map((f) => {
    const count = f.plan.outputs.length;
    const single = count === 1;
    const params = f.fn.args.map((a) => `double ${a}`).join(', ');
    const signature = single ? `inline double ${f.fn.name}(${params})` : `inline std::array<double, ${count}> ${f.fn.name}(${params})`;
    const body = single
      ? cBody(f, syntax, (_, text) => `return ${text};`)
      : [
        ...cBody(f, syntax, (k, text) => `out[${k}] = ${text}; // ${commentSafe(f.fn.outputNames[k])}`,
          [`std::array<double, ${count}> out{};`]),
        '    return out;',
      ];
    return [`// ${commentSafe(f.fn.doc)}`, signature, '{', ...body, '}'].join('\n');
  });
  return [
    comment(headerLines(p.bundle, file, 'One output is returned as a double; several as a std::array<double, n>, in the order listed.',
      ['C++17 or later. Everything is in namespace rungs_data; every function is inline, so the header can be included in several files.']), '//'),
    '#pragma once',
    '',
    '#include <array>',
    '#include <cmath>',
    '',
    'namespace rungs_data {',
    '',
    '// sign with sign(0) = 0 (and NaN for NaN), as in every language rungs writes.',
    'inline double rungs_sign(double a) { return a > 0.0 ? 1.0 : (a < 0.0 ? -1.0 : a); }',
    '',
    functions.join('\n\n'),
    '',
    '}  // namespace rungs_data',
    '',
  ].join('\n');
}
