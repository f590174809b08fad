/** Building CSV text (RFC 4180: comma-separated, CRLF line ends, fields with quotes, commas or line breaks quoted). */

export type CsvCell = string | number | null | undefined;

function field(value: CsvCell): string {
  if (value === null || value === undefined) return '';
  const text = String(value);
  // A leading =, +, - or @ makes spreadsheets evaluate the cell; a quote mark in front keeps notes typed by people inert.
  const safe = typeof value === 'string' && /^[=+\-@]/.test(text) ? `'${text}` : text;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** Returns CSV text of a header row and data rows. */
export function toCsv(header: string[], rows: CsvCell[][]): string {
  return [header, ...rows].map((row) => row.map(field).join(',')).join('\r\n') + '\r\n';
}
