/**
 * `npm run accuracy`: digits of agreement with NIST's certified values (NIST StRD linear
 * least-squares datasets, ../shared/refdata/nist-strd), per dataset and quantity, for the engine,
 * for the same factorization without refinement, and for ml-matrix's QR solve on the raw design.
 */
import { it } from "vitest";
import { Matrix, QrDecomposition } from "ml-matrix";
import { digits, loadNist, type NistDataset } from "../test/helpers/nist";
import { fitNist, nistDigits } from "../test/helpers/nistfit";
import { refineAugmented } from "../src/core/refine";
import { scaleByPow2 } from "../src/core/scale";

function unrefinedDigits(d: NistDataset): number {
  // The plain Householder solution (no refinement), so the fit must take the Householder path.
  const fit = fitNist(d, { path: "householder" });
  const qr = fit.householder!;
  const sol = refineAugmented(qr, fit.design, fit.rank, 1, fit.yHi, fit.yLo, null, { maxSteps: 1 });
  const b = Array.from(qr.kept, (j, k) => scaleByPow2(sol.x[k]!, fit.cs[j]! - fit.ys));
  return Math.min(...d.certified.coefficients.map((c, i) => digits(b[i]!, c)));
}

function mlMatrixDigits(d: NistDataset): number {
  const deg = d.predictors.polynomialDegree ?? 1;
  const rows = d.rows.map((r) => {
    const out: number[] = d.intercept ? [1] : [];
    if (d.predictors.columns) out.push(...r.slice(1));
    else for (let e = 1; e <= deg; e++) out.push(r[1]! ** e);
    return out;
  });
  try {
    const b = new QrDecomposition(new Matrix(rows)).solve(Matrix.columnVector(d.rows.map((r) => r[0]!))).to1DArray();
    return Math.min(...d.certified.coefficients.map((c, i) => digits(b[i]!, c)));
  } catch {
    return 0;
  }
}

it("prints the accuracy table", () => {
  const sets = loadNist();
  const head = ["dataset", "coef", "std err", "resid SD", "R²", "| unrefined coef", "ml-matrix coef"];
  const lines = [head.join("\t")];
  for (const d of sets) {
    const g = nistDigits(d, digits);
    lines.push([d.name.padEnd(9), g.coefficients, g.standardErrors, g.residualSd, g.rSquared, unrefinedDigits(d), mlMatrixDigits(d)].map((v) => (typeof v === "number" ? v.toFixed(1) : v)).join("\t"));
  }
  console.log(`\nDigits of agreement with NIST StRD certified values (minimum over parameters; 15 = all printed digits)\n${lines.join("\n")}\n`);
});
