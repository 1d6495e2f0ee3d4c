/**
 * A spreadsheet runs a cell that begins with `=`, `+`, `-` or `@` (and some also after a leading
 * tab or carriage return) as a formula: a note such as `=HYPERLINK("http://…"&B2,"Gate OK")` would
 * become a live link reading other cells. Such a cell is written with a leading single quote, which
 * spreadsheets show as text; every other cell is left exactly as it was.
 */
const FORMULA_START = /^[=+\-@\t\r]/;

export function formulaSafeCell(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '';
  const text = String(value);
  return FORMULA_START.test(text) ? `'${text}` : text;
}

export const formulaSafeRow = (row: ReadonlyArray<string | number | boolean | null | undefined>): string[] => row.map(formulaSafeCell);
