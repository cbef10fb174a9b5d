/**
 * The findings engine: plain-language observations about a fit, shared by LSQ.CHECK and the
 * task pane so the words in a cell and in the pane never disagree.
 *
 * A finding is *composed* from parts (plain text, a column label, a number, a list of rows),
 * never concatenated into markup: the pane renders every part with textContent, and
 * `findingText` joins the parts into a single plain string for a cell. Labels come from the
 * workbook and are treated as opaque text.
 */
import type { Dependency, LeastSquaresFit } from "../core/fit";
import { RowStatus } from "../core/design";

export type Severity = "problem" | "warning" | "note" | "ok";

export type Part =
  | { readonly kind: "text"; readonly text: string }
  | { readonly kind: "label"; readonly text: string }
  | { readonly kind: "number"; readonly value: number; readonly text: string }
  | { readonly kind: "rows"; readonly rows: readonly number[]; readonly text: string };

export interface Finding {
  /** Stable identifier of the kind of finding. */
  readonly id:
    | "none"
    | "too-few-rows"
    | "no-rows"
    | "dependent-columns"
    | "duplicates-intercept"
    | "zero-column"
    | "near-dependence"
    | "skipped-rows"
    | "zero-df"
    | "exact-fit"
    | "zero-weights"
    | "high-leverage"
    | "large-residual"
    | "refinement";
  readonly severity: Severity;
  /** What was found. */
  readonly what: readonly Part[];
  /** What the functions did about it. */
  readonly done: readonly Part[];
  /** What the user can do. */
  readonly advice: readonly Part[];
}

/** Why a row was skipped, by row (1-based input row → reason words). */
export type RowReason = (row: number) => string;

export interface FindingsInput {
  readonly fit: LeastSquaresFit;
  /** Labels of the design columns (intercept first when present). */
  readonly labels: readonly string[];
  /** Describes why an input row (0-based) was skipped; defaults to the core's status. */
  readonly skipReason?: (row: number) => string;
  /** Row numbers shown to the user for input row i (0-based); default i + 1. */
  readonly rowNumber?: (row: number) => number;
}

const text = (t: string): Part => ({ kind: "text", text: t });
const label = (t: string): Part => ({ kind: "label", text: t });
const num = (v: number, digits = 3): Part => ({ kind: "number", value: v, text: formatNumber(v, digits) });
const rows = (r: readonly number[], max = 10): Part => {
  const shown = r.slice(0, max).join(", ");
  return { kind: "rows", rows: r, text: r.length > max ? `${shown} and ${r.length - max} more` : shown };
};

/** A number in plain notation with up to `digits` significant digits (trailing zeros dropped). */
export function formatNumber(v: number, digits = 6): string {
  if (!Number.isFinite(v)) return String(v);
  if (v === 0) return "0";
  const a = Math.abs(v);
  if (a >= 1e-4 && a < 1e9) {
    const s = Number(v.toPrecision(digits)).toString();
    return s.includes("e") ? v.toPrecision(digits) : s;
  }
  const [m, e] = v.toExponential(digits - 1).split("e");
  const mant = m!.includes(".") ? m!.replace(/\.?0+$/, "") : m!;
  return `${mant}e${e}`;
}

/** Positions of the terms of a relation that matter: contribution above 1e-9 of the largest. */
export function significantTerms(dep: Dependency): number[] {
  const big = Math.max(0, ...Array.from(dep.scaled, Math.abs));
  const out: number[] = [];
  dep.scaled.forEach((v, t) => {
    if (Math.abs(v) > 1e-9 * big) out.push(t);
  });
  return out;
}

/**
 * The relation of a dependency in the user's labels, e.g. "Temp °F = 32 + 1.8 × Temp °C".
 * Terms whose contribution is below 1e-9 of the largest are left out.
 */
export function relationParts(dep: Dependency, labels: readonly string[], interceptCol: number): Part[] {
  const parts: Part[] = [label(labels[dep.column] ?? `column ${dep.column + 1}`), text(" = ")];
  if (dep.zero) return [label(labels[dep.column] ?? ""), text(" is zero in every used row")];
  let first = true;
  for (const t of significantTerms(dep)) {
    const c = dep.coef[t]!;
    const col = dep.on[t]!;
    const mag = formatNumber(Math.abs(c), 6);
    const sign = c < 0 ? (first ? "−" : " − ") : first ? "" : " + ";
    if (col === interceptCol) parts.push(text(`${sign}${mag}`));
    else {
      parts.push(text(`${sign}${mag === "1" ? "" : `${mag} × `}`));
      parts.push(label(labels[col] ?? `column ${col + 1}`));
    }
    first = false;
  }
  if (first) parts.push(text("0"));
  return parts;
}

/** Join parts into one plain string. */
export function partsText(parts: readonly Part[]): string {
  return parts.map((p) => p.text).join("");
}

