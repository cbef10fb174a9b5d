/**
 * Every threshold the engine and the findings use, in one place: each constant with its formula,
 * default, origin and meaning. Nothing else in src/ writes a bare tolerance; a decision that
 * depends on one of these is made once (see `isExactFit` in fit.ts, `HouseholderQR` in qr.ts)
 * and read everywhere else.
 *
 * ε = 2⁻⁵² is the spacing of doubles at 1 (unit roundoff u = ε/2).
 */

/** ε = 2⁻⁵²: the relative spacing of doubles near 1. */
export const EPS = 2.220446049250313e-16;

/** Decimal digits a double carries: 53·log₁₀2 ≈ 15.95. Used to say how many digits of a result are at risk. */
export const DOUBLE_DIGITS = 53 * Math.log10(2);

/**
 * Rank tolerance (the one rank decision, qr.ts): `10 · √(m·p) · ε` for an m × p design.
 * Origin: Householder QR is column-wise backward stable; the computed R is exact for A + ΔA with
 * ‖Δa_j‖ ≈ √(m·p)·ε·‖a_j‖ in practice (errors add like a random walk). A column closer than that
 * to the span of the earlier ones cannot be told apart from an exactly dependent one. The factor
 * 10 is a margin for the rounding in the norms. Callers of the core may pass their own (≥ 0).
 */
export function defaultTolerance(m: number, p: number): number {
  return 10 * Math.sqrt(Math.max(1, m) * Math.max(1, p)) * EPS;
}

/**
 * Exact fit (one decision, `isExactFit` in fit.ts): the fit is exact when
 *
 *     ‖r̃‖₂ ≤ EXACT_FIT · (‖ỹ‖₂ + Σ_j |b̃_j|·‖x̃_j‖₂)
 *
 * in the scaled weighted problem. Origin: every datum is stored with a relative error up to
 * u = ε/2 (a typed decimal such as 0.1 is rounded to binary), so the data themselves move the
 * residual by up to u·‖ỹ‖ + u·Σ_j |b̃_j|·‖x̃_j‖ (first order). A residual below that cannot be
 * told from a model that passes through every point, so it is reported as exactly zero and
 * every statistic treats the fit as exact. Default 2ε = four times that perturbation.
 */
export const EXACT_FIT = 2 * EPS;

/**
 * Covariance refinement switch (covariance.ts): for condition numbers (unit columns) up to 1e7
 * the covariance is refined against an accurate Gram matrix, whose attainable accuracy is about
 * κ²ε² relative: below one unit in the last place up to κ ≈ 1/√ε·… ≈ 1e7. Above it the full
 * augmented system is used (accuracy about κε²).
 */
export const COV_GRAM_MAX_CONDITION = 1e7;

/**
 * The most work (rows × kept columns²) the full augmented refinement of the covariance may take
 * (designs above COV_GRAM_MAX_CONDITION): 1e8, about 1.5 s measured on a 2-core machine
 * (README "Size limits"). Above it the covariance and everything built on it (standard errors,
 * intervals, t and p-values) are #N/A with the reason, rather than a call that runs for tens of
 * seconds; the coefficients, fitted values and residuals are unaffected.
 */
export const COV_AUGMENTED_MAX_WORK = 1e8;

/**
 * The corrected leverage (leverage.ts, `leverageRefined`: double-double rows of X̃R⁻¹ and the
 * first- and second-order correction for their non-orthogonality) is used on the Householder path
 * while rows × rank² ≤ 2e7 (about half a second here); beyond, leverage comes from Q, accurate to
 * about κ·ε.
 */
export const LEVERAGE_REFINED_MAX_WORK = 2e7;

/**
 * Leverage treated as 1 (influence.ts): a row whose 1 − h is at most 64·ε·p cannot be told from
 * one that determines its own fitted value. Leverage on the Householder path is computed from
 * the orthonormal factor Q₁ (rows accurate to a few ε·p absolute), so a smaller gap is noise.
 * Then its standardized and deleted residuals and Cook's distance are not defined.
 */
export function leverageOneGap(p: number): number {
  return 64 * EPS * Math.max(1, p);
}

/**
 * A term of a dependency relation is shown when its contribution (coefficient times the scaled
 * column) is above this fraction of the largest term: 1e-9, well above the relation's own
 * rounding (the rank tolerance, ~1e-13 for typical sizes) and below any term a user would write.
 */
export const RELATION_TERM_SHARE = 1e-9;

/**
 * The columns named in a near-dependence finding: those whose share of the weakest direction
 * (the smallest singular vector of the scaled design) is at least this fraction of the largest.
 */
export const WEAK_DIRECTION_SHARE = 0.1;

/** Condition number (columns scaled to unit length) from which near-dependence is noted. */
export const CONDITION_NOTE = 1e4;
/** … and from which it is a warning: half the digits of a double are then at risk. */
export const CONDITION_WARN = 1e8;

/** |studentized residual| beyond which a row is reported (about 1 row in 370 under normal errors). */
export const LARGE_RESIDUAL = 3;

/**
 * High leverage: h_i above LEVERAGE_FACTOR · rank / n (the average leverage is rank/n). The usual
 * rule of thumb in regression diagnostics (twice the average).
 */
export const LEVERAGE_FACTOR = 2;

/** Significance level at which a lack-of-fit or curvature test makes CHECK report a problem. */
export const LACK_OF_FIT_ALPHA = 0.01;

/**
 * Generalized distance regression (linexy.ts) stops when the slope changes by at most
 * LINEXY_STEP · ε · (|b| + its standard uncertainty) between iterations, or after LINEXY_MAX_STEPS
 * (then #N/A: no convergence).
 */
export const LINEXY_STEP = 16;
export const LINEXY_MAX_STEPS = 200;
