/**
 * Loaded before functions.js on the pane page. Inside the spreadsheet host, office.js defines
 * CustomFunctions and this does nothing. In a plain browser (the preview) it defines a stand-in
 * whose associate() does nothing, so functions.js loads without error; cell errors then fall back
 * to plain objects (see src/functions/cellerror.ts).
 */
const g = globalThis as unknown as { CustomFunctions?: unknown };
if (typeof g.CustomFunctions === "undefined") g.CustomFunctions = { associate: (): void => undefined };
export {};
