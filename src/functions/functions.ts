/**
 * LSQ custom functions: the entry file read by the metadata generator. Each function's JSDoc
 * becomes its description and parameter help in the formula autocomplete; ids, parameter names
 * and order are frozen (test/functions-host.test.ts) because shared workbooks depend on them.
 *
 * Argument convention (README "Function reference"): a function that asks about new points or
 * readings takes them first; then the fit block y, x, weights, intercept, degree; then the
 * function's own optional arguments; `weighting` is the last argument of every function that
 * takes weights. Optional arguments arrive as null when omitted. The last parameter is the host's
 * invocation object (calling-cell and argument addresses, recorded for the task pane).
 *
 * Every body runs inside L.invoke, so whatever the arguments hold, the host gets a result or one
 * error value with a message (never a thrown exception). Large calls return a promise of the result
 * (the runtime accepts either; the declared type stays any[][] so the metadata says "matrix").
 */
import * as L from "./lsq";
import * as C from "./calibrate";
import { publishEngine } from "./api";

/**
 * The metadata plugin appends `CustomFunctions.associate(id, f)` calls to this module; they resolve
 * to this module-level object, which keeps every association and passes it on to the host's
 * CustomFunctions (office.js) — now if office.js has loaded, or when it arrives later
 * (`associateWithHost`, called by the pane). So the page never needs a stand-in global that
 * office.js might find in its place, and the pane can appear before office.js does.
 */
const associations: [string, (...args: never[]) => unknown][] = [];
const CustomFunctions = {
  associate(id: string, f: (...args: never[]) => unknown): void {
    associations.push([id, f]);
    forward(id, f);
  },
};
function forward(id: string, f: (...args: never[]) => unknown): void {
  const host = (globalThis as { CustomFunctions?: { associate?: unknown } }).CustomFunctions;
  if (host && host !== CustomFunctions && typeof host.associate === "function") (host.associate as (id: string, f: unknown) => void)(id, f);
}
/** Pass every association to the host's CustomFunctions again (office.js arrived after this script). */
function associateWithHost(): void {
  for (const [id, f] of associations) forward(id, f);
}

/**
 * Least-squares coefficients: the intercept first, then one per x column (or per power of x). A coefficient that cannot be estimated shows #N/A with the relation that makes it so.
 * @customfunction COEF
 * @helpurl https://localhost:3000/help.html#lsqcoef
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [headers] TRUE to add a header row (and, for per-parameter results, a first column of term names); FALSE (default) for numbers only.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One estimate per parameter, in a column.
 */
export function coef(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, headers: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("COEF", invocation, { y, x, weights, intercept, degree, headers, weighting }, (a, ctx) => L.coef(a as never, ctx));
}

/**
 * Fitted values: the part of y the model explains (its projection onto the model's columns), one per input row. Skipped rows show #N/A.
 * @customfunction FITTED
 * @helpurl https://localhost:3000/help.html#lsqfitted
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One fitted value per input row.
 */
export function fitted(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("FITTED", invocation, { y, x, weights, intercept, degree, weighting }, (a, ctx) => L.fitted(a as never, ctx));
}

/**
 * Residuals: y minus the fitted value, one per input row. Skipped rows show #N/A.
 * @customfunction RESID
 * @helpurl https://localhost:3000/help.html#lsqresid
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One residual per input row.
 */
export function resid(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("RESID", invocation, { y, x, weights, intercept, degree, weighting }, (a, ctx) => L.resid(a as never, ctx));
}

/**
 * Covariance matrix of the estimates (their variances on the diagonal). Rows and columns of coefficients that cannot be estimated show #N/A.
 * @customfunction COV
 * @helpurl https://localhost:3000/help.html#lsqcov
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [headers] TRUE to add a header row (and, for per-parameter results, a first column of term names); FALSE (default) for numbers only.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns A square table, one row and column per parameter.
 */
export function cov(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, headers: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("COV", invocation, { y, x, weights, intercept, degree, headers, weighting }, (a, ctx) => L.cov(a as never, ctx));
}

