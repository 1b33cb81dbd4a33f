import { manufacture } from '../index.ts';
const cases = [
 { dim: 2 as const, u: 'exp(-x) * sin(3*y) + x*y', k: '1 + 0.25*x*y' },
 { dim: 2 as const, u: 'atan(5*(x - y)) * cosh(x)', k: 'exp(x - y)', b: ['y', '-x'], c: '1 + x^2' },
 { dim: 3 as const, u: 'sin(pi*x)*sin(pi*y)*sin(pi*z)*exp(x*y*z)', k: '1 + x^2 + y*z', b: ['1', '0', 'z'], c: '2' },
 { dim: 2 as const, u: 'sin(pi*x)*sin(pi*y)' },
];
for (const c of cases) for (let r = 0; r < 2; r++) { const t0 = performance.now(); const s = manufacture(c); console.log((performance.now()-t0).toFixed(1), 'ms', s.formulas.f.length, s.formulas.grad.join(' | ').slice(0, 200)); }
