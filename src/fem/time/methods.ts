/** The time steppers rungs's own discretizations offer, as data: the θ-method, BDF2 and stiffly accurate diagonally
 *  implicit Runge–Kutta methods. Every one is written as a sequence of implicit solves with the one matrix
 *  M + γΔt K (γ fixed per method), so that the matrix and its multigrid are set up once per level and step size. */
export type TimeMethodName = 'backward-euler' | 'crank-nicolson' | 'bdf2' | 'dirk3';

/** A stiffly accurate DIRK tableau with one diagonal value γ: stage i solves (M + γΔt K) U_i = … at time
 *  t_n + c_i Δt, and the last stage is the new value. */
export interface DirkTableau {
  gamma: number;
  /** Lower-triangular a_ij (row i, j ≤ i; a_ii = γ). */
  a: number[][];
  c: number[];
  order: number;
}

/** Alexander's three-stage, third-order, L-stable, stiffly accurate DIRK (Alexander 1977, SIAM J. Numer. Anal. 14,
 *  1006–1021, Table 3 and §3; from memory): γ the root near 0.4359 of 6γ³ − 18γ² + 9γ − 1 = 0, τ = (1 + γ)/2,
 *  b1 = −(6γ² − 16γ + 1)/4, b2 = (6γ² − 20γ + 5)/4. The tests check its order conditions exactly. */
export function alexander3(): DirkTableau {
  // Newton on 6γ³ − 18γ² + 9γ − 1 from 0.4359: the root in (1/6, 1/2) that makes the method L-stable.
  let g = 0.4359;
  for (let i = 0; i < 20; i++) g -= (6 * g ** 3 - 18 * g ** 2 + 9 * g - 1) / (18 * g ** 2 - 36 * g + 9);
  const tau = (1 + g) / 2;
  const b1 = -(6 * g * g - 16 * g + 1) / 4;
  const b2 = (6 * g * g - 20 * g + 5) / 4;
  return { gamma: g, a: [[g], [tau - g, g], [b1, b2, g]], c: [g, tau, 1], order: 3 };
}

/** The order of accuracy in time of each method on smooth solutions (Hairer & Wanner 1996, Solving ODEs II: backward
 *  Euler 1, Crank–Nicolson 2 (θ = 1/2), BDF2 2; the DIRK its own order). */
export const TIME_ORDER: Readonly<Record<TimeMethodName, number>> = {
  'backward-euler': 1, 'crank-nicolson': 2, bdf2: 2, dirk3: 3,
};
