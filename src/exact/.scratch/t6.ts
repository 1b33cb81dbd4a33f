import { manufacture } from '../index.ts';
for (const u of ['abs(x-0.5)*x', 'cbrt(x^2)', 'sqrt(x^2+1)', 'tan(x)', 'acoth(x+2)', 'x^pi', 'log(x+2, 3)']) {
  const s = manufacture({ dim: 1, u });
  console.log(u, '|', s.formulas.grad[0], '|', s.formulas.f, '|', s.grad.toString().replace(/\n/g,' '), s.u(-0.5,0,0));
  const o = new Float64Array(3); s.grad(-0.5,0,0,o); console.log('  grad(-0.5)=', o[0], 'grad(0.5)', (s.grad(0.5,0,0,o), o[0]), 'f(-0.5)', s.f(-0.5,0,0));
}
