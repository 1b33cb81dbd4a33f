/** The initial guess of a time step's (or stage's) linear solve: the polynomial of degree `order` through the latest
 *  solution values taken to the new time. For a solution smooth in time its error is O(Δt^(order+1)) where the last
 *  value's is O(Δt), so CG starts closer and needs fewer iterations to the same tolerance; the answer it converges
 *  to is the same up to that tolerance (the guess changes where CG stops, not what it solves). Common practice, no
 *  source; Lagrange's form of the interpolating polynomial (from memory). Until enough values are recorded, the
 *  polynomial through those there are. A higher degree amplifies what is not smooth (the weights of the parabola at
 *  equal steps are 3, −3, 1; of the cubic 4, −6, 4, −1), which is why solveHeat stops at 2. `order` + 1 vectors,
 *  allocated once. */
export interface Extrapolation {
  /** Keeps a copy of v, the solution at time t (later than the last one recorded). */
  record(t: number, v: Float64Array): void;
  /** Writes the guess at time t into out (every entry; the caller sets the boundary values after). */
  guess(t: number, out: Float64Array): void;
}

export function extrapolation(n: number, order: number): Extrapolation {
  const k = order + 1;
  const values = Array.from({ length: k }, () => new Float64Array(n));
  const times = new Float64Array(k);
  let count = 0;
  const w = new Float64Array(k);
  return {
    record(t, v) {
      // values[0] the latest.
      const oldest = values.pop()!;
      oldest.set(v);
      values.unshift(oldest);
      times.copyWithin(1, 0, k - 1);
      times[0] = t;
      count++;
    },
    guess(t, out) {
      if (count === 0) throw new Error('internal: a guess before any value was recorded');
      const m = Math.min(count, k);
      for (let i = 0; i < m; i++) {
        let l = 1;
        for (let j = 0; j < m; j++) if (j !== i) l *= (t - times[j]) / (times[i] - times[j]);
        w[i] = l;
      }
      let finite = true;
      for (let i = 0; i < m; i++) finite &&= Number.isFinite(w[i]);
      if (m === 1 || !finite) { out.set(values[0]); return; }
      const a = values[0], b = values[1], c = m > 2 ? values[2] : null;
      const wa = w[0], wb = w[1], wc = w[2];
      if (!c) for (let i = 0; i < n; i++) out[i] = wa * a[i] + wb * b[i];
      else if (m === 3) for (let i = 0; i < n; i++) out[i] = wa * a[i] + wb * b[i] + wc * c[i];
      else { out.fill(0); for (let j = 0; j < m; j++) { const v = values[j], wj = w[j]; for (let i = 0; i < n; i++) out[i] += wj * v[i]; } }
    },
  };
}
