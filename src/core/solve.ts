/**
 * Solving the scaled problem: the choice of path, the coefficients and residual, and the one
 * exact-fit decision.
 *
 * 1. Fast path first (normal.ts): a Gram matrix with a proven error bound, its Cholesky factor
 *    through HouseholderQR's one rank decision, parameter-space refinement and a compensated
 *    residual — kept only when its error bounds guarantee full accuracy (well-conditioned,
 *    full-rank designs that are not nearly exact fits).
 * 2. Otherwise the high parts are factored by HouseholderQR, which makes the one rank decision
 *    (kept / non-identifiable columns, in the user's order); coefficients are refined on the
 *    augmented system with double-double residuals against the exact (dd) design.
 * 3. The exact-fit decision (tolerances.ts, EXACT_FIT): a residual within the data's own
 *    representation error is reported as exactly zero, and everything downstream reads `exact`.
 */
import type { Factor } from "./qr";
import { HouseholderQR, tmatLength } from "./qr";
import { Workspace } from "./kernels";
import { gramScratch, type BoundedGram } from "./gram";
import { normalScratch, solveNormal, type NormalFactor } from "./normal";
import { REFINE_SCRATCH, refineAugmented } from "./refine";
import type { ScaledProblem } from "./problem";
import { EXACT_FIT } from "./tolerances";
import { sumSquares } from "./sums";

/** How a fit may be computed (tests and benchmarks compare the paths). */
export interface FitOptions {
  /** "auto" (default): the fast path when its guarantees hold, else Householder QR; "householder": always Householder QR. */
  readonly path?: "auto" | "householder";
  /**
   * Use the WebAssembly kernels when the platform has them (default true) for problems of at least
   * KERNEL_MIN_DOUBLES design entries; "always" also for smaller ones (tests); false runs their
   * JavaScript twins.
   */
  readonly kernels?: boolean | "always";
}

export interface Solution {
  /** The triangular factor and the rank decision, whichever path made them. */
  readonly factor: Factor;
  /** The Householder factor of the design (null on the fast path, where no Q of the design exists). */
  readonly householder: HouseholderQR | null;
  /** Which path produced the fit. */
  readonly method: "normal" | "householder";
  /** The fast path's Gram matrix (reused for the covariance), or null. */
  readonly fastGram: BoundedGram | null;
  /**
   * The fast path's factor of the design, reusable for another y over the same rows (kept also when
   * this y then needed Householder QR), or null when the design did not pass the fast path's tests.
   */
  readonly normal: NormalFactor | null;
  /** Refined scaled coefficients for the kept columns (length rank). */
  readonly coefScaled: Float64Array;
  /** Weighted scaled residuals r̃ of the used rows (all zero for an exact fit). */
  readonly residScaled: Float64Array;
  /** Σ r̃², scaled (0 for an exact fit). */
  readonly rssScaled: number;
  /** True when the residual is within the data's representation error (see `isExactResidual`). */
  readonly exact: boolean;
  /** Refinement steps and convergence for the coefficients. */
  readonly steps: number;
  readonly converged: boolean;
}

/**
 * The exact-fit decision (tolerances.ts): ‖r̃‖₂ ≤ EXACT_FIT·(‖ỹ‖₂ + Σ_j |b̃_j|·‖x̃_j‖₂), with every
 * equilibrated column's length below 1 (problem.ts), so Σ_j |b̃_j| bounds the second term.
 */
export function isExactResidual(rssScaled: number, yNorm: number, coefScaled: ArrayLike<number>): boolean {
  let terms = 0;
  for (let k = 0; k < coefScaled.length; k++) terms += Math.abs(coefScaled[k]!);
  return Math.sqrt(rssScaled) <= EXACT_FIT * (yNorm + terms);
}

/**
 * Below this many design entries (n·p) a Householder factor lives in ordinary JavaScript memory:
 * the kernels gain nothing measurable there, and a long-lived runtime holding many small cached
 * fits would otherwise keep one WebAssembly memory (and its address-space reservation) per fit.
 */
