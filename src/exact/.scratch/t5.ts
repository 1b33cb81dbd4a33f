import { manufacture, javaScriptOf, parseFormula } from '../index.ts';
const t0 = performance.now();
const s = manufacture({ dim: 2, u: 'exp(-x) * sin(3*y) + x*y', k: '1 + 0.25*x*y' }, 'exact');
console.log(performance.now() - t0, s.formulas, s.polynomialDegree, s.kDegreeHint, s.fDegreeHint);
const s2 = manufacture({ dim: 2, u: 'x^2*y + y^3', k: '1 + x' });
console.log(s2.formulas, s2.polynomialDegree, s2.fDegreeHint, s2.f(0.3, 0.7, 0), -8*0.7 - 10*0.3*0.7);
console.log(javaScriptOf(parseFormula('(x+y)^2 * sin(pi/4) + x^3 + e^x', 'u', 2)));
for (const bad of ['sin(x', 'x + t', 'y', 'x == 1', 'max(x,1)', 'x%', '"a"', '[1,2]', 'log2(x)', 'sin(x,2)', '', 'a=1', 'x!']) {
  try { parseFormula(bad, 'exact', 1); console.log('accepted', bad); } catch (e) { console.log((e as Error).message); }
}
