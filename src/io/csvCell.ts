/**
 * A text cell for the CSV files Lamella writes (RFC 4180: quoted only when it holds a comma, a
 * quote or a line break, quotes doubled). Text that a spreadsheet would run as a formula — a cell
 * starting with `=`, `+`, `-`, `@`, a tab or a carriage return — gets a leading apostrophe, the
 * usual neutralisation (common practice, OWASP "CSV Injection"): spreadsheets show the text as it
 * was, and a program reading the file sees the apostrophe and can strip it. Only text cells go
 * through here; numbers Lamella formats itself (which may start with `-`) do not.
 */
export function csvText(text: string): string {
  const safe = /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
  return /[",\n\r]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}
