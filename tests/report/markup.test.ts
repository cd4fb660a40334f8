/**
 * Escaping and markup building shared by the SVG plots and HTML reports.
 *
 * Sources: the five characters with meaning in element content and quoted attribute values
 * (& < > " '), W3C XML 1.0 §2.4 and the HTML Living Standard "escaping a string"; OWASP XSS
 * Prevention Cheat Sheet, rule 1 (HTML-encode & < > " ' before putting untrusted data into
 * element content or quoted attributes).
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { significantDigits } from '../../src/words.js';
import { coordinate, element, escapeText, plainMinus, slug } from '../../src/report/svg/markup.js';
import { parseMarkup } from './markup-tree.js';

const decode = (text: string): string =>
  text.replace(
    /&(amp|lt|gt|quot|#39);/g,
    (_, name: string) => ({ amp: '&', lt: '<', gt: '>', quot: '"', '#39': "'" })[name] as string,
  );

describe('escapeText', () => {
  it('replaces the five special characters (OWASP rule 1)', () => {
    expect(escapeText(`<script>alert("x" & 'y')</script>`)).toBe(
      '&lt;script&gt;alert(&quot;x&quot; &amp; &#39;y&#39;)&lt;/script&gt;',
    );
    expect(escapeText('plain CO_ppm 2040–2245 cm⁻¹')).toBe('plain CO_ppm 2040–2245 cm⁻¹');
  });

  it('leaves no special character and decodes back to the input (property, fixed seed)', () => {
    fc.assert(
      fc.property(fc.string({ unit: 'grapheme', maxLength: 200 }), (text) => {
        const escaped = escapeText(text);
        expect(escaped).not.toMatch(/[<>"']/);
        expect(escaped.replace(/&(amp|lt|gt|quot|#39);/g, '')).not.toContain('&');
        expect(decode(escaped)).toBe(text);
      }),
      { seed: 4471, numRuns: 500 },
    );
  });
});

describe('element', () => {
  it('escapes attribute values, rounds numbers to 0.01 and omits undefined and false', () => {
    expect(
      element(
        'text',
        { x: 10.123456, y: -0.004, class: 'a"b', title: undefined, hidden: false },
        escapeText('<&>'),
      ),
    ).toBe('<text x="10.12" y="0" class="a&quot;b">&lt;&amp;&gt;</text>');
    expect(element('rect', { width: 5 })).toBe('<rect width="5"/>');
  });

  it('always yields well-formed markup whatever the text (property, fixed seed)', () => {
    fc.assert(
      fc.property(fc.string({ maxLength: 80 }), fc.string({ maxLength: 80 }), (attribute, text) => {
        const markup = element('g', { 'data-label': attribute }, element('text', {}, escapeText(text)));
        const tree = parseMarkup(markup);
        expect(tree.attributes['data-label']).toBe(attribute);
        expect(tree.children[0]?.text).toBe(text);
      }),
      { seed: 4472, numRuns: 300 },
    );
  });
});

describe('numbers and names', () => {
  it('coordinates: two decimals, no negative zero, 0 for non-finite values', () => {
    expect(coordinate(1 / 3)).toBe('0.33');
    expect(coordinate(-0.001)).toBe('0');
    expect(coordinate(Number.NaN)).toBe('0');
    expect(coordinate(1e6 + 0.005)).toBe('1000000.01');
  });

  it('one minus sign: U+2212 from d3 becomes ASCII hyphen-minus', () => {
    expect(plainMinus('\u22120.5')).toBe('-0.5');
    expect(significantDigits(-0.031234, 3)).toBe('-0.0312');
    expect(significantDigits(5, 3)).toBe('5');
  });

  it('slugs keep safe characters only and are never empty', () => {
    expect(slug('samples/=HYPERLINK("x")')).toBe('samples-HYPERLINK-x');
    expect(slug('../../etc')).toBe('etc');
    expect(slug('<>')).toBe('plot');
    expect(slug('CO2')).toBe('CO2');
  });
});
