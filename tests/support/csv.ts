/** Reading the exports back in tests: RFC 4180 records after the UTF-8 BOM the exports start with. */

/** Records of a CSV text (quoted fields may hold commas, quotes and line breaks; records end in CRLF). */
export function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let field = '';
  let fields: string[] = [];
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') { field += '"'; i++; }
      else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"') quoted = true;
    else if (c === ',') { fields.push(field); field = ''; }
    else if (c === '\r' && text[i + 1] === '\n') { fields.push(field); records.push(fields); fields = []; field = ''; i++; }
    else field += c;
  }
  return records;
}

/** Records of an export, which must start with the BOM. */
export function exportRecords(text: string): string[][] {
  if (!text.startsWith('\uFEFF')) throw new Error(`The export does not start with a UTF-8 BOM: ${JSON.stringify(text.slice(0, 20))}`);
  return parseCsv(text.slice(1));
}
