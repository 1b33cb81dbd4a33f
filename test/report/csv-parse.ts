/** Test helper: a small CSV reader following RFC 4180 (Shafranovich 2005): comma-separated, optional double-quoted
 *  fields, a doubled quote inside quotes stands for one quote, records end with a line break. */
export function parseCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let field = '';
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') {
        field += '"';
        i++;
      } else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') {
      row.push(field);
      field = '';
    } else if (c === '\n' || c === '\r') {
      if (c === '\r' && text[i + 1] === '\n') i++;
      row.push(field);
      rows.push(row);
      row = [];
      field = '';
    } else field += c;
  }
  if (field !== '' || row.length > 0) {
    row.push(field);
    rows.push(row);
  }
  return rows;
}

/** Rows as objects keyed by the header row. */
export function csvRecords(text: string): { header: string[]; records: Record<string, string>[] } {
  const [header, ...rows] = parseCsv(text);
  return { header, records: rows.map((r) => Object.fromEntries(header.map((h, i) => [h, r[i]]))) };
}