/**
 * Parameter table: for each parameter its estimate, standard error, t statistic, two-sided p-value, and lower and upper confidence limits.
 * @customfunction PARAMS
 * @helpurl https://localhost:3000/help.html#lsqparams
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [level] Confidence level for the limits, between 0 and 1 (default 0.95).
 * @param [headers] TRUE to add a header row (and, for per-parameter results, a first column of term names); FALSE (default) for numbers only.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One row per parameter, six columns.
 */
export function params(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, level: any, headers: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("PARAMS", invocation, { y, x, weights, intercept, degree, level, headers, weighting }, (a, ctx) => L.params(a as never, ctx));
}

/**
 * Fit summary, 15 labelled rows: observations used and skipped, parameters, rank, residual degrees of freedom, residual sum of squares, residual standard error, R², adjusted R², F and its p-value, condition number, log-likelihood, AIC, BIC.
 * @customfunction STATS
 * @helpurl https://localhost:3000/help.html#lsqstats
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns 15 rows of label and value.
 */
export function stats(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("STATS", invocation, { y, x, weights, intercept, degree, weighting }, (a, ctx) => L.stats(a as never, ctx));
}

/**
 * Predictions at new x rows; optionally with a confidence interval for the mean response or a prediction interval for a new observation.
 * @customfunction PREDICT
 * @helpurl https://localhost:3000/help.html#lsqpredict
 * @param newx The new rows to predict at: the same columns as x.
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [interval] "confidence" (mean response) or "prediction" (a new observation) to add lower and upper limits.
 * @param [level] Confidence level for the limits, between 0 and 1 (default 0.95).
 * @param [headers] TRUE to add a header row (and, for per-parameter results, a first column of term names); FALSE (default) for numbers only.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One prediction per new row; with an interval, three columns: prediction, lower, upper.
 */
export function predict(newx: any[][], y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, interval: any, level: any, headers: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("PREDICT", invocation, { newx, y, x, weights, intercept, degree, interval, level, headers, weighting }, (a, ctx) => L.predict(a as never, ctx));
}

/**
 * Influence of each row: leverage, standardized residual, studentized (deleted) residual and Cook's distance, one row per input row.
 * @customfunction INFLUENCE
 * @helpurl https://localhost:3000/help.html#lsqinfluence
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [headers] TRUE to add a header row (and, for per-parameter results, a first column of term names); FALSE (default) for numbers only.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One row per input row, four columns.
 */
export function influence(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, headers: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("INFLUENCE", invocation, { y, x, weights, intercept, degree, headers, weighting }, (a, ctx) => L.influence(a as never, ctx));
}

/**
 * Plain-language check of the fit: dependent or nearly dependent columns, skipped rows, too few rows, exact fits, curvature the model misses, unusual rows, and new points outside the data. One line when nothing was found.
 * @customfunction CHECK
 * @helpurl https://localhost:3000/help.html#lsqcheck
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [weights] Optional, one per row: relative weights, zero or positive (a zero-weight row takes no part in the fit but still gets a fitted value and residual), or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @param [newx] Optional: new x rows you predict at (PREDICT's newx), checked for extrapolation.
 * @param [newy] Optional: readings you read back (INVERSE's newy), checked against the calibrated range.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns A column of findings.
 */
export function check(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, weighting: any, newx: any[][], newy: any[][], invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("CHECK", invocation, { y, x, weights, intercept, degree, weighting, newx, newy }, (a, ctx) => L.check(a as never, ctx));
}

/**
 * Reads unknown samples back from a calibration curve: for each reading, the estimated x, its standard uncertainty, and lower and upper limits (the prediction band inverted).
 * @customfunction INVERSE
 * @helpurl https://localhost:3000/help.html#lsqinverse
 * @param newy The readings of the unknown samples (each the mean of `replicates` readings).
 * @param y The measured responses of the standards: one column (or one row) of numbers.
 * @param x The known values of the standards: as many rows as y, one column.
 * @param [weights] Optional, one per row: relative weights, zero or positive, or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree of the calibration curve: 1 (default, a straight line) to 20.
 * @param [level] Confidence level for the limits, between 0 and 1 (default 0.95).
 * @param [replicates] How many readings were averaged into each value of newy (default 1).
 * @param [ureading] With weighting "uncertainty": the standard uncertainty of one reading.
 * @param [headers] TRUE to add a header row; FALSE (default) for numbers only.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One row per reading, four columns: x, standard uncertainty, lower limit, upper limit.
 */
