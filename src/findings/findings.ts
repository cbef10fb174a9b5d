/**
 * The findings engine: plain-language observations about a fit, shared by LSQ.CHECK and the
 * task pane so the words in a cell and in the pane never disagree.
 *
 * A finding is *composed* from parts (plain text, a column label, a number, a list of rows),
 * never concatenated into markup: the pane renders every part with textContent, and
 * `findingText` joins the parts into a single plain string for a cell. Labels come from the
 * workbook and are treated as opaque text.
 *
 * Every threshold comes from src/core/tolerances.ts; every decision about the fit (rank, exact
 * fit) is read from the fit, never made again here.
 */
import type { Dependency, LeastSquaresFit } from "../core/fit";
import type { LineXY } from "../core/linexy";
import { RowStatus } from "../core/design";
import {
  CONDITION_NOTE,
  CONDITION_WARN,
  DOUBLE_DIGITS,
  LACK_OF_FIT_ALPHA,
  LARGE_RESIDUAL,
  LEVERAGE_FACTOR,
  RELATION_TERM_SHARE,
  WEAK_DIRECTION_SHARE,
} from "../core/tolerances";

export type Severity = "problem" | "warning" | "note" | "ok";

export type Part =
  | { readonly kind: "text"; readonly text: string }
  | { readonly kind: "label"; readonly text: string }
  | { readonly kind: "number"; readonly value: number; readonly text: string }
  | { readonly kind: "rows"; readonly rows: readonly number[]; readonly text: string };

export type FindingId =
  | "none"
  | "arguments"
  | "too-few-rows"
  | "no-rows"
  | "dependent-columns"
  | "duplicates-intercept"
  | "zero-column"
  | "near-dependence"
  | "skipped-rows"
  | "zero-df"
  | "exact-fit"
  | "constant-y"
  | "zero-weights"
  | "lack-of-fit"
  | "curvature"
  | "chi-square"
  | "high-leverage"
  | "large-residual"
  | "extrapolation"
  | "possible-blanks"
  | "x-uncertainty"
  | "refinement";

export interface Finding {
  /** Stable identifier of the kind of finding. */
  readonly id: FindingId;
  readonly severity: Severity;
  /** What was found. */
  readonly what: readonly Part[];
  /** What the functions did about it. */
  readonly done: readonly Part[];
  /** What the user can do. */
  readonly advice: readonly Part[];
}

export interface FindingsInput {
  readonly fit: LeastSquaresFit;
  /** Labels of the design columns (intercept first when present). */
  readonly labels: readonly string[];
  /** Describes why an input row (0-based) was skipped; defaults to the core's status. */
  readonly skipReason?: (row: number) => string;
  /** Row numbers shown to the user for input row i (0-based); default i + 1. */
  readonly rowNumber?: (row: number) => number;
  /** What the weights range held (default relative). */
  readonly weighting?: "relative" | "uncertainty";
  /** "sheet" (default): words for cell formulas; "preview": words for the pane's pasted data. */
  readonly where?: "sheet" | "preview";
  /** New x rows asked about (PREDICT), q × k column-major. */
  readonly newx?: { readonly data: Float64Array; readonly rows: number };
  /** New readings asked about (INVERSE). */
  readonly newy?: Float64Array;
  /** Rows whose zeros may be empty cells the host passed as 0 (see functions/blanks.ts), by column name. */
  readonly possibleBlanks?: { readonly rows: readonly number[]; readonly columns: readonly string[] };
}

const text = (t: string): Part => ({ kind: "text", text: t });
const label = (t: string): Part => ({ kind: "label", text: t });
const num = (v: number, digits = 3): Part => ({ kind: "number", value: v, text: formatNumber(v, digits) });

/** "1", "1 and 2", "1, 2 and 3"; past `max`, "1, 2, …, 10 and 5 more". */
export function listText(items: readonly (string | number)[], max = 10): string {
  const shown = items.slice(0, max).map(String);
  if (items.length > max) return `${shown.join(", ")} and ${items.length - max} more`;
  if (shown.length <= 1) return shown.join("");
  return `${shown.slice(0, -1).join(", ")} and ${shown[shown.length - 1]}`;
}

