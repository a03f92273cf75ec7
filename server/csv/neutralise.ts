/**
 * Formula injection guard for CSV files. A spreadsheet treats a cell that starts with =, +, -, @,
 * a tab or a carriage return as a formula; prefixing a single quote makes it plain text. Every CSV
 * Orrery writes goes through `toCsv`, and text read from an uploaded CSV is stored neutralised.
 */

const FORMULA_START = /^[=+\-@\t\r]/;

export function startsLikeFormula(value: string): boolean {
  return FORMULA_START.test(value);
}

/** The cell as text a spreadsheet will not evaluate. Already neutralised cells are left alone. */
export function neutralise(value: string): string {
  return startsLikeFormula(value) ? `'${value}` : value;
}

function quote(cell: string): string {
  return /[",\r\n]/.test(cell) ? `"${cell.replace(/"/g, '""')}"` : cell;
}

export type CsvCell = string | number | boolean | null | undefined | Date;

function cellText(value: CsvCell): string {
  if (value === null || value === undefined) return '';
  if (value instanceof Date) return value.toISOString();
  // Numbers are written as numbers: a negative number is data, not a formula.
  if (typeof value === 'number') return Number.isFinite(value) ? String(value) : '';
  if (typeof value === 'boolean') return value ? 'true' : 'false';
  return neutralise(value);
}

/** One CSV document (header row first, CRLF line ends as RFC 4180 says), every text cell neutralised. */
export function toCsv(header: string[], rows: CsvCell[][]): string {
  const lines = [header.map((h) => quote(neutralise(h))), ...rows.map((row) => row.map((cell) => quote(cellText(cell))))];
  return lines.map((cells) => cells.join(',')).join('\r\n') + '\r\n';
}
