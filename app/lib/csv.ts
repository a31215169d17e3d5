// CSV for spreadsheets, safe to open: RFC 4180 quoting, and no cell a
// spreadsheet would run as a formula. Following OWASP's "CSV Injection" guidance
// (owasp.org/www-community/attacks/CSV_Injection), a text cell that starts with
// = + - @, a tab or a carriage return gets a leading single quote, so it shows as
// the text it is. Numbers stay numbers (a negative reading stays -0.5).

const FORMULA_START = /^[=+\-@\t\r]/;

export function csvCell(value: unknown): string {
  if (value === null || value === undefined) return "";
  let s = typeof value === "number" ? (Number.isFinite(value) ? String(value) : "") : String(value);
  if (typeof value !== "number" && FORMULA_START.test(s)) s = `'${s}`;
  return /[",\n\r]/.test(s) || s !== s.trim() || s.startsWith("'") ? `"${s.replace(/"/g, '""')}"` : s;
}

export const csvLine = (cells: unknown[]) => cells.map(csvCell).join(",");

/** The whole file: lines joined with CRLF, as RFC 4180 says. */
export const csvFile = (rows: unknown[][]) => rows.map(csvLine).join("\r\n") + "\r\n";
