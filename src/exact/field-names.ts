/** The input fields of a manufactured solution, named in error messages. */
export type QuantityName = 'u' | 'grad' | 'f' | 'k' | 'b' | 'c';

/** Either a prefix ("exact" → "exact.u", "exact.k", ...; "" → "u", "k", ...) or the path of each field as the user
 *  wrote it, e.g. { u: 'exact', k: 'coefficients.k' }; unnamed fields fall back to their bare names. */
export type FieldNames = string | Partial<Record<QuantityName, string>>;

export function fieldPath(names: FieldNames | undefined, quantity: QuantityName): string {
  if (names === undefined) return quantity;
  if (typeof names === 'string') return names === '' ? quantity : `${names}.${quantity}`;
  return names[quantity] ?? quantity;
}
