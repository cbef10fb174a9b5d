/**
 * LSQ custom functions: the entry file read by the metadata generator. Each function's JSDoc
 * becomes its description and parameter help in the formula autocomplete; ids, parameter
 * names and order are frozen (test/metadata.test.ts) because shared workbooks depend on them.
 *
 * Optional arguments arrive as null when omitted. The last parameter is the host's invocation
 * object (calling-cell and argument addresses, recorded for the task pane).
 */
/* global CustomFunctions */
import * as L from "./lsq";
import { recordCall } from "./registry";

type Inv = CustomFunctions.Invocation;

function note(fn: string, inv: Inv | undefined, args: unknown[]): void {
  if (!inv || typeof inv.address !== "string") return;
  recordCall({ fn, address: inv.address, parameterAddresses: inv.parameterAddresses ?? [], args, at: Date.now() });
}

/**
 * Least-squares coefficients: the intercept first, then one per x column (or per power of x). A coefficient that cannot be estimated shows #N/A and says which columns it depends on.
 * @customfunction COEF
 * @helpurl https://localhost:3000/help.html#lsqcoef
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One estimate per parameter, in a column.
 */
export function coef(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, invocation: CustomFunctions.Invocation): any[][] {
  note("COEF", invocation, [y, x, intercept, weights, degree]);
  return L.guard(() => L.coef(y, x, intercept, weights, degree));
}

/**
 * Fitted values: the part of y the model explains (its projection onto the x columns), one per input row. Skipped rows show #N/A.
 * @customfunction FITTED
 * @helpurl https://localhost:3000/help.html#lsqfitted
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One fitted value per input row.
 */
export function fitted(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, invocation: CustomFunctions.Invocation): any[][] {
  note("FITTED", invocation, [y, x, intercept, weights, degree]);
  return L.guard(() => L.fitted(y, x, intercept, weights, degree));
}

/**
 * Residuals: y minus the fitted value, one per input row. Skipped rows show #N/A.
 * @customfunction RESID
 * @helpurl https://localhost:3000/help.html#lsqresid
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One residual per input row.
 */
export function resid(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, invocation: CustomFunctions.Invocation): any[][] {
  note("RESID", invocation, [y, x, intercept, weights, degree]);
  return L.guard(() => L.resid(y, x, intercept, weights, degree));
}

/**
 * Covariance matrix of the estimates (their variances on the diagonal). Rows and columns of coefficients that cannot be estimated show #N/A.
 * @customfunction COV
 * @helpurl https://localhost:3000/help.html#lsqcov
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns A square table, one row and column per parameter.
 */
export function cov(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, invocation: CustomFunctions.Invocation): any[][] {
  note("COV", invocation, [y, x, intercept, weights, degree]);
  return L.guard(() => L.cov(y, x, intercept, weights, degree));
}

/**
 * Parameter table: for each parameter its estimate, standard error, t statistic, two-sided p-value, and lower and upper confidence limits.
 * @customfunction PARAMS
 * @helpurl https://localhost:3000/help.html#lsqparams
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [level] Confidence level for the limits, between 0 and 1 (default 0.95).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One row per parameter, six columns.
 */
export function params(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, level: any, invocation: CustomFunctions.Invocation): any[][] {
  note("PARAMS", invocation, [y, x, intercept, weights, degree, level]);
  return L.guard(() => L.params(y, x, intercept, weights, degree, level));
}

/**
 * Fit summary, 15 labelled rows: observations used and skipped, parameters, rank, residual degrees of freedom, residual sum of squares, residual standard error, R², adjusted R², F and its p-value, condition number, log-likelihood, AIC, BIC.
 * @customfunction STATS
 * @helpurl https://localhost:3000/help.html#lsqstats
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns 15 rows of label and value.
 */
export function stats(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, invocation: CustomFunctions.Invocation): any[][] {
  note("STATS", invocation, [y, x, intercept, weights, degree]);
  return L.guard(() => L.stats(y, x, intercept, weights, degree));
}

/**
 * Predictions at new x rows; optionally with a confidence interval for the mean response or a prediction interval for a new observation.
 * @customfunction PREDICT
 * @helpurl https://localhost:3000/help.html#lsqpredict
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param newx The new rows to predict at: same columns as x.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @param [interval] "confidence" (mean response) or "prediction" (a new observation) to add lower and upper limits.
 * @param [level] Confidence level for the limits, between 0 and 1 (default 0.95).
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One prediction per new row; with an interval, three columns: prediction, lower, upper.
 */
export function predict(y: any[][], x: any[][], newx: any[][], intercept: any, weights: any[][], degree: any, interval: any, level: any, invocation: CustomFunctions.Invocation): any[][] {
  note("PREDICT", invocation, [y, x, newx, intercept, weights, degree, interval, level]);
  return L.guard(() => L.predict(y, x, newx, intercept, weights, degree, interval, level));
}

/**
 * Influence of each row: leverage, standardized residual, studentized (deleted) residual and Cook's distance, one row per input row.
 * @customfunction INFLUENCE
 * @helpurl https://localhost:3000/help.html#lsqinfluence
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns One row per input row, four columns.
 */
export function influence(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, invocation: CustomFunctions.Invocation): any[][] {
  note("INFLUENCE", invocation, [y, x, intercept, weights, degree]);
  return L.guard(() => L.influence(y, x, intercept, weights, degree));
}

/**
 * Plain-language check of the fit: dependent or nearly dependent columns, skipped rows, too few rows, exact fits, unusual rows. One line when nothing was found.
 * @customfunction CHECK
 * @helpurl https://localhost:3000/help.html#lsqcheck
 * @param y The observations: one column (or one row) of numbers.
 * @param x The predictors: as many rows as y, one column per predictor.
 * @param [intercept] TRUE (default) to include a constant term; FALSE to fit through zero.
 * @param [weights] Optional weights, one per row, zero or positive. A zero weight leaves the row out.
 * @param [degree] Polynomial degree in a single x column: 1 (default) to 20.
 * @requiresAddress
 * @requiresParameterAddresses
 * @returns A column of findings.
 */
export function check(y: any[][], x: any[][], intercept: any, weights: any[][], degree: any, invocation: CustomFunctions.Invocation): any[][] {
  note("CHECK", invocation, [y, x, intercept, weights, degree]);
  return L.guard(() => L.check(y, x, intercept, weights, degree));
}
