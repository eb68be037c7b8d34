// Writing CSV: fields quoted as RFC 4180 asks (when they hold the delimiter, a quote or a line break).

export function csvField(value: string, delimiter = ','): string {
  if (value.includes(delimiter) || value.includes('"') || value.includes('\n') || value.includes('\r')) {
    return `"${value.replace(/"/g, '""')}"`;
  }
  return value;
}

export function csvLine(fields: readonly string[], delimiter = ','): string {
  return fields.map((f) => csvField(f, delimiter)).join(delimiter) + '\n';
}
