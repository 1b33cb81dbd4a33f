/**
 * The additions one part of a shared assembly makes to rows that earlier parts own (cell-parts.ts), recorded in the
 * order the serial pass would make them and replayed once every earlier part is complete. An addition is a target and
 * a value: target t ≥ 0 is the matrix entry A.values[t], t < 0 the right-hand side b[−1 − t]. A Dirichlet column's
 * `b[r] -= v·g` is recorded as the addition of −(v·g), which is the same operation: IEEE 754-2019 §5.4.1 defines
 * subtraction x − y as x + (−y), and negation is exact. The buffers grow by doubling and are kept by their thread
 * from part to part: nothing is allocated per cell.
 */
export interface Deferred {
  at: Int32Array;
  add: Float64Array;
  length: number;
}

export function deferredBuffer(capacity = 4096): Deferred {
  return { at: new Int32Array(capacity), add: new Float64Array(capacity), length: 0 };
}

/** Records the addition of v to target t. */
export function defer(d: Deferred, t: number, v: number): void {
  if (d.length === d.at.length) {
    const at = new Int32Array(2 * d.length), add = new Float64Array(2 * d.length);
    at.set(d.at); add.set(d.add);
    d.at = at; d.add = add;
  }
  d.at[d.length] = t;
  d.add[d.length++] = v;
}

/** Makes the recorded additions, in the order they were recorded, and empties the record. */
export function replay(d: Deferred, values: Float64Array, b: Float64Array): void {
  const { at, add, length } = d;
  for (let k = 0; k < length; k++) {
    const t = at[k];
    if (t >= 0) values[t] += add[k]; else b[-1 - t] += add[k];
  }
  d.length = 0;
}
