/**
 * CSV for spreadsheets (RFC 4180, CRLF). A cell that a spreadsheet would read as a formula
 * (starting with =, +, -, @, tab or CR) gets a leading apostrophe: a client name typed as
 * `=HYPERLINK(…)` must not run in the office's spreadsheet.
 */
export type CsvCell = string | number | boolean | null | undefined;

export function csvCell(value: CsvCell): string {
  if (value === null || value === undefined) return '';
  let text = String(value);
  if (typeof value === 'string' && /^[=+\-@\t\r]/.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function csvRow(cells: readonly CsvCell[]): string {
  return `${cells.map(csvCell).join(',')}\r\n`;
}
