/**
 * CSV per RFC 4180 (CRLF line ends; a cell with a comma, quote or line break is quoted, quotes doubled).
 * A cell that a spreadsheet would read as a formula (starting with = + - @, or a tab or carriage
 * return) gets a leading apostrophe, as the OWASP "CSV injection" guidance recommends.
 */
export function csvCell(value: unknown): string {
  let text = value === null || value === undefined ? '' : String(value);
  if (/^[=+\-@\t\r]/.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

export function toCsv(header: readonly string[], rows: ReadonlyArray<ReadonlyArray<unknown>>): string {
  return [header, ...rows].map((row) => row.map(csvCell).join(',')).join('\r\n') + '\r\n';
}
