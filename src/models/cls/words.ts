/** Numbers and lists as the CLS messages quote them. */

/**
 * Three significant digits, exponent form for very large or small values, `infinite` for ±∞.
 *
 * @param value - the number
 */
export function formatNumber(value: number): string {
  if (!Number.isFinite(value)) return 'infinite';
  const size = Math.abs(value);
  return size >= 1e5 || (size < 1e-2 && value !== 0)
    ? value.toExponential(1).replace('e+', 'e')
    : String(Number(value.toPrecision(3)));
}

/**
 * Names joined as a sentence lists them: "CO", "CO and N2O", "CO, N2O and H2O".
 *
 * @param names - the names, in order
 */
export function listNames(names: readonly string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]!}`;
}
