/**
 * Pasted data for the preview: rows of cells separated by tabs, semicolons or commas, the first
 * column y. What the parser decided is said in `notes`, in plain words:
 * - a first row of numbers is data, not a header (the columns are then named y, x1, x2, …);
 * - with tabs or semicolons between cells, numbers written with a decimal comma (1,5 or −0,25)
 *   are read as decimal numbers (the European convention, as spreadsheets copy them);
 * - cells that are still text are kept as text (their rows are skipped, with the reason).
 */
export interface Table {
  readonly header: string[];
  readonly rows: (number | string | null)[][];
  /** What the parser decided, for the user. */
  readonly notes: string[];
}

const NUMBER = /^[-+−]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;
const DECIMAL_COMMA = /^[-+−]?\d+,\d+([eE][-+]?\d+)?$/;

function toNumber(c: string, decimalComma: boolean): number | null {
  let t = c.replace(/^−/, "-");
  if (decimalComma && DECIMAL_COMMA.test(t)) t = t.replace(",", ".");
  if (!NUMBER.test(t)) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}

/** Split text into a table. Cells that are numbers become numbers; empty cells null; the rest text. */
export function parseTable(text: string): Table {
  const lines = text
    .replace(/\r\n?/g, "\n")
    .split("\n")
    .filter((l) => l.trim() !== "");
  const notes: string[] = [];
  if (lines.length === 0) return { header: [], rows: [], notes };
  const sep = lines.some((l) => l.includes("\t")) ? "\t" : lines.some((l) => l.includes(";")) ? ";" : ",";
  const split = (l: string): string[] => l.split(sep).map((c) => c.trim().replace(/^"(.*)"$/, "$1"));
  const cells = lines.map(split);
  // Decimal commas: only when commas do not separate cells.
  const decimalComma = sep !== "," && cells.some((r) => r.some((c) => DECIMAL_COMMA.test(c)));
  if (decimalComma) notes.push("Numbers written with a decimal comma (such as 1,5) were read as decimal numbers.");
  const first = cells[0]!;
  const firstIsData = first.length > 0 && first.every((c) => c === "" || toNumber(c, decimalComma) !== null) && first.some((c) => c !== "");
  const width = Math.max(...cells.map((r) => r.length));
  let header: string[];
  let body: string[][];
  if (firstIsData) {
    header = Array.from({ length: width }, (_, j) => (j === 0 ? "y" : width === 2 ? "x" : `x${j}`));
    body = cells;
    notes.push(`The first row holds numbers, so it was read as data, not as a header; the columns are named ${header.join(", ")}.`);
  } else {
    header = Array.from({ length: width }, (_, j) => first[j] ?? "");
    body = cells.slice(1);
  }
  const rows = body.map((r) => {
    const out: (number | string | null)[] = [];
    for (let j = 0; j < width; j++) {
      const c = r[j] ?? "";
      if (c === "") out.push(null);
      else {
        const v = toNumber(c, decimalComma);
        out.push(v === null ? c : v);
      }
    }
    return out;
  });
  const textCells = rows.reduce((s, r) => s + r.filter((c) => typeof c === "string").length, 0);
  if (textCells > 0 && !decimalComma && sep === "," && rows.some((r) => r.some((c) => typeof c === "string" && /^\d+,\d+$/.test(c))))
    notes.push("Some cells look like numbers with a decimal comma; separate cells with tabs or semicolons so the commas can be read as decimal points.");
  return { header, rows, notes };
}
