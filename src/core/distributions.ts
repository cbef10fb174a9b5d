/**
 * Tail probabilities and quantiles of Student's t and Fisher's F distributions, from the
 * stdlib-js special functions (regularized incomplete beta and the stdlib quantile functions),
 * not hand-written. Upper tails are taken directly from the incomplete beta function so that
 * small p-values keep their relative accuracy (1 − cdf would lose them).
 */
import betainc from "@stdlib/math-base-special-betainc";
import tQuantileStdlib from "@stdlib/stats-base-dists-t-quantile";

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
