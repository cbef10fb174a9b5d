/**
 * Spreadsheet error values. In the host, errors are CustomFunctions.Error objects (thrown for a
 * single-cell error, or placed inside a result array); outside the host (the preview page,
 * tests without the stand-in) a plain object with the same `code` and `message` is used.
 *
 * The hosts show a custom message only with #VALUE! and #N/A (Office Add-ins documentation, "Handle
 * and return errors from your custom function",
 * https://learn.microsoft.com/office/dev/add-ins/excel/custom-functions-errors), so those are the
 * only two codes the functions return: #VALUE! for an argument the user can correct, #N/A for a
 * result that does not exist (with the reason).
 */
export type ErrorCodeText = "#VALUE!" | "#N/A";

const CODE_NAME: Record<ErrorCodeText, string> = {
  "#VALUE!": "invalidValue",
  "#N/A": "notAvailable",
};

/** The host limits message length; keep messages short and whole. */
const MAX_MESSAGE = 250;

export interface CellErrorLike {
  readonly code: string;
  readonly message?: string;
}

export class PreviewCellError implements CellErrorLike {
  constructor(
    readonly code: ErrorCodeText,
    readonly message: string,
  ) {}
}

interface CustomFunctionsLike {
  Error: new (code: string, message?: string) => CellErrorLike;
  ErrorCode: Record<string, string>;
}

function host(): CustomFunctionsLike | null {
  const cf = (globalThis as { CustomFunctions?: CustomFunctionsLike }).CustomFunctions;
  return cf && typeof cf.Error === "function" && cf.ErrorCode ? cf : null;
}

/** Make an error value for a cell. */
export function cellError(code: ErrorCodeText, message: string): CellErrorLike {
  const msg = message.length > MAX_MESSAGE ? message.slice(0, MAX_MESSAGE - 1) + "…" : message;
  const cf = host();
  if (cf) return new cf.Error(cf.ErrorCode[CODE_NAME[code]] ?? code, msg);
  return new PreviewCellError(code, msg);
}

/** A thrown error that the functions layer turns into one spreadsheet error. */
export class SheetError extends Error {
  constructor(
    readonly code: ErrorCodeText,
    message: string,
  ) {
    super(message);
    this.name = "SheetError";
  }
}
