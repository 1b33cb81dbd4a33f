// The norms over the time levels of a study with time (TIME_NORMS in system-norms.ts), accumulated one time level at
// a time so that no solution but the current one is held: rungs's own heat stepper (heat.ts) feeds it from its
// callback per time level, an external code's series of VTK files (src/study/external-level.ts) file by file. Both
// routes do the same operations in the same order, so the same field values give the same bits.

/** The errors of one time level that the norms over time need. */
export interface TimeLevelErrors {
  L2: number;
  H1: number;
}

/** ℓ∞(0,T; L2) and ℓ2(0,T; H1) so far (see timeNormSums). */
export interface TimeNormSums {
  /** Adds time level `step` (0 = the initial data, N = the final time). */
  add(step: number, e: TimeLevelErrors): void;
  /** { Linf_L2, L2_H1 } over the levels added. */
  values(): { Linf_L2: number; L2_H1: number };
}

/**
 * Linf_L2 = max_{n=0..N} ‖e(t_n)‖_L2 and L2_H1 = (Σ_{n=1..N} Δt ‖e(t_n)‖²_H1)^(1/2): the initial level enters the
 * maximum but not the right-endpoint sum (Thomée 2006, Galerkin Finite Element Methods for Parabolic Problems, ch. 1).
 */
export function timeNormSums(dt: number): TimeNormSums {
  let maxL2 = 0, sumH1 = 0;
  return {
    add(step, e) {
      maxL2 = Math.max(maxL2, e.L2);
      if (step > 0) sumH1 += dt * e.H1 * e.H1;
    },
    values: () => ({ Linf_L2: maxL2, L2_H1: Math.sqrt(sumH1) }),
  };
}
