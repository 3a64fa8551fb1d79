/**
 * CSV for export (RFC 4180: fields with a comma, quote or line break are quoted, quotes doubled). A cell
 * that starts with =, +, - or @ is prefixed with a single quote so a spreadsheet shows it as text instead
 * of running it as a formula (the OWASP "CSV injection" advice); tab and carriage return lead-ins too.
 */
export function csvCell(value: string | number | boolean | null | undefined): string {
  if (value === null || value === undefined) return '';
  let text = String(value);
  if (typeof value === 'string' && /^[=+\-@\t\r]/.test(text)) text = `'${text}`;
  return /[",\r\n]/.test(text) ? `"${text.replaceAll('"', '""')}"` : text;
}

/** A whole CSV document: a header line, then one line per row, CRLF between lines (RFC 4180). */
export function toCsv(
  header: readonly string[],
  rows: readonly (readonly (string | number | boolean | null | undefined)[])[],
): string {
  return [header, ...rows].map((r) => r.map(csvCell).join(',')).join('\r\n') + '\r\n';
}
