/**
 * The frame of every HTML report: one self-contained page (inline CSS and SVG, no scripts, no
 * external fonts, images or style sheets), readable offline and printable, with a content
 * security policy that forbids scripts and every external fetch, so even a file that were
 * tampered with cannot run code or call out when opened.
 *
 * Small builders for the parts reports share: the page's header, sections and footer, escaped
 * text, tables, definition lists, figures and caution boxes. Every string that reaches the page
 * passes through {@link escapeText} unless it is markup built here.
 */
import { element, escapeText } from './svg/markup.js';
import { formatNumber } from './table.js';

/** Content security policy of every report: no scripts, no fetches; inline styles and data: images only. */
export const REPORT_CSP =
  "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'";

const STYLE =
  `
:root { color-scheme: light; }
* { box-sizing: border-box; }
body { margin: 0 auto; max-width: 980px; padding: 20px 24px 48px; ` +
  `font-family: system-ui, 'DejaVu Sans', 'Liberation Sans', Arial, sans-serif; ` +
  `font-size: 14px; line-height: 1.45; color: #222; background: #fff; }
h1 { font-size: 22px; margin: 0 0 4px; }
h2 { font-size: 18px; margin: 28px 0 8px; padding-bottom: 3px; border-bottom: 2px solid #1f4e9c; }
h3 { font-size: 15px; margin: 18px 0 6px; }
p { margin: 6px 0; }
.subtitle { color: #555; margin: 0 0 12px; }
code, .hash { font-family: 'DejaVu Sans Mono', 'Liberation Mono', Consolas, monospace; ` +
  `font-size: 12px; overflow-wrap: anywhere; }
table { border-collapse: collapse; margin: 8px 0 12px; width: 100%; }
caption { text-align: left; font-weight: bold; padding: 4px 0; }
th, td { border: 1px solid #c8c8c8; padding: 3px 6px; text-align: left; vertical-align: top; }
th { background: #eef1f6; font-weight: 600; }
td.number, th.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.failed td { background: #fbeaea; }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 2px 14px; margin: 8px 0; }
dl.facts dt { font-weight: 600; }
dl.facts dd { margin: 0; }
.caution { border: 2px solid #b8001f; border-left-width: 8px; background: #fff6f6; padding: 8px 12px; margin: 12px 0; }
.caution h2 { border: none; margin: 0 0 4px; font-size: 16px; color: #b8001f; }
.notice { border-left: 6px solid #cc5500; background: #fff8f0; padding: 6px 12px; margin: 10px 0; }
.verdict { font-weight: 600; }
.muted { color: #555; }
figure { margin: 14px 0; break-inside: avoid; page-break-inside: avoid; }
figure svg { max-width: 100%; height: auto; display: block; }
figcaption { color: #555; font-size: 12px; margin-top: 4px; }
details { margin: 8px 0; border: 1px solid #c8c8c8; padding: 4px 10px; }
details > summary { cursor: pointer; font-weight: 600; }
nav ol { margin: 4px 0 12px; padding-left: 22px; columns: 2; }
footer { margin-top: 32px; color: #555; font-size: 12px; border-top: 1px solid #c8c8c8; padding-top: 6px; }
@media print {
  body { max-width: none; padding: 0; font-size: 11pt; }
  nav { display: none; }
  h2 { break-after: avoid; page-break-after: avoid; }
  table, figure, .caution { break-inside: avoid; page-break-inside: avoid; }
  details { border: none; padding: 0; }
  details::details-content { content-visibility: visible; display: block; }
  a { color: inherit; text-decoration: none; }
}
`;

/** What {@link htmlPage} wraps. */
export interface HtmlPageSpec {
  /** Document title (plain text). */
  title: string;
  /** Body markup. */
  body: string;
}

/**
 * A complete HTML document with the report style sheet and content security policy.
 *
 * @param spec - title and body markup
 * @returns the page, starting with `<!DOCTYPE html>`
 */
export function htmlPage(spec: HtmlPageSpec): string {
  return [
    '<!DOCTYPE html>',
    '<html lang="en">',
    '<head>',
    '<meta charset="utf-8">',
    element('meta', { 'http-equiv': 'Content-Security-Policy', content: REPORT_CSP }).replace('/>', '>'),
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    element('title', {}, escapeText(spec.title)),
    `<style>${STYLE}</style>`,
    '</head>',
    '<body>',
    spec.body,
    '</body>',
    '</html>',
    '',
  ].join('\n');
}

/** A table cell: text (escaped), or markup with a class. */
export type Cell =
  string | number | { html: string; className?: string } | { text: string; className?: string };