const rows = (r: readonly number[], max = 10): Part => ({ kind: "rows", rows: r, text: listText(r, max) });

/** "row" or "rows" by count, with the verb agreeing: plural(1, "row", "has", "have") → "row has". */
export function plural(n: number, noun: string, one = "", many = ""): string {
  const nn = n === 1 ? noun : `${noun}s`;
  const v = n === 1 ? one : many;
  return v ? `${nn} ${v}` : nn;
}

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

/** A p-value for people: the value, or "< 1e-300" where it underflows (never "0"). */
export function formatP(p: number): string {
  if (p < 1e-300) return "< 1e-300";
  return formatNumber(p, 2);
}

/** Positions of the terms of a relation that matter: contribution above RELATION_TERM_SHARE of the largest. */
export function significantTerms(dep: Dependency): number[] {
  const big = Math.max(0, ...Array.from(dep.scaled, Math.abs));
  const out: number[] = [];
  dep.scaled.forEach((v, t) => {
    if (Math.abs(v) > RELATION_TERM_SHARE * big) out.push(t);
  });
  return out;
}

/**
 * The relation of a dependency in the user's labels, e.g. "Temp °F = 32 + 1.8 × Temp °C".
 * Terms whose contribution is below RELATION_TERM_SHARE of the largest are left out.
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

/** All findings for a fit, most serious first. */
export function findings(input: FindingsInput): Finding[] {
  const { fit, labels } = input;
  const sheet = input.where !== "preview";
  const rowNo = input.rowNumber ?? ((i: number) => i + 1);
  const out: Finding[] = [];
  const st = fit.statistics();
  const exact = fit.exact;
  const p = fit.parameters;
  const n = fit.n;
  const interceptCol = fit.spec.intercept ? 0 : -1;
  const weighted = !!fit.spec.weights;

  if (n === 0) {
    out.push({
      id: "no-rows",
      severity: "problem",
      what: [text(weighted ? "No row has a usable y, usable x values and a positive weight." : "No row has both a usable y and usable x values.")],
      done: [text("Nothing could be estimated.")],
      advice: [text(sheet ? "Check that the ranges point at numbers." : "Check that the data hold numbers.")],
    });
  } else if (n < p) {
    out.push({
      id: "too-few-rows",
      severity: "problem",
      what: [text("Only "), num(n), text(` usable ${plural(n, "row")} for `), num(p), text(" parameters.")],
      done: [text(sheet ? "The LSQ functions answer #N/A until there are at least as many usable rows as parameters." : "Nothing can be estimated until there are at least as many usable rows as parameters.")],
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
        advice: [text(sheet ? "Remove the column, or check the range." : "Remove the column.")],
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
        advice: [text(sheet ? "Remove the column, or set intercept to FALSE." : "Remove the column, or fit without an intercept.")],
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

  if (typeof st.conditionNumber === "number" && st.conditionNumber >= CONDITION_NOTE && fit.rank > 1) {
    const cond = st.conditionNumber;
    const { weakest } = fit.condition();
    const big = Math.max(...Array.from(weakest, Math.abs));
    const involved: Part[] = [];
    const cols = Array.from(fit.factor.kept).filter((_c, k) => Math.abs(weakest[k]!) >= WEAK_DIRECTION_SHARE * big);
    cols.forEach((c, t) => {
      if (t > 0) involved.push(text(t === cols.length - 1 ? " and " : ", "));
      involved.push(label(labels[c] ?? `column ${c + 1}`));
    });
    const lost = Math.floor(Math.log10(cond));
    const from = Math.max(1, Math.floor(DOUBLE_DIGITS) + 1 - lost);
    out.push({
      id: "near-dependence",
      severity: cond >= CONDITION_WARN ? "warning" : "note",
      what: [text("Nearly dependent columns: "), ...involved, text(" (condition number "), num(cond, 2), text(").")],
      done: [text("The estimates are computed to full precision, but a change in the "), text(ordinal(from)), text(" significant digit of the data can move them: about "), num(lost), text(` significant ${plural(lost, "digit")} of the coefficients ${lost === 1 ? "is" : "are"} at risk.`)],
      advice: [text("Center or rescale x, drop one of the columns, or collect data that separates them.")],
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
    const what: Part[] = [num(total), text(` ${plural(total, "row", "was", "were")} skipped: `)];
    let first = true;
    for (const [why, list] of byReason) {
      if (!first) what.push(text("; "));
      what.push(text(`${why} (${plural(list.length, "row")} `), rows(list), text(")"));
      first = false;
    }
    what.push(text("."));
    out.push({
      id: "skipped-rows",
      severity: "note",
      what,
      done: [text(`${total === 1 ? "It is" : "They are"} left out of the fit${sheet ? `; FITTED, RESID and INFLUENCE show #N/A for ${total === 1 ? "it" : "them"}` : ""}.`)],
      advice: [text(`Fill in the ${total === 1 ? "value" : "values"} if ${total === 1 ? "it was" : "they were"} left out by mistake.`)],
    });
  }
  if (input.possibleBlanks && input.possibleBlanks.rows.length > 0) {
    const pb = input.possibleBlanks;
    const c = pb.rows.length;
    out.push({
      id: "possible-blanks",
      severity: "warning",
      what: [num(c), text(` ${plural(c, "row", "holds", "hold")} a zero in ${listText(pb.columns)} that may be an empty cell: some versions of the spreadsheet pass empty cells to add-ins as 0, and this one could not be asked which cells are empty (${plural(c, "row")} `), rows(pb.rows), text(").")],
      done: [text(`${c === 1 ? "It is" : "They are"} fitted as real zeros.`)],
      advice: [text("Mark missing values with text such as n/a or with =NA(), so they are skipped in every version.")],
    });
  }
  if (zeroW.length > 0) {
    const c = zeroW.length;
    out.push({
      id: "zero-weights",
      severity: "note",
      what: [num(c), text(` ${plural(c, "row", "has", "have")} zero weight (${plural(c, "row")} `), rows(zeroW), text(").")],
      done: [text(`${c === 1 ? "It does" : "They do"} not count as ${c === 1 ? "an observation" : "observations"}; ${c === 1 ? "its" : "their"} fitted ${plural(c, "value")} and ${plural(c, "residual")} are still shown.`)],
      advice: [],
    });
  }

  if (n >= p && n > 0 && st.residualDf === 0) {
    out.push({
      id: "zero-df",
      severity: "warning",
      what: [text("There are as many usable rows as estimated parameters, so nothing is left to measure the scatter.")],
      done: [text(fit.spec.varianceKnown ? "With known uncertainties the standard errors are still given; tests of the fit itself show #N/A." : "Standard errors, tests and intervals show #N/A.")],
      advice: [text("Add rows or use fewer parameters.")],
    });
  } else if (n > 0 && st.constantY) {
    out.push({
      id: "constant-y",
      severity: "warning",
      what: [text(fit.spec.intercept ? "y has the same value in every used row, so there is nothing for the x columns to explain." : "y is zero in every used row.")],
      done: [text("The coefficients of the x columns are zero; R², F and the tests show #N/A.")],
      advice: [text(sheet ? "Check that the y range points at the measurements." : "Check that the first column holds the measurements.")],
    });
  } else if (st.residualDf > 0 && exact) {
    out.push({
      id: "exact-fit",
      severity: "note",
      what: [text("The model passes through every used point: the residuals are zero to within the rounding of the data.")],
      done: [text("The residuals are shown as 0 and the standard errors as 0; t, F and the likelihood are not meaningful.")],
      advice: [text("If y should carry measurement scatter, check that it is not computed from x by a formula.")],
    });
  }

  if (st.residualDf > 0 && !exact && !st.constantY) adequacyFindings(input, out);

  if (st.residualDf > 0 && !exact && !st.constantY) influenceFindings(input, out);

  extrapolationFindings(input, out);

  if (!fit.refineConverged) {
    out.push({
      id: "refinement",
      severity: "warning",
      what: [text("The accuracy check on the solution did not settle.")],
      done: [text("The estimates may have fewer correct digits than usual.")],
      advice: [text("Rescale or center x, or remove nearly dependent columns.")],
    });
  }

  if (out.length === 0)
    out.push({ id: "none", severity: "ok", what: [text("No problems found: every column could be estimated and no row was skipped.")], done: [], advice: [] });
  const order: Record<Severity, number> = { problem: 0, warning: 1, note: 2, ok: 3 };
  return out.sort((a, b) => order[a.severity] - order[b.severity]);
}

function ordinal(k: number): string {
  const s = k % 100 >= 11 && k % 100 <= 13 ? "th" : k % 10 === 1 ? "st" : k % 10 === 2 ? "nd" : k % 10 === 3 ? "rd" : "th";
  return `${k}${s}`;
}

/** Lack of fit (with replicates), the added-term test (without), and χ² with known uncertainties. */
function adequacyFindings(input: FindingsInput, out: Finding[]): void {
  const { fit } = input;
  const advice = [text(fit.shape.k === 1 ? "Try a higher degree, a transformation of x or y, or a narrower range of standards." : "Try adding terms (powers or products of the x columns), a transformation, or a narrower range of data.")];
  const lof = fit.lackOfFit();
  if (typeof lof.F === "number" && typeof lof.p === "number" && typeof lof.df === "number") {
    if (lof.p < LACK_OF_FIT_ALPHA)
      out.push({
        id: "lack-of-fit",
        severity: "problem",
        what: [text("The model does not follow the data: the scatter between the repeated measurements is much smaller than the scatter about the fitted curve (lack-of-fit F = "), num(lof.F, 4), text(` on ${lof.df} and ${lof.pureErrorDf} degrees of freedom, p = ${formatP(lof.p)}).`)],
        done: [text("The fit is reported, but its standard errors and intervals assume a model that fits.")],
        advice,
      });
    return;
  }
  // No replicates: the added-term test.
  const at = fit.addedTerm();
  if (typeof at.t === "number" && typeof at.p === "number" && at.p < LACK_OF_FIT_ALPHA)
    out.push({
      id: "curvature",
      severity: "problem",
      what: [text(`The model misses curvature in the data: adding ${at.term} to it gives t = `), num(at.t, 3), text(`, p = ${formatP(at.p)}.`)],
      done: [text("The fit is reported, but its standard errors and intervals assume a model that fits.")],
      advice,
    });
  if (fit.spec.varianceKnown) {
    const c = fit.chiSquare();
    if (typeof c.p === "number" && typeof c.chi2 === "number" && c.p < LACK_OF_FIT_ALPHA)
      out.push({
        id: "chi-square",
        severity: "warning",
        what: [text("The residuals are larger than the stated uncertainties allow: χ² = "), num(c.chi2, 4), text(` on ${c.df} degrees of freedom, p = ${formatP(c.p)}.`)],
        done: [text("The standard errors use the stated uncertainties as they are, so they are probably too small.")],
        advice: [text("Check the uncertainties and the model; if the scatter is real, use relative weights instead so it is estimated from the data.")],
      });
  }
}

/** High-leverage rows (with the reason: position or weight) and large studentized residuals. */
function influenceFindings(input: FindingsInput, out: Finding[]): void {
  const { fit } = input;
  const sheet = input.where !== "preview";
  const rowNo = input.rowNumber ?? ((i: number) => i + 1);
  const n = fit.n;
  const lev = fit.leverageUsed();
  const stud = fit.studentizedUsed();
  const lim = (LEVERAGE_FACTOR * fit.rank) / n;
  const w = fit.spec.weights;
  // Weighted fits: a row's own weight multiplies its leverage (h_i = w_i·x_iᵀ(XᵀWX)⁻¹x_i), so a
  // row whose leverage would be ordinary with the median weight owes its pull to its weight.
  const medW = w ? median(Float64Array.from(fit.used, (i) => w[i]!)) : 1;
  // Single-x designs: the smallest and largest x of evenly spread data always have the largest
  // leverage (every design of that shape has them), so they are not reported unless isolated or
  // weighted up.
  const ends = fit.shape.k === 1 ? expectedEnds(fit) : new Set<number>();
  // Positions t (into the used rows) of the rows to report.
  const byPosition: number[] = [];
  const byWeight: number[] = [];
  const bigRes: number[] = [];
  const used = fit.used;
  for (let t = 0; t < n; t++) {
    const i = used[t]!;
    const h = lev[t]!;
    const wi = w ? w[i]! : 1;
    if (h > lim && n > fit.rank + 1) {
      if (w && wi > 2 * medW && (h * medW) / wi <= lim) byWeight.push(t);
      else if (!ends.has(i) || wi > 2 * medW) byPosition.push(t);
    }
    if (Math.abs(stud[t]!) > LARGE_RESIDUAL) bigRes.push(t);
  }
  const MANY = 5;
  /** Input row numbers of the positions, the largest `key` first. */
  const top = (list: number[], key: (t: number) => number): number[] =>
    list
      .slice()
      .sort((a, b) => key(b) - key(a))
      .map((t) => rowNo(used[t]!));
  const see = sheet ? "INFLUENCE shows leverage and Cook's distance for every row." : "The residual plot marks them.";
  const levWords = `above ${LEVERAGE_FACTOR}·rank/n = `;
  if (byPosition.length > 0) {
    const c = byPosition.length;
    const shown = top(byPosition, (t) => lev[t]!);
    out.push({
      id: "high-leverage",
      severity: "note",
      what:
        c > MANY
          ? [num(c), text(` rows have high leverage (${levWords}`), num((LEVERAGE_FACTOR * fit.rank) / n, 3), text("), the largest in rows "), rows(shown, 3), text(": their x values lie far from the rest, so they pull the fit strongly.")]
          : [text(`${c === 1 ? "Row" : "Rows"} `), rows(shown), text(` ${c === 1 ? "has" : "have"} high leverage (${levWords}`), num((LEVERAGE_FACTOR * fit.rank) / n, 3), text(`): ${c === 1 ? "its x values lie" : "their x values lie"} far from the rest, so ${c === 1 ? "it pulls" : "they pull"} the fit strongly.`)],
      done: [],
      advice: [text(`Check ${c === 1 ? "that row" : "those rows"}. ${see}`)],
    });
  }
  if (byWeight.length > 0) {
    const c = byWeight.length;
    const shown = top(byWeight, (t) => lev[t]!);
    out.push({
      id: "high-leverage",
      severity: "note",
      what: [text(`${c === 1 ? "Row" : "Rows"} `), rows(shown, MANY), text(` ${c === 1 ? "has" : "have"} high leverage (${levWords}`), num((LEVERAGE_FACTOR * fit.rank) / n, 3), text(`) because of ${c === 1 ? "its" : "their"} large ${plural(c, "weight")}, not ${c === 1 ? "its" : "their"} position: with the median weight ${c === 1 ? "it" : "they"} would be ordinary.`)],
      done: [],
      advice: [text(`Check that ${c === 1 ? "the weight is" : "the weights are"} right. ${see}`)],
    });
  }
  if (bigRes.length > 0) {
    const c = bigRes.length;
    const shown = top(bigRes, (t) => Math.abs(stud[t]!));
    out.push({
      id: "large-residual",
      severity: "note",
      what:
        c > MANY
          ? [num(c), text(` rows have large studentized residuals (beyond ±${LARGE_RESIDUAL}), the largest in rows `), rows(shown, 3), text(".")]
          : [text(`${c === 1 ? "Row" : "Rows"} `), rows(shown), text(` ${c === 1 ? "has a large studentized residual" : "have large studentized residuals"} (beyond ±${LARGE_RESIDUAL}).`)],
      done: [],
      advice: [text("Check for a recording error or an unusual condition.")],
    });
  }
}

/** Input rows at the two ends of a single-x design whose x values are evenly spread there. */
function expectedEnds(fit: LeastSquaresFit): Set<number> {
  const out = new Set<number>();
  const v = Float64Array.from(fit.used, (i) => fit.spec.x[i]!).sort();
  const distinct: number[] = [];
  for (let s = 0; s < v.length; s++) if (s === 0 || v[s] !== v[s - 1]) distinct.push(v[s]!);
  if (distinct.length < 4) return out;
  const gaps = Float64Array.from({ length: distinct.length - 1 }, (_, t) => distinct[t + 1]! - distinct[t]!);
  const med = median(gaps);
  const lo = distinct[0]!;
  const hi = distinct[distinct.length - 1]!;
  const keepLo = gaps[0]! <= 2 * med;
  const keepHi = gaps[gaps.length - 1]! <= 2 * med;
  for (const i of fit.used) {
    const xv = fit.spec.x[i]!;
    if ((keepLo && xv === lo) || (keepHi && xv === hi)) out.add(i);
  }
  return out;
}

/** The median of the values (a sorted copy). */
function median(v: Float64Array): number {
  if (v.length === 0) return NaN;
  const s = Float64Array.from(v).sort();
  const h = s.length >> 1;
  return s.length % 2 ? s[h]! : 0.5 * (s[h - 1]! + s[h]!);
}

/** New x rows (PREDICT) or readings (INVERSE) outside the range of the data. */
function extrapolationFindings(input: FindingsInput, out: Finding[]): void {
  const { fit } = input;
  if (fit.n === 0) return;
  const { k, m } = fit.shape;
  if (input.newx && input.newx.rows > 0) {
    const lo = new Float64Array(k).fill(Infinity);
    const hi = new Float64Array(k).fill(-Infinity);
    for (const i of fit.used)
      for (let c = 0; c < k; c++) {
        const v = fit.spec.x[c * m + i]!;
        lo[c] = Math.min(lo[c]!, v);
        hi[c] = Math.max(hi[c]!, v);
      }
    const q = input.newx.rows;
    const outside: number[] = [];
    for (let t = 0; t < q; t++)
      for (let c = 0; c < k; c++) {
        const v = input.newx.data[c * q + t]!;
        if (Number.isFinite(v) && (v < lo[c]! || v > hi[c]!)) {
          outside.push(t + 1);
          break;
        }
      }
    if (outside.length > 0) {
      const c = outside.length;
      out.push({
        id: "extrapolation",
        severity: "warning",
        what: [text(`New ${plural(c, "row")} `), rows(outside), text(` of newx ${c === 1 ? "lies" : "lie"} outside the range of the data${k === 1 ? ` (x from ${formatNumber(lo[0]!, 6)} to ${formatNumber(hi[0]!, 6)})` : " in at least one column"}.`)],
        done: [text(`${c === 1 ? "Its prediction is an extrapolation" : "Their predictions are extrapolations"}: the model has not been checked there.`)],
        advice: [text("Predict within the range of the data, or add data that cover the new points.")],
      });
    }
  }
  if (input.newy && input.newy.length > 0) {
    const f = fit.fittedAndResiduals().fitted;
    let lo = Infinity;
    let hi = -Infinity;
    for (const i of fit.used) {
      lo = Math.min(lo, f[i]!);
      hi = Math.max(hi, f[i]!);
    }
    const outside: number[] = [];
    input.newy.forEach((v, t) => {
      if (Number.isFinite(v) && (v < lo || v > hi)) outside.push(t + 1);
    });
    if (outside.length > 0) {
      const c = outside.length;
      out.push({
        id: "extrapolation",
        severity: "warning",
        what: [text(`${c === 1 ? "Reading" : "Readings"} `), rows(outside), text(` of newy ${c === 1 ? "lies" : "lie"} outside the calibrated range of responses (${formatNumber(lo, 6)} to ${formatNumber(hi, 6)}).`)],
        done: [text(`${c === 1 ? "Its value read back from the curve is an extrapolation" : "Their values read back from the curve are extrapolations"} beyond the standards.`)],
        advice: [text("Dilute or concentrate the sample into the calibrated range, or add standards that cover it.")],
      });
    }
  }
}

function defaultReason(s: number): string {
  if (s === RowStatus.MissingY) return "y is empty or not a number";
  if (s === RowStatus.MissingX) return "an x value is empty or not a number";
  return "the weight is empty or not a number";
}

/** What the pane says about a LINEXY fit: whether the x uncertainties matter, and the χ² verdict. */
export function lineXYFindings(l: LineXY): Finding[] {
  const out: Finding[] = [];
  if (typeof l.slope !== "number") {
    out.push({ id: "x-uncertainty", severity: "problem", what: [text(`No line: ${typeof l.slope === "object" ? l.slope.na : ""}.`)], done: [], advice: [] });
    return out;
  }
  if (l.skipped > 0)
    out.push({
      id: "skipped-rows",
      severity: "note",
      what: [num(l.skipped), text(` ${plural(l.skipped, "row", "was", "were")} skipped: a value or an uncertainty is empty or not a number.`)],
      done: [text(`${l.skipped === 1 ? "It is" : "They are"} left out of the line.`)],
      advice: [],
    });
  if (typeof l.xShare === "number") {
    const r = l.xShare;
    if (r >= 0.3)
      out.push({
        id: "x-uncertainty",
        severity: "note",
        what: [text("The x uncertainties matter here: on the median row, |slope| × u(x) is "), num(r, 2), text(" times u(y).")],
        done: [text("This line weighs both; an ordinary fit with weights from u(y) alone would pull the slope toward zero and understate its uncertainty.")],
        advice: [],
      });
    else if (r < 0.1)
      out.push({
        id: "x-uncertainty",
        severity: "note",
        what: [text("The x uncertainties are small beside the y uncertainties: on the median row, |slope| × u(x) is only "), num(r, 2), text(" times u(y).")],
        done: [text("This line is then close to the ordinary weighted line (COEF or PARAMS with the u(y) values as weights and weighting \"uncertainty\").")],
        advice: [],
      });
  }
  if (typeof l.p === "number" && typeof l.chi2 === "number") {
    if (l.p < LACK_OF_FIT_ALPHA)
      out.push({
        id: "chi-square",
        severity: "warning",
        what: [text("The points scatter about the line more than the stated uncertainties allow: χ² = "), num(l.chi2, 4), text(` on ${l.df} degrees of freedom, p = ${formatP(l.p)}.`)],
        done: [text("The uncertainties of the intercept and slope use the stated uncertainties as they are, so they are probably too small.")],
        advice: [text("Check the uncertainties, and whether a straight line describes the data.")],
      });
    else if (l.p > 1 - LACK_OF_FIT_ALPHA)
      out.push({
        id: "chi-square",
        severity: "note",
        what: [text("The points scatter about the line less than the stated uncertainties suggest: χ² = "), num(l.chi2, 4), text(` on ${l.df} degrees of freedom, p = ${formatP(l.p)}.`)],
        done: [text("The uncertainties of the intercept and slope may be larger than the data show.")],
        advice: [text("Check whether the stated uncertainties are overstated.")],
      });
    else
      out.push({ id: "none", severity: "ok", what: [text("The scatter about the line agrees with the stated uncertainties: χ² = "), num(l.chi2, 4), text(` on ${l.df} degrees of freedom, p = ${formatP(l.p)}.`)], done: [], advice: [] });
  }
  const order: Record<Severity, number> = { problem: 0, warning: 1, note: 2, ok: 3 };
  return out.sort((a, b) => order[a.severity] - order[b.severity]);
}