export const KERNEL_MIN_DOUBLES = 1 << 16;

/**
 * Solve the scaled problem. With `shared` — the solution of another y over the same design and the
 * same used rows (problem.ts reuses the design then) — the factor is reused and only the
 * y-dependent work is done: the fast path's solve for the new right-hand side (falling back to a
 * new factorization when its guarantees do not hold for this y), or the refinement on the same
 * Householder factor.
 */
export function solve(pb: ScaledProblem, tol: number, opts: FitOptions = {}, shared: Solution | null = null): Solution {
  const { n, design, yHi, yLo } = pb;
  const p = pb.shape.p;
  const kernels = opts.kernels === "always" || (opts.kernels !== false && n * p >= KERNEL_MIN_DOUBLES);
  let sol: Omit<Solution, "exact" | "rssScaled" | "residScaled"> & { r: Float64Array };
  // The fast path when its guarantees hold (normal.ts), else Householder QR. Whether the design
  // passes the fast path's tests does not depend on y, so a shared solution's factor (or its
  // absence) decides for this y too, and only the y-dependent test is run again: the same choice,
  // and the same bits, as a fit of this y alone.
  let normal: NormalFactor | null = null;
  let fast: ReturnType<typeof solveNormal>["solution"] = null;
  if (opts.path !== "householder" && tol >= 0) {
    const out = solveNormal(design, n, p, yHi, yLo, tol, kernels ? Workspace.scratch(normalScratch(n, p)) : null, shared ? shared.normal : undefined);
    normal = out.factor;
    fast = out.solution;
  }
  if (fast) {
    sol = { factor: fast.qr, householder: null, method: "normal", fastGram: fast.gram, normal, coefScaled: fast.x, steps: fast.steps, converged: true, r: fast.r };
  } else {
    let qr = shared?.householder ?? null;
    if (!qr) {
      // The factor (and the refinement's work vectors) live in a WebAssembly workspace when the
      // kernels are available (kernels.ts); everything else is the same either way.
      const ws = kernels ? Workspace.create(n * p + tmatLength(n, p) + Math.max(REFINE_SCRATCH * n, gramScratch(p)) + 64) : null;
      const qrInput = ws ? ws.alloc(n * p) : new Float64Array(n * p);
      if (design.cols)
        design.cols.forEach((v, j) => {
          const { data, off, scale } = v;
          for (let t = 0, o = j * n; t < n; t++) qrInput[o + t] = data[off + t]! * scale;
        });
      else qrInput.set(design.hi);
      qr = new HouseholderQR(qrInput, n, p, tol, ws);
    }
    const ref = refineAugmented(qr, design, qr.rank, 1, yHi, yLo, null);
    sol = { factor: qr, householder: qr, method: "householder", fastGram: null, normal, coefScaled: ref.x, steps: ref.steps[0] ?? 0, converged: ref.converged[0] ?? true, r: ref.r };
  }
  return finish(sol, pb);
}

/** The exact-fit decision on a solution's residual, and the solution as the fit keeps it. */
function finish(sol: Omit<Solution, "exact" | "rssScaled" | "residScaled"> & { r: Float64Array }, pb: ScaledProblem): Solution {
  const { n, yHi } = pb;
  // Residual: the refined residual block r̃ of the augmented system, which converges to the exact
  // residual whatever the rounding of the coefficients, or on the fast path ỹ − X̃·b̃ with b̃ a
  // double-double accurate enough for a proven bound (normal.ts).
  let rss = sumSquares(sol.r, 0, n);
  const exact = isExactResidual(rss, Math.sqrt(sumSquares(yHi, 0, n)), sol.coefScaled);
  let r = sol.r;
  if (exact) {
    r = new Float64Array(n);
    rss = 0;
  }
  const { r: _r, ...rest } = sol;
  return { ...rest, residScaled: r, rssScaled: rss, exact };
}
