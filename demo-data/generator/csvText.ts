// RFC 4180 fields: a field holding a comma, a double quote or a line break is enclosed in
// double quotes, with each double quote inside doubled. Lines end with LF.

export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

export function csvLine(fields: string[]): string {
  return fields.map(csvField).join(',') + '\n';
}
