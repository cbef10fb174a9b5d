/**
 * The one error type the core throws. `where` names the argument (and, when known, the
 * row or column) so the functions layer can build a message that says what and where.
 * The functions layer alone maps `kind` to a spreadsheet error value.
 */
export type LsqErrorKind =
  /** An argument has the wrong shape or type (maps to #VALUE!, with the message). */
  | "shape"
  /** A number is outside the allowed range (maps to #VALUE!, with the message). */
  | "range";

export class LsqError extends Error {
  readonly kind: LsqErrorKind;
  constructor(kind: LsqErrorKind, message: string) {
    super(message);
    this.name = "LsqError";
    this.kind = kind;
  }
}

/** A quantity that is not defined for a particular fit, with the reason in plain words. */
export interface NotAvailable {
  readonly na: string;
}

/** A statistic: a finite number, or a documented reason why it is not available. */
export type Quantity = number | NotAvailable;

export function notAvailable(reason: string): NotAvailable {
  return { na: reason };
}