/** One line for a cell: what, then what was done, then advice. */
export function findingText(f: Finding): string {
  return [f.what, f.done, f.advice]
    .filter((p) => p.length > 0)
    .map(partsText)
    .join(" ");
}

/** Thresholds used by the findings (documented in the README). */
export const THRESHOLDS = {
  /** Condition number above which near-dependence is noted. */
  conditionNote: 1e4,
  /** … and above which it is a warning. */
  conditionWarn: 1e8,
  /** |studentized residual| above which a row is noted. */
  largeResidual: 3,
};

/** All findings for a fit, most serious first. */
export function findings(input: FindingsInput): Finding[] {
  const { fit, labels } = input;
  const rowNo = input.rowNumber ?? ((i: number) => i + 1);
  const out: Finding[] = [];
  const st = fit.statistics();
  const exact = isExactFit(fit);
  const p = fit.parameters;
  const n = fit.n;
  const interceptCol = fit.spec.intercept ? 0 : -1;

  if (n === 0) {
    out.push({
      id: "no-rows",
      severity: "problem",
      what: [text("No row has a usable y, every x value"), text(fit.spec.weights ? " and a positive weight." : ".")],
      done: [text("Nothing could be estimated.")],
      advice: [text("Check that the ranges point at numbers.")],
    });
  } else if (n < p) {
    out.push({
      id: "too-few-rows",
      severity: "problem",
      what: [text("Only "), num(n), text(` usable row${n === 1 ? "" : "s"} for `), num(p), text(" parameters.")],
      done: [text("The LSQ functions answer #N/A until there are at least as many usable rows as parameters.")],
      advice: [text("Add rows, or use fewer x columns or a lower degree.")],
    });
  }

  // With fewer usable rows than parameters every extra column is a combination of the others in
  // those rows; listing those relations would only restate the "too few rows" finding.
  for (const dep of n < p ? [] : fit.dependencies()) {
    const name = labels[dep.column] ?? `column ${dep.column + 1}`;
    if (dep.zero) {
      out.push({
        id: "zero-column",
        severity: "warning",
        what: [label(name), text(" is zero in every used row.")],
        done: [text("Its coefficient shows #N/A.")],
        advice: [text("Remove the column, or check the range.")],
      });
      continue;
    }
    const terms = significantTerms(dep).map((t) => dep.on[t]!);
    const onlyIntercept = dep.on.length > 0 && terms.every((c) => c === interceptCol);
    if (onlyIntercept && interceptCol >= 0) {
      out.push({
        id: "duplicates-intercept",
        severity: "warning",
        what: [label(name), text(" has the same value ("), num(dep.coef[0]!, 6), text(") in every used row, so it duplicates the intercept.")],
        done: [text("Its coefficient shows #N/A.")],
        advice: [text("Remove the column, or set intercept to FALSE.")],
      });
      continue;
    }
    const others = terms.filter((c) => c !== interceptCol);
    out.push({
      id: "dependent-columns",
      severity: "warning",
      what: [...relationParts(dep, labels, interceptCol), text(": their separate effects cannot be estimated.")],
      done: [text("The coefficient of "), label(name), text(" shows #N/A.")],
      advice: others.length === 1 ? [text("Remove one of the two columns.")] : [text("Remove "), label(name), text(" or one of the columns it is built from.")],
    });
  }

  if (typeof st.conditionNumber === "number" && st.conditionNumber >= THRESHOLDS.conditionNote && fit.rank > 1) {
    const cond = st.conditionNumber;
    const { weakest } = fit.condition();
    const big = Math.max(...Array.from(weakest, Math.abs));
    const involved: Part[] = [];
    const cols = Array.from(fit.qr.kept).filter((_c, k) => Math.abs(weakest[k]!) >= 0.1 * big);
    cols.forEach((c, t) => {
      if (t > 0) involved.push(text(t === cols.length - 1 ? " and " : ", "));
      involved.push(label(labels[c] ?? `column ${c + 1}`));
    });
    const lost = Math.floor(Math.log10(cond));
    out.push({
      id: "near-dependence",
      severity: cond >= THRESHOLDS.conditionWarn ? "warning" : "note",
      what: [text("Nearly dependent columns: "), ...involved, text(" (condition number "), num(cond, 2), text(").")],
      done: [text("The estimates are computed to full precision, but a change in the "), num(16 - lost), text("th significant digit of the data can move them: about "), num(lost), text(" significant digits of the coefficients are at risk.")],
      advice: [text("Centre or rescale x, drop one of the columns, or collect data that separates them.")],
    });
  }

  // Skipped rows, grouped by reason.
  const byReason = new Map<string, number[]>();
  const zeroW: number[] = [];
  fit.status.forEach((s, i) => {
    if (s === RowStatus.Used) return;
    if (s === RowStatus.ZeroWeight) {
      zeroW.push(rowNo(i));
      return;
    }
    const why = input.skipReason ? input.skipReason(i) : defaultReason(s);
    const list = byReason.get(why) ?? [];
    list.push(rowNo(i));
    byReason.set(why, list);
  });
  if (byReason.size > 0) {
    const total = Array.from(byReason.values()).reduce((a, b) => a + b.length, 0);
    const what: Part[] = [num(total), text(` row${total === 1 ? " was" : "s were"} skipped: `)];
    let first = true;
    for (const [why, list] of byReason) {
      if (!first) what.push(text("; "));
      what.push(text(`${why} (row${list.length === 1 ? "" : "s"} `), rows(list), text(")"));
      first = false;
    }
    what.push(text("."));
    out.push({
      id: "skipped-rows",
      severity: "note",
      what,
      done: [text("They are left out of the fit; FITTED, RESID and INFLUENCE show #N/A for them.")],
      advice: [text("Fill in the values if they were left out by mistake.")],
    });
  }
  if (zeroW.length > 0) {
    out.push({
      id: "zero-weights",
      severity: "note",
      what: [num(zeroW.length), text(` row${zeroW.length === 1 ? " has" : "s have"} zero weight (row${zeroW.length === 1 ? "" : "s"} `), rows(zeroW), text(").")],
      done: [text("They do not count as observations; their fitted values and residuals are still shown.")],
      advice: [],
    });
  }

  if (n >= p && n > 0 && st.residualDf === 0) {
    out.push({
      id: "zero-df",
      severity: "warning",
      what: [text("There are as many usable rows as estimated parameters, so nothing is left to measure the scatter.")],
      done: [text("Standard errors, tests and intervals show #N/A.")],
      advice: [text("Add rows or use fewer parameters.")],
    });
  } else if (st.residualDf > 0 && typeof st.rss === "number" && exact) {
    out.push({
      id: "exact-fit",
      severity: "note",
      what: [text("The model passes through every used point exactly (the residuals are zero to within rounding).")],
      done: [text("Standard errors are zero or nearly so; tests and the F statistic are not meaningful.")],
      advice: [text("Check that y is not computed from x by a formula.")],
    });
  }

  if (st.residualDf > 0 && !exact) {
    const lev = fit.leverageUsed();
    const stud = fit.studentizedUsed();
    const lim = (2 * fit.rank) / n;
    const hiLev: number[] = [];
    const bigRes: number[] = [];
    fit.used.forEach((i, t) => {
      if (lev[t]! > lim && n > fit.rank + 1) hiLev.push(rowNo(i));
      if (Math.abs(stud[t]!) > THRESHOLDS.largeResidual) bigRes.push(rowNo(i));
    });
    if (hiLev.length > 0)
      out.push({
        id: "high-leverage",
        severity: "note",
        what: [text(`Row${hiLev.length === 1 ? "" : "s"} `), rows(hiLev), text(` ha${hiLev.length === 1 ? "s" : "ve"} high leverage (above 2p/n = `), num(lim, 3), text("): x values far from the rest, so they pull the fit strongly.")],
        done: [],
        advice: [text("Check those rows; INFLUENCE shows leverage and Cook's distance.")],
      });
    if (bigRes.length > 0)
      out.push({
        id: "large-residual",
        severity: "note",
        what: [text(`Row${bigRes.length === 1 ? "" : "s"} `), rows(bigRes), text(` ha${bigRes.length === 1 ? "s a" : "ve"} large studentized residual${bigRes.length === 1 ? "" : "s"} (beyond ±3).`)],
        done: [],
        advice: [text("Check for a recording error or an unusual condition.")],
      });
  }

  if (!fit.refineConverged) {
    out.push({
      id: "refinement",
      severity: "warning",
      what: [text("The accuracy check on the solution did not settle.")],
      done: [text("The estimates may have fewer correct digits than usual.")],
      advice: [text("Rescale or centre x, or remove nearly dependent columns.")],
    });
  }

  if (out.length === 0)
    out.push({ id: "none", severity: "ok", what: [text("No problems found: every column could be estimated and no row was skipped.")], done: [], advice: [] });
  const order: Record<Severity, number> = { problem: 0, warning: 1, note: 2, ok: 3 };
  return out.sort((a, b) => order[a.severity] - order[b.severity]);
}

/** Residuals are zero to within rounding of y. */
export function isExactFit(fit: LeastSquaresFit): boolean {
  if (fit.rssScaled === 0) return true;
  // Compare in scaled units: ‖r̃‖ against rounding of ỹ (max |ỹ| lies in [0.5, 1)).
  if (!(Math.sqrt(fit.rssScaled) <= 8 * 2.220446049250313e-16 * Math.sqrt(fit.n))) return false;
  const { used } = fit;
  let yy = 0;
  for (let t = 0; t < used.length; t++) yy = Math.max(yy, Math.abs(fit.spec.y[used[t]!]!));
  return yy > 0;
}

function defaultReason(s: number): string {
  if (s === RowStatus.MissingY) return "y is empty or not a number";
  if (s === RowStatus.MissingX) return "an x value is empty or not a number";
  return "the weight is empty or not a number";
}
