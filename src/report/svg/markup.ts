/**
 * Markup helpers shared by the SVG plots and the HTML report: escaping of user text, elements
 * built from attribute objects, coordinates rounded for compact output, and number text with one
 * minus sign throughout.
 *
 * Every piece of text that can come from a user (titles, lot numbers, file names, manifest cells,
 * gas names) goes through {@link escapeText} or an attribute of {@link element}, which escape the
 * five characters XML and HTML give meaning to (`& < > " '`). Nothing else is needed for element
 * content and quoted attribute values in either language (W3C XML 1.0 §2.4, HTML Living Standard
 * "escaping a string").
 */

/**
 * Escapes text for element content or a quoted attribute value in HTML or SVG.
 *
 * @param text - any text
 * @returns the text with `&`, `<`, `>`, `"` and `'` replaced by character references
 * @example
 * escapeText('<script>alert(1)</script>'); // '&lt;script&gt;alert(1)&lt;/script&gt;'
 */
export function escapeText(text: string): string {
  return text.replace(/[&<>"']/g, (character) => ESCAPES[character] as string);
}

const ESCAPES: Record<string, string> = {
  '&': '&amp;',
  '<': '&lt;',
  '>': '&gt;',
  '"': '&quot;',
  "'": '&#39;',
};

/** Attribute values: text (escaped), numbers (rounded), or absent (`undefined`/`false` omit the attribute). */
export type AttributeValue = string | number | undefined | false;

/**
 * Builds one element. Attribute names are written as given (they are ours, never user text);
 * values are escaped; numbers are rounded to 0.01 (see {@link coordinate}).
 *
 * @param name - element name, e.g. `line`
 * @param attributes - attribute values by name; `undefined` and `false` leave the attribute out
 * @param children - inner markup, already escaped (use {@link escapeText} for text); omitted makes an empty element
 * @returns the markup
 * @example
 * element('text', { x: 10, y: 20 }, escapeText('ppm')); // '<text x="10" y="20">ppm</text>'
 */
export function element(
  name: string,
  attributes: Readonly<Record<string, AttributeValue>> = {},
  children?: string,
): string {
  let text = `<${name}`;
  for (const [key, value] of Object.entries(attributes)) {
    if (value === undefined || value === false) continue;
    text += ` ${key}="${typeof value === 'number' ? coordinate(value) : escapeText(value)}"`;
  }
  return children === undefined ? `${text}/>` : `${text}>${children}</${name}>`;
}

/**
 * A coordinate or length for SVG: rounded to 0.01 (well below the 0.5 px any plot promises) with
 * trailing zeros dropped.
 *
 * @param value - user units (px at the plot's natural size)
 * @returns the number as text; non-finite values give `0` so a stray NaN cannot break the markup
 */
export function coordinate(value: number): string {
  if (!Number.isFinite(value)) return '0';
  const rounded = Math.round(value * 100) / 100;
  return String(rounded === 0 ? 0 : rounded);
}

/**
 * An SVG `transform` that moves a shape drawn around (0, 0), such as a marker, to a point.
 *
 * @param x - px
 * @param y - px
 * @returns e.g. `translate(12.5,40)`
 */
export function translate(x: number, y: number): string {
  return `translate(${coordinate(x)},${coordinate(y)})`;
}

/** The minus sign every plot and report uses in numbers: ASCII hyphen-minus, like the text tables. */
export const MINUS = '-';

/**
 * Replaces U+2212 (which d3's tick formats write) with the report's {@link MINUS}, so every number
 * in a plot or a table is written with the same sign and can be copied into a spreadsheet.
 *
 * @param text - formatted number
 */
export function plainMinus(text: string): string {
  return text.replace(/\u2212/g, MINUS);
}

/**
 * Turns free text into a safe, readable file or id fragment: letters, digits, `.`, `_` and `-`
 * kept, runs of anything else become one `-`.
 *
 * @param text - e.g. a gas name or a scan path
 * @returns a non-empty fragment (`plot` when nothing is left)
 */
export function slug(text: string): string {
  const cleaned = text.replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^[-.]+|-+$/g, '');
  return cleaned === '' ? 'plot' : cleaned;
}

/**
 * The last part of a path, after its last `/` or `\` (either separator, whichever system wrote it).
 *
 * @param path - a file path as the user named it
 * @returns e.g. `lab-co.calibration.json` for `calibrations/lab-co.calibration.json`
 */
export function fileName(path: string): string {
  return path.replace(/^.*[\\/]/, '');
}
