/** Column alignment: numbers right, words left. */
export type Align = 'left' | 'right';

/**
 * An aligned plain-text table: a header row, a rule, the rows. Columns are padded to their
 * widest cell; `align` gives each column's side (default: first left, the rest right).
 */
export function renderTable(header: readonly string[], rows: readonly (readonly string[])[], align?: readonly Align[]): string {
  const widths = header.map((h, c) => Math.max(h.length, ...rows.map((r) => (r[c] ?? '').length)));
  const side = (c: number): Align => align?.[c] ?? (c === 0 ? 'left' : 'right');
  const line = (cells: readonly string[]): string =>
    cells
      .map((cell, c) => (side(c) === 'left' ? cell.padEnd(widths[c]!) : cell.padStart(widths[c]!)))
      .join('  ')
      .trimEnd();
  return [line(header), widths.map((w) => '-'.repeat(w)).join('  '), ...rows.map(line)].join('\n');
}

/** Label/value pairs, the labels padded to one width. */
export function renderPairs(pairs: readonly (readonly [string, string])[]): string {
  const w = Math.max(...pairs.map(([k]) => k.length));
  return pairs.map(([k, v]) => `${k.padEnd(w)}  ${v}`).join('\n');
}
