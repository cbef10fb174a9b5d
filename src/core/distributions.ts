/**
 * Tail probabilities and quantiles of Student's t, Fisher's F, the normal and the χ²
 * distributions, from the stdlib-js special functions (regularized incomplete beta and gamma, the
 * complementary error function and the stdlib quantile functions), not hand-written. Upper tails
 * are taken directly from the incomplete beta or gamma function so that small p-values keep their
 * relative accuracy (1 − cdf would lose them).
 */
import betainc from "@stdlib/math-base-special-betainc";
import gammainc from "@stdlib/math-base-special-gammainc";
import erfc from "@stdlib/math-base-special-erfc";
import tQuantileStdlib from "@stdlib/stats-base-dists-t-quantile";
import normalQuantileStdlib from "@stdlib/stats-base-dists-normal-quantile";

/** Two-sided p-value P(|T| ≥ |t|) for T ~ t(df), df > 0: I_{df/(df+t²)}(df/2, 1/2). */
export function tTwoSided(t: number, df: number): number {
  if (!(df > 0) || Number.isNaN(t)) return NaN;
  if (!Number.isFinite(t)) return 0;
  const t2 = t * t;
  // df/(df + t²) computed without overflow for huge t.
  const x = t2 > 1e300 ? df / t2 : df / (df + t2);
  return betainc(x, df / 2, 0.5, true, false);
}

/** Upper tail P(F ≥ f) for F ~ F(d1, d2): I_{d2/(d2 + d1·f)}(d2/2, d1/2). */
export function fUpper(f: number, d1: number, d2: number): number {
  if (!(d1 > 0) || !(d2 > 0) || Number.isNaN(f)) return NaN;
  if (f <= 0) return 1;
  if (!Number.isFinite(f)) return 0;
  const x = d2 / (d2 + d1 * f);
  return betainc(x, d2 / 2, d1 / 2, true, false);
}

/** The p-quantile of t(df): the value q with P(T ≤ q) = p. */
export function tQuantile(p: number, df: number): number {
  return tQuantileStdlib(p, df);
}

/**
 * The p-quantile of the standard normal distribution: stdlib's value, then one Newton step on
 * Φ(q) − p with Φ from erfc (accurate in both tails), which restores full relative accuracy in the
 * far tails where the starting value carries about 1e-9.
 */
export function normalQuantile(p: number): number {
  const q = normalQuantileStdlib(p, 0, 1);
  if (!Number.isFinite(q) || !(p > 0 && p < 1)) return q;
  const pdf = Math.exp(-0.5 * q * q) / Math.sqrt(2 * Math.PI);
  if (!(pdf > 0)) return q;
  // lower tail Φ(q) for q < 0, upper tail 1 − Φ(q) for q ≥ 0, each from erfc without cancellation
  return q < 0 ? q - (0.5 * erfc(-q / Math.SQRT2) - p) / pdf : q + (0.5 * erfc(q / Math.SQRT2) - (1 - p)) / pdf;
}

/** Two-sided p-value P(|Z| ≥ |z|) for a standard normal Z: erfc(|z|/√2). */
export function normalTwoSided(z: number): number {
  if (Number.isNaN(z)) return NaN;
  return erfc(Math.abs(z) / Math.SQRT2);
}

/** Upper tail P(X ≥ x) for X ~ χ²(k): the regularized upper incomplete gamma Q(k/2, x/2). */
export function chiSquareUpper(x: number, k: number): number {
  if (!(k > 0) || Number.isNaN(x)) return NaN;
  if (x <= 0) return 1;
  if (!Number.isFinite(x)) return 0;
  return gammainc(x / 2, k / 2, true, true);
}
