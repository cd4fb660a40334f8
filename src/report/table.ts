/**
 * Plain-text tables for the terminal: columns padded to their widest cell, numbers right-aligned.
 */

/** A column of a text table. */
export interface TextColumn {
  /** Header text. */
  header: string;
  /** Right-align (numbers) or left-align (text, default). */
  align?: 'left' | 'right';
}

/**
 * Formats rows as an aligned text table with a header rule.
 *
 * @param columns - headers and alignment
 * @param rows - cell texts, one array per row
 * @returns lines joined with newlines, no trailing newline
 */
export function formatTextTable(
  columns: readonly TextColumn[],
  rows: readonly (readonly string[])[],
): string {
  const widths = columns.map((column, i) =>
    Math.max(column.header.length, ...rows.map((row) => (row[i] ?? '').length)),
  );
  const line = (cells: readonly string[]): string =>
    cells
      .map((cell, i) =>
        columns[i]?.align === 'right' ? cell.padStart(widths[i] as number) : cell.padEnd(widths[i] as number),
      )
      .join('  ')
      .trimEnd();
  return [
    line(columns.map((c) => c.header)),
    widths.map((w) => '─'.repeat(w)).join('  '),
    ...rows.map(line),
  ].join('\n');
}

/**
 * Formats a number with a given count of significant digits, without exponent for ordinary
 * magnitudes, and `−` for negatives kept ASCII `-` (scripts parse our text too).
 *
 * @param value - the number
 * @param digits - significant digits (default 4)
 */
export function formatNumber(value: number, digits = 4): string {
  if (!Number.isFinite(value)) return String(value);
  if (value === 0) return '0';
  const magnitude = Math.abs(value);
  if (magnitude >= 1e-4 && magnitude < 1e7) {
    const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(magnitude)));
    return value.toFixed(Math.min(decimals, 12));
  }
  return value.toExponential(digits - 1);
}
