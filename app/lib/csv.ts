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

// The same cells written by PostgreSQL, so a long export is made as text by the database and
// only passed along here. Each function takes an SQL expression and gives an SQL expression of
// the cell's text, equal to csvCell of the value the driver would have handed to JavaScript.

/** JavaScript's whitespace, which String.prototype.trim removes (ECMA-262 WhiteSpace and LineTerminator). */
const JS_SPACE = "\\t\\n\\v\\f\\r \\u00a0\\u1680\\u2000-\\u200a\\u2028\\u2029\\u202f\\u205f\\u3000\\ufeff";
/** A text cell that csvCell quotes: a formula start or a quote mark first, a quote, comma or line break inside, or space at either end. */
const NEEDS_QUOTES = `^[=+\\-@''${JS_SPACE}]|[",\\n\\r]|[${JS_SPACE}]$`;

/** csvCell of a text value (null gives an empty cell). */
export function csvTextSql(expr: string): string {
  return `(case when (${expr}) is null then '' when (${expr}) ~ '${NEEDS_QUOTES}' then '"' || (case when (${expr}) ~ '^[=+\\-@\\t\\r]' then '''' else '' end) || replace(${expr}, '"', '""') || '"' else (${expr}) end)`;
}

/**
 * csvCell of a float8 value: JavaScript's Number-to-String (ECMA-262 Number::toString) from
 * PostgreSQL's shortest round-trip digits. Plain decimals between 1e-4 and 1e15 read the same in
 * both; outside that PostgreSQL writes an exponent ("1e-05", "1.5e+15") that is rewritten the way
 * JavaScript writes it ("0.00001", "1500000000000000", "1e-7", "1e+21"). Null, NaN and the
 * infinities give an empty cell, and minus zero "0", as csvCell does. Exact for every value below
 * 2^53 in size; above that PostgreSQL may write a whole number with more digits than JavaScript
 * would (17 significant digits, the same number), far beyond any reading or amount.
 */
export function csvNumberSql(expr: string): string {
  const rewrite = `(select case
      when m.e between -6 and 20 then m.sg || case
        when m.e < 0 then '0.' || repeat('0', -m.e - 1) || m.d
        when m.e >= length(m.d) - 1 then m.d || repeat('0', m.e - length(m.d) + 1)
        else left(m.d, m.e + 1) || '.' || substr(m.d, m.e + 2) end
      else m.sg || left(m.d, 1) || case when length(m.d) > 1 then '.' || substr(m.d, 2) else '' end || 'e' || case when m.e < 0 then '-' else '+' end || abs(m.e)::text
    end
    from (select case when s.t like '-%' then '-' else '' end as sg, replace(split_part(ltrim(s.t, '-'), 'e', 1), '.', '') as d, split_part(s.t, 'e', 2)::int as e) m)`;
  // Most values take the second branch (PostgreSQL orders NaN above every number, so NaN and the
  // infinities fall through to their own branch).
  return `(case when (${expr}) is null then ''
    when abs(${expr}) >= 1e-4 and abs(${expr}) < 1e15 then (${expr})::text
    when (${expr}) = 0 then '0'
    when (${expr}) in ('NaN'::float8, 'Infinity'::float8, '-Infinity'::float8) then ''
    else (select case when strpos(s.t, 'e') = 0 then s.t else ${rewrite} end from (select (${expr})::text as t) s) end)`;
}
