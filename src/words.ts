/**
 * How numbers and lists are written in messages and notes, in one place so every stage quotes a
 * value the same way. (Result tables round to what a standard error supports; that is the
 * report's business, not this module's.)
 */

/**
 * A number to `digits` significant digits without trailing zeros, as people write test values:
 * `significantDigits(0.031234, 3)` is `0.0312`, `significantDigits(5, 3)` is `5`. Non-finite
 * values print as JavaScript writes them (`NaN`, `Infinity`).
 *
 * @param value - the number
 * @param digits - significant digits, 1 to 100 (default 4)
 */
export function significantDigits(value: number, digits = 4): string {
  if (!Number.isFinite(value)) return String(value);
  return String(Number(value.toPrecision(digits)));
}

/**
 * Three significant digits, or the exponent form with two for very large or very small values
 * (`1.2e5`, `3.4e-3`), and `infinite` for ±∞ or NaN: for condition numbers and ratios in
 * messages, where the size matters more than the digits.
 *
 * @param value - the number
 */
export function compactNumber(value: number): string {
  if (!Number.isFinite(value)) return 'infinite';
  const size = Math.abs(value);
  return size >= 1e5 || (size < 1e-2 && value !== 0) ? exponentText(value) : significantDigits(value, 3);
}

/**
 * Two significant digits in exponent form without the plus sign (`1.2e5`), `infinite` for ±∞ or
 * NaN.
 *
 * @param value - the number
 */
export function exponentText(value: number): string {
  if (!Number.isFinite(value)) return 'infinite';
  return value.toExponential(1).replace('e+', 'e');
}

/**
 * Names joined as a sentence lists them: "CO", "CO and N2O", "CO, N2O and H2O".
 *
 * @param names - the names, in order
 */
export function listNames(names: readonly string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}