export function inverse(newy: any[][], y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, level: any, replicates: any, ureading: any, headers: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("INVERSE", invocation, { newy, y, x, weights, intercept, degree, level, replicates, ureading, headers, weighting }, (a, ctx) => C.inverseFn(a as never, ctx));
}

/**
 * Decision limit, limit of detection and limit of quantitation of a straight-line calibration (DIN 32645 / ISO 11843-2 calibration-line method, or the ICH Q2 convention), as a labelled table.
 * @customfunction LIMITS
 * @helpurl https://localhost:3000/help.html#lsqlimits
 * @param y The measured responses of the standards: one column (or one row) of numbers.
 * @param x The known values of the standards: as many rows as y, one column.
 * @param [weights] Optional, one per row: relative weights, zero or positive, or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree of the calibration curve: 1 (default, a straight line) to 20.
 * @param [method] "calibration" (default: DIN 32645 / ISO 11843-2) or "ich" (3.3·s/slope and 10·s/slope).
 * @param [alpha] False positive rate α, between 0 and 0.5 (default 0.01).
 * @param [beta] False negative rate β, between 0 and 0.5 (default: alpha).
 * @param [k] Quantitation factor k, the inverse of the relative uncertainty required at the quantitation limit (default 3).
 * @param [samples] Measurements made on each sample (default 1).
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns 9 rows of label and value.
 */
export function limits(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, method: any, alpha: any, beta: any, k: any, samples: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("LIMITS", invocation, { y, x, weights, intercept, degree, method, alpha, beta, k, samples, weighting }, (a, ctx) => C.limitsFn(a as never, ctx));
}

/**
 * Tests of the model itself, as a labelled table: lack of fit against pure error (when x values repeat), χ² (with known uncertainties) and a test for curvature the model misses.
 * @customfunction GOF
 * @helpurl https://localhost:3000/help.html#lsqgof
 * @param y The measured responses of the standards: one column (or one row) of numbers.
 * @param x The known values of the standards: as many rows as y, one column.
 * @param [weights] Optional, one per row: relative weights, zero or positive, or the standard uncertainties of y when weighting is "uncertainty".
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [degree] Polynomial degree of the calibration curve: 1 (default, a straight line) to 20.
 * @param [weighting] What the weights range holds: "relative" (default) or "uncertainty" (standard uncertainties of y: weights 1/u², no rescaling by the residual scatter, normal-distribution limits).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns 13 rows of label and value.
 */
export function gof(y: any[][], x: any[][], weights: any[][], intercept: any, degree: any, weighting: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("GOF", invocation, { y, x, weights, intercept, degree, weighting }, (a, ctx) => C.gofFn(a as never, ctx));
}

/**
 * A straight line when x and y both carry known standard uncertainties (generalized distance regression, York's method; ISO/TS 28037 clause 7): intercept and slope with their uncertainties and limits, their covariance, χ² and its p-value, as a labelled table.
 * @customfunction LINEXY
 * @helpurl https://localhost:3000/help.html#lsqlinexy
 * @param y The measured y values: one column (or one row) of numbers.
 * @param x The measured x values: as many as y.
 * @param uy Standard uncertainty of each y value: one per row, or a single value for all rows.
 * @param ux Standard uncertainty of each x value: one per row, or a single value for all rows (0 where x is exact).
 * @param [correlation] Correlation between the x and y errors of each row: one per row or a single value (default 0).
 * @param [level] Confidence level for the limits, between 0 and 1 (default 0.95).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns 10 rows × 5 columns: a header row, then intercept, slope, covariance, χ², degrees of freedom, p-value, iterations, rows used and skipped.
 */
export function linexy(y: any[][], x: any[][], uy: any[][], ux: any[][], correlation: any[][], level: any, invocation: CustomFunctions.Invocation): any[][] {
  return <any[][]>L.invoke("LINEXY", invocation, { y, x, uy, ux, correlation, level }, (a, ctx) => C.linexyFn(a as never, ctx));
}

publishEngine(associateWithHost);
