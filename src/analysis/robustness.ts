/**
 * Robustness in a parameter: whether the error constant of a discretization stays bounded as a coefficient moves
 * toward a limit (λ → ∞ in elasticity as Poisson's ratio → 1/2, the Péclet number → ∞ in convection–diffusion).
 * A method is robust when its error obeys e ≤ C h^p with C independent of the parameter; locking is the failure of
 * that: C grows without bound as the parameter approaches its limit (Babuška & Suri 1992, Numer. Math. 62, 439–463).
 *
 * From the finest level of each member of the sweep, C_v = e_v / h_v^p with p the expected order (on the same
 * ladder h is the same for every member, so the ratios are ratios of errors). The growth is C at the member nearest
 * the limit over the smallest C along the sweep; the trend is the slope of log C against log |value| over the last
 * two members (0 for a constant that has settled, > 0 while it still grows). The sweep is robust when the growth stays
 * within the allowed factor (default 10: a common-practice margin for "bounded" over a few decades of the parameter,
 * no source).
 */
export const DEFAULT_ROBUSTNESS_GROWTH = 10;

export interface SweepMemberErrors {
  value: number;
  /** Finest level's h and error in this norm. */
  h: number;
  error: number;
}

export interface RobustnessFinding {
  norm: string;
  expectedOrder: number;
  values: number[];
  constants: number[];
  /** Largest constant over the smallest before it (in sweep order). */
  growth: number;
  /** Slope of log C against log |value| over the last two members. */
  trend: number;
  robust: boolean;
  reason: string;
}

const fmt = (v: number) => (Math.abs(v) >= 1e4 || (v !== 0 && Math.abs(v) < 1e-3) ? v.toExponential(1) : String(Number(v.toPrecision(4))));

/** The robustness of one norm over a sweep; members in sweep order (toward the limit). */
export function judgeRobustness(norm: string, coefficient: string, expectedOrder: number, members: readonly SweepMemberErrors[], allowedGrowth = DEFAULT_ROBUSTNESS_GROWTH): RobustnessFinding {
  const values = members.map((m) => m.value);
  const constants = members.map((m) => m.error / m.h ** expectedOrder);
  let growth = 1, lowest = Infinity;
  for (const c of constants) {
    if (c < lowest) lowest = c;
    if (lowest > 0 && c / lowest > growth) growth = c / lowest;
  }
  const n = members.length;
  const a = members[n - 2], b = members[n - 1];
  const trend = n >= 2 && a.value !== 0 && b.value !== 0 && Math.abs(b.value) !== Math.abs(a.value)
    ? Math.log(constants[n - 1] / constants[n - 2]) / Math.log(Math.abs(b.value) / Math.abs(a.value))
    : 0;
  const robust = Number.isFinite(growth) && growth <= allowedGrowth;
  const list = constants.map((c, i) => `${coefficient} = ${fmt(values[i])}: ${c.toExponential(2)}`).join(', ');
  const reason = robust
    ? `${norm}: the error constant e/h^${expectedOrder} stays within ×${growth.toFixed(2)} over ${coefficient} = ${fmt(values[0])} … ${fmt(values[n - 1])} (${list}): robust in ${coefficient}`
    : `${norm}: the error constant e/h^${expectedOrder} grows ×${growth.toPrecision(3)} over ${coefficient} = ${fmt(values[0])} … ${fmt(values[n - 1])} (${list})` +
      `${trend > 0.1 ? `, still rising as ${coefficient}^${trend.toFixed(2)} at the end` : ''}: not robust — likely locking, an error constant that grows without bound toward the limit (Babuška & Suri 1992)`;
  return { norm, expectedOrder, values, constants, growth, trend, robust, reason };
}