function cellMarkup(tag: 'td' | 'th', cell: Cell): string {
  if (typeof cell === 'number') return element(tag, { class: 'number' }, escapeText(String(cell)));
  if (typeof cell === 'string') return element(tag, {}, escapeText(cell));
  if ('html' in cell) return element(tag, { class: cell.className }, cell.html);
  return element(tag, { class: cell.className }, escapeText(cell.text));
}

/** A number cell: right-aligned text. */
export function numberCell(text: string): Cell {
  return { text, className: 'number' };
}

/** A cell in the monospace style of hashes, so file paths and SHA-256 values wrap anywhere and read exactly. */
export function hashCell(text: string): Cell {
  return { text, className: 'hash' };
}

/**
 * A fact value (see {@link factList}) in the monospace style of hashes: a file path or a SHA-256.
 *
 * @param text - plain text
 */
export function hashValue(text: string): { html: string } {
  return { html: element('span', { class: 'hash' }, escapeText(text)) };
}

/**
 * An HTML table.
 *
 * @param spec - caption (plain text), header cells, rows, optional class per row
 * @returns `<table>` markup
 */
export function htmlTable(spec: {
  caption?: string;
  header: readonly Cell[];
  rows: readonly (readonly Cell[])[];
  rowClasses?: readonly (string | undefined)[];
  className?: string;
}): string {
  const caption = spec.caption === undefined ? '' : element('caption', {}, escapeText(spec.caption));
  const head = element('thead', {}, element('tr', {}, spec.header.map((c) => cellMarkup('th', c)).join('')));
  const body = element(
    'tbody',
    {},
    spec.rows
      .map((row, i) =>
        element('tr', { class: spec.rowClasses?.[i] }, row.map((c) => cellMarkup('td', c)).join('')),
      )
      .join(''),
  );
  return element('table', { class: spec.className }, caption + head + body);
}

/**
 * A definition list of facts (term → value).
 *
 * @param facts - pairs of plain-text term and value (value may be markup with `{ html }`)
 */
export function factList(facts: readonly (readonly [string, string | { html: string }])[]): string {
  return element(
    'dl',
    { class: 'facts' },
    facts
      .map(
        ([term, value]) =>
          element('dt', {}, escapeText(term)) +
          element('dd', {}, typeof value === 'string' ? escapeText(value) : value.html),
      )
      .join(''),
  );
}

/**
 * A paragraph of plain text.
 *
 * @param text - plain text
 * @param className - optional class
 */
export function paragraph(text: string, className?: string): string {
  return element('p', { class: className }, escapeText(text));
}

/**
 * A bulleted list of plain-text items.
 *
 * @param items - plain text
 */
export function bulletList(items: readonly string[]): string {
  return element('ul', {}, items.map((item) => element('li', {}, escapeText(item))).join(''));
}

/**
 * A figure holding an inline SVG plot and its caption.
 *
 * @param svg - plot markup
 * @param caption - plain text
 */
export function figure(svg: string, caption: string): string {
  return element('figure', {}, svg + element('figcaption', {}, escapeText(caption)));
}

/**
 * The safety box: cautions in plain words, and the reminder that local rules govern.
 *
 * @param cautions - caution texts (plain)
 * @param id - element id
 */
export function cautionBox(cautions: readonly string[], id = 'safety'): string {
  const items =
    cautions.length > 0
      ? cautions
      : [
          'The gases involved carry no specific caution in the species table. ' +
            'Handle compressed-gas standards as their safety data sheets say.',
        ];
  return element(
    'section',
    { class: 'caution', id, role: 'note' },
    element('h2', {}, 'Safety') + bulletList(items),
  );
}

/**
 * A notice (something missing or changed that the reader must know).
 *
 * @param text - plain text
 */
export function notice(text: string): string {
  return element('p', { class: 'notice' }, escapeText(text));
}

/**
 * The page header: the report's title as the page heading, and a subtitle line under it.
 *
 * @param title - plain text
 * @param subtitle - plain text
 */
export function pageHeader(title: string, subtitle: string): string {
  return element('header', {}, element('h1', {}, escapeText(title)) + paragraph(subtitle, 'subtitle'));
}

/**
 * A section of the page under its heading; the id is the target of the page's links.
 *
 * @param id - element id
 * @param heading - plain text
 * @param content - markup
 */
export function pageSection(id: string, heading: string, content: string): string {
  return element('section', { id }, element('h2', {}, escapeText(heading)) + content);
}

/**
 * The page footer: one line of small print.
 *
 * @param text - plain text
 */
export function pageFooter(text: string): string {
  return element('footer', {}, escapeText(text));
}

/**
 * A probability level as a percentage, without trailing zeros.
 *
 * @param level - probability in (0, 1)
 * @returns e.g. `95 %` for 0.95
 */
export function levelText(level: number): string {
  return `${formatNumber(level * 100, 3).replace(/\.?0+$/, '')} %`;
}
