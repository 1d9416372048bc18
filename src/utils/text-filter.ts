/**
 * Case- and accent-insensitive "contains" filter over the given text fields of each row,
 * used by the tables' filter boxes. Every word of the query must appear in one of the fields.
 */
export function normalizeText(value: string): string {
  return value.normalize('NFD').replace(/\p{M}/gu, '').toLowerCase();
}

export function filterRows<T>(rows: readonly T[], query: string, fields: (row: T) => (string | number | null | undefined)[]): T[] {
  const words = normalizeText(query).split(/\s+/).filter(Boolean);
  if (words.length === 0) return [...rows];
  return rows.filter((row) => {
    const haystack = normalizeText(fields(row).filter((v) => v !== null && v !== undefined).join(' '));
    return words.every((word) => haystack.includes(word));
  });
}
