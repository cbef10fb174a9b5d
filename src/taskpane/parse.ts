/** Parsing pasted tab- or comma-separated data with a header row (first column y). */
export interface Table {
  readonly header: string[];
  readonly rows: (number | string | null)[][];
}

/** Split text into a table. Cells that are numbers become numbers; empty cells null; the rest text. */
export function parseTable(text: string): Table {
  const lines = text.replace(/\r\n?/g, "\n").split("\n").filter((l) => l.trim() !== "");
  if (lines.length === 0) return { header: [], rows: [] };
  const sep = lines[0]!.includes("\t") ? "\t" : lines[0]!.includes(";") && !lines[0]!.includes(",") ? ";" : ",";
  const split = (l: string): string[] => l.split(sep).map((c) => c.trim().replace(/^"(.*)"$/, "$1"));
  const header = split(lines[0]!);
  const width = header.length;
  const rows = lines.slice(1).map((l) => {
    const cells = split(l);
    const out: (number | string | null)[] = [];
    for (let j = 0; j < width; j++) {
      const c = cells[j] ?? "";
      if (c === "") out.push(null);
      else {
        const v = Number(c);
        out.push(Number.isFinite(v) && /^[-+]?(\d|\.\d)/.test(c) ? v : c);
      }
    }
    return out;
  });
  return { header, rows };
}
