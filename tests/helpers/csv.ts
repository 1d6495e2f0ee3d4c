/** Reads CSV as RFC 4180 has it (quoted cells, doubled quotes, CRLF or LF), so tests see cells, not lines. */
export function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (c === '"') quoted = false;
      else cell += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      row.push(cell);
      cell = '';
    } else if (c === '\n' || c === '\r') {
      if (c === '\r' && text[i + 1] === '\n') i++;
      row.push(cell);
      rows.push(row);
      row = [];
      cell = '';
    } else cell += c;
  }
  if (cell !== '' || row.length) {
    row.push(cell);
    rows.push(row);
  }
  return rows;
}

/** Rows as objects keyed by the header, the trailer (a first cell starting with '#') set apart. */
export function csvRecords(text: string): { header: string[]; records: Array<Record<string, string>>; trailer: string[] | null } {
  const [header, ...rest] = parseCsv(text);
  const trailer = rest.length && rest[rest.length - 1][0].startsWith('#') ? rest.pop()! : null;
  return { header, records: rest.map((r) => Object.fromEntries(header.map((h, i) => [h, r[i] ?? '']))), trailer };
}
