/**
 * Rows of a pasted read-out for the JSON import body: a JSON array (or object) as is, or CSV
 * with a header line, split on commas (or semicolons when the header has no comma). Quoted
 * values with commas inside are read; the server checks every value.
 */
export function rowsFromPastedText(text: string): unknown[] {
  const trimmed = text.trim();
  if (!trimmed) return [];
  if (trimmed.startsWith('[') || trimmed.startsWith('{')) {
    const parsed: unknown = JSON.parse(trimmed);
    if (Array.isArray(parsed)) return parsed;
    const rows = (parsed as { rows?: unknown }).rows;
    return Array.isArray(rows) ? rows : [parsed];
  }
  const lines = trimmed.split(/\r?\n/).filter((line) => line.trim() !== '');
  const separator = lines[0].includes(',') ? ',' : ';';
  const header = splitLine(lines[0], separator).map((h) => h.trim());
  return lines.slice(1).map((line) => {
    const values = splitLine(line, separator);
    const row: Record<string, string> = {};
    header.forEach((name, i) => {
      row[name] = (values[i] ?? '').trim();
    });
    return row;
  });
}

function splitLine(line: string, separator: string): string[] {
  const out: string[] = [];
  let current = '';
  let quoted = false;
  for (let i = 0; i < line.length; i += 1) {
    const char = line[i];
    if (char === '"') {
      if (quoted && line[i + 1] === '"') {
        current += '"';
        i += 1;
      } else quoted = !quoted;
    } else if (char === separator && !quoted) {
      out.push(current);
      current = '';
    } else current += char;
  }
  out.push(current);
  return out;
}
