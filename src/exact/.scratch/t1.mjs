import { parse, derivative, simplify } from 'mathjs';
const n = parse('sin(pi*x)*sin(pi*y) + x^2*e');
console.log(n.type, n.toString());
const d = derivative(n, 'x');
console.log(d.toString());
console.log(simplify(d).toString());
try { parse('sin(x'); } catch (e) { console.log(e.message, Object.keys(e), e.char); }
try { parse('x +* 2'); } catch (e) { console.log(e.message, e.char); }
const d2 = derivative(parse('abs(x)'), 'x'); console.log(d2.toString());
try { console.log(derivative(parse('atan2(x,y)'), 'x').toString()); } catch(e) { console.log('ERR', e.message); }
console.log(derivative(parse('x^y'), 'x').toString());
console.log(derivative(parse('pow(x,3)'), 'x').toString());
console.log(derivative(parse('sqrt(x)'), 'x').toString());
console.log(derivative(parse('log(x)'), 'x').toString());
console.log(derivative(parse('exp(x)*pi'), 'x').toString());
console.log(parse('2x').toString(), parse('-x^2').toString(), parse('x^-2').type);
const t=parse('1e-3*x'); console.log(JSON.stringify(t.args[0]));
console.log(parse('x!').type, parse('x==1').type, parse('x ? 1 : 2').type, parse('[1,2]').type, parse('x.y').type);
console.log(parse('f(x)=x').type, parse('a=1').type, parse('2 mod 3').toString(), parse('x%').toString());
console.log(parse('3 cm').toString());
