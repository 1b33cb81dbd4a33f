import { parse, derivative, simplifyConstant, simplifyCore } from 'mathjs';
for (const s of ['x^(2-1)*3*3*pi', '1/3*x', '2*1*x^(2-1)/(3*(x^2)^(2/3))', 'log(10)*x', '0.25*4*x', 'x*(1/3)', '-(2*3)*x','e^x*log(e)']) {
  const n = simplifyConstant(simplifyCore(parse(s)));
  const consts=[]; n.traverse(c=>{ if(c.type==='ConstantNode') consts.push(typeof c.value)});
  console.log(s, '->', n.toString(), consts.join(','));
}
