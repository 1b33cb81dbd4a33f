import { parse, derivative, simplify } from 'mathjs';
const fns = ['sin','cos','tan','sec','csc','cot','asin','acos','atan','acot','asec','acsc','sinh','cosh','tanh','sech','csch','coth','asinh','acosh','atanh','acoth','asech','acsch','exp','log','log10','log2','sqrt','cbrt','abs','sign','square','cube','expm1','log1p','nthRoot'];
for (const f of fns) {
  try { console.log(f, '->', derivative(parse(`${f}(x^2)`), 'x').toString(), ' | nosimp:', derivative(parse(`${f}(x^2)`), 'x', {simplify:false}).toString()); } catch (e) { console.log(f, 'ERR', e.message.slice(0,60)); }
}
for (const s of ['log(x, 3)', 'pow(x, y)', 'x^y', 'pow(2, x)', 'nthRoot(x, 3)','2^x', 'e^x', 'x^pi']) {
  try { console.log(s, '->', derivative(parse(s), 'x').toString(), '|', derivative(parse(s), 'x', {simplify:false}).toString()); } catch (e) { console.log(s, 'ERR', e.message.slice(0,80)); }
}
console.log(JSON.stringify(parse('x%')), parse('x%').fn);
try { console.log(parse('').type) } catch(e) { console.log('empty', e.message) }
console.log(parse('true').type, typeof parse('true').value);
console.log(parse('-x').fn, parse('+x').fn, parse('x-y').fn, parse('x.^2').fn, parse("x'").type, parse("x'").fn);
