/** A double as a decimal literal that reads back as the same double in every target language: integers below 1e15
 *  exactly with ".0" (so C and Fortran do not read an integer), everything else with 17 significant digits (trailing
 *  zeros dropped). The text
 *  always holds a "." so it is a floating-point literal; negative values come with their sign (callers parenthesise). */
export function decimal17(value: number): string {
  if (!Number.isFinite(value)) throw new Error(`decimal17: ${value} is not finite`);
  if (Object.is(value, -0)) return '-0.0';
  if (Number.isInteger(value) && Math.abs(value) < 1e15) return `${value}.0`;
  // Trailing zeros of the 17 digits carry nothing: 0.50000000000000000 is written 0.5.
  const [mantissa, exponent] = value.toPrecision(17).split('e');
  const digits = mantissa.includes('.') ? mantissa.replace(/0+$/, '').replace(/\.$/, '.0') : `${mantissa}.0`;
  return exponent === undefined ? digits : `${digits}e${exponent}`;
}

/** The shortest decimal that reads back as the same double (JavaScript's own number to string). */
export function shortest(value: number): string {
  if (!Number.isFinite(value)) throw new Error(`shortest: ${value} is not finite`);
  return Object.is(value, -0) ? '-0.0' : String(value);
}
