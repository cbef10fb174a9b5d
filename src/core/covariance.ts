/**
 * The refined unscaled covariance of the scaled kept design, C̃ = (X̃_Kᵀ X̃_K)⁻¹ (rank × rank,
 * column-major). Column k solves the augmented system with right-hand side [0; e_k].
 *
 * Keeping the residual block exactly at r = −X̃c (in double-double) reduces that refinement to the
 * k-space iteration c ← c + R⁻¹R⁻ᵀ(e_k − G c) with the Gram matrix G = X̃ᵀX̃ formed once
 * accurately; this is used while the condition number κ ≤ COV_GRAM_MAX_CONDITION (tolerances.ts),
 * where its attainable accuracy (about κ²ε² relative) is below one unit in the last place. Above
 * that the full augmented refinement over all rows is used, all columns together (the refinement
 * takes several right-hand sides in one pass over the data; accuracy about κε²).
 */
import type { Conditioning } from "./condition";
import { LsqError } from "./errors";
import { gramResidual, splitGram, splitGramBound } from "./gram";
import type { Factor } from "./qr";
import { ddGram, refineAugmented, StopRule } from "./refine";
import type { ScaledProblem } from "./problem";
import type { Solution } from "./solve";
import { COV_AUGMENTED_MAX_WORK, COV_GRAM_MAX_CONDITION, EPS } from "./tolerances";
import { notAvailable, type NotAvailable } from "./errors";

/** Why the refined covariance will not be computed (over the work limit), or null when it will. */
export function covarianceRefused(pb: ScaledProblem, sol: Solution, cond: Conditioning | null): NotAvailable | null {
  const r = sol.factor.rank;
  if (sol.fastGram || !cond || cond.value <= COV_GRAM_MAX_CONDITION) return null;
  if (pb.n * r * r <= COV_AUGMENTED_MAX_WORK) return null;
  return notAvailable(
    `the columns are so nearly dependent (condition number ${cond.value.toExponential(1)}) that refining the covariance to full accuracy for ${pb.n} rows and ${r} columns would take too long for a cell formula (limit: rows × columns² ≤ ${COV_AUGMENTED_MAX_WORK.toExponential(0)} for such designs); remove nearly dependent columns or use fewer rows`,
  );
}

export function refinedCovariance(pb: ScaledProblem, sol: Solution, cond: Conditioning | null): Float64Array {
  const refused = covarianceRefused(pb, sol, cond);
  if (refused) throw new LsqError("range", refused.na);
  const { factor, householder } = sol;
  const r = factor.rank;
  let out: Float64Array;
  if (sol.fastGram) out = refineCovarianceGram(factor, sol.fastGram, r);
  else if (!householder) throw new Error("refinedCovariance: the fast path keeps its Gram matrix");
  else if (cond && cond.value <= COV_GRAM_MAX_CONDITION) {
    // The fast Gram matrix when its proven error, amplified by ‖G⁻¹‖ = 1/σ_min², stays below
    // ε/16 (well-conditioned designs); otherwise the double-double one.
    const fast = splitGramBound(pb.n, r, !!pb.design.lo) <= (EPS / 16) * cond.sigmaMin * cond.sigmaMin;
    const G = fast ? splitGram(pb.design, factor.kept, r, householder.ws) : ddGram(pb.design, factor.kept, r);
    out = refineCovarianceGram(factor, G, r);
  } else {
    const c = new Float64Array(r * r);
    for (let k = 0; k < r; k++) c[k * r + k] = 1;
    const ref = refineAugmented(householder, pb.design, r, r, null, null, c);
    out = ref.x;
    for (let t = 0; t < out.length; t++) out[t] = -out[t]!;
  }
  // Symmetrize (the two triangles agree to rounding after refinement).
  for (let i = 0; i < r; i++)
    for (let j = i + 1; j < r; j++) {
      const v = 0.5 * (out[i * r + j]! + out[j * r + i]!);
      out[i * r + j] = v;
      out[j * r + i] = v;
    }
  return out;
}

/**
 * Refine C = G⁻¹ (G given as a double-double) with the triangular factor R (RᵀR ≈ G):
 * C ← C + R⁻¹R⁻ᵀ(I − G C), residuals in compensated arithmetic, stopped by the engine's
 * stopping rule (refine.ts) with the level ε‖c‖.
 */
function refineCovarianceGram(factor: Factor, G: { hi: Float64Array; lo: Float64Array }, r: number): Float64Array {
  const c = new Float64Array(r * r);
  const col = new Float64Array(r);
  const unit = new Float64Array(r);
  for (let t = 0; t < r; t++) {
    const o = t * r;
    unit.fill(0);
    unit[t] = 1;
    const rule = new StopRule();
    for (let step = 0; step < 10; step++) {
      // residual e_t − G c_t
      gramResidual(G, r, unit, null, c.subarray(o, o + r), null, col);
      factor.solveRt(r, col);
      factor.solveR(r, col);
      let nd = 0;
      let nc = 0;
      for (let i = 0; i < r; i++) {
        nd = Math.max(nd, Math.abs(col[i]!));
        nc = Math.max(nc, Math.abs(c[o + i]! + col[i]!));
      }
      const verdict = rule.judge(nd, EPS * nc);
      if (verdict === "reject") break;
      for (let i = 0; i < r; i++) c[o + i]! += col[i]!;
      if (verdict !== "continue") break;
    }
  }
  return c;
}
