/**
 * The layout pieces every plot and report page is built from: panels and what is drawn across
 * them, the legend-and-panel layout, wavenumber axes, notes under a plot, and the shared page
 * parts of the HTML reports. Each plot's own tests check the drawn result; these pin the pieces.
 */
import { describe, expect, it } from 'vitest';
import {
  legendAndPanel,
  notesBelow,
  panelAxes,
  wavenumberAxisLabel,
  wavenumberScale,
} from '../../src/report/svg/chart.js';
import { fileName, translate } from '../../src/report/svg/markup.js';
import {
  horizontalRule,
  panelBelow,
  panelFrame,
  panelTitle,
  PANEL_GAP,
  PLOT_MARGIN,
  verticalRule,
  windowRect,
  type Panel,
} from '../../src/report/svg/panel.js';
import {
  hashCell,
  hashValue,
  htmlTable,
  levelText,
  pageFooter,
  pageHeader,
  pageSection,
} from '../../src/report/html-page.js';
import { byClass, byName, numberAttribute, parseMarkup, textOf, type Node } from './markup-tree.js';

/** The first of a list of elements that a test expects to be there. */
function first(nodes: Node[]): Node {
  const [node] = nodes;
  if (node === undefined) throw new Error('no such element');
  return node;
}

const PANEL: Panel = { left: 78, top: 60, width: 622, height: 300 };

describe('panels', () => {
  it('stacks a panel PANEL_GAP under another, same left edge and width', () => {
    expect(panelBelow(PANEL, 110)).toEqual({ left: 78, top: 60 + 300 + PANEL_GAP, width: 622, height: 110 });
  });

  it('marks a panel with a frame, named only in a plot of several panels', () => {
    const named = parseMarkup(panelFrame(PANEL, 'residuals'));
    expect(named.attributes['data-panel']).toBe('residuals');
    expect(['x', 'y', 'width', 'height'].map((name) => numberAttribute(named, name))).toEqual([
      78, 60, 622, 300,
    ]);
    expect(parseMarkup(panelFrame(PANEL)).attributes['data-panel']).toBeUndefined();
  });

  it('draws rules from edge to edge, with class, data attributes, dash and hover text', () => {
    const across = parseMarkup(
      horizontalRule(
        PANEL,
        120,
        {
          className: 'warning-line',
          data: { 'data-value': '104' },
          colour: '#cc5500',
          width: 1.3,
          dash: '7 3',
        },
        '<title>+2σ</title>',
      ),
    );
    expect(across.attributes).toMatchObject({
      class: 'warning-line',
      'data-value': '104',
      x1: '78',
      x2: '700',
      y1: '120',
      y2: '120',
      'stroke-dasharray': '7 3',
    });
    expect(textOf(across)).toBe('+2σ');
    const through = parseMarkup(verticalRule(PANEL, 300, { colour: '#555555', width: 1 }));
    expect(through.attributes).toMatchObject({ x1: '300', x2: '300', y1: '60', y2: '360' });
    expect(through.attributes.class).toBeUndefined();
    expect(through.attributes['stroke-dasharray']).toBeUndefined();
  });

  it('shades a window over the panel height whichever way the axis runs', () => {
    // Descending axis: 2200 cm⁻¹ lies left of 2000 cm⁻¹.
    const descending = (wavenumber: number): number => 700 - (wavenumber - 2000) * 2;
    const rect = parseMarkup(
      windowRect(PANEL, [2050, 2100], descending, {
        className: 'band-window',
        fill: '#cc5500',
        opacity: 0.16,
        label: 'band <2050–2100>',
      }),
    );
    expect(rect.attributes).toMatchObject({ class: 'band-window', 'data-low': '2050', 'data-high': '2100' });
    expect(numberAttribute(rect, 'x')).toBe(descending(2100));
    expect(numberAttribute(rect, 'width')).toBe(100);
    expect(numberAttribute(rect, 'height')).toBe(300);
    expect(rect.attributes.stroke).toBeUndefined();
    expect(textOf(rect)).toBe('band <2050–2100>');
  });

  it('titles a panel just above its top-left corner, escaping the text', () => {
    const title = parseMarkup(panelTitle(PANEL, 'Residual <measured − fitted>'));
    expect([numberAttribute(title, 'x'), numberAttribute(title, 'y')]).toEqual([78, 52]);
    expect(textOf(title)).toBe('Residual <measured − fitted>');
  });
});

describe('plot layout', () => {
  it('puts the legend under the title and the panel under the legend, inside the margins', () => {
    const { legend, panel } = legendAndPanel([{ label: 'measured', colour: '#222222', line: true }], {
      width: 720,
      panelHeight: 260,
    });
    expect(legend.height).toBe(16);
    expect(panel).toEqual({
      left: PLOT_MARGIN.left,
      top: 28 + 16 + 10,
      width: 720 - PLOT_MARGIN.left - PLOT_MARGIN.right,
      height: 260,
    });
    expect(legendAndPanel([], { width: 720, panelHeight: 100, gap: 36 }).panel.top).toBe(28 + 36);
  });

  it('draws the bottom axis, then the left one', () => {
    const axes = parseMarkup(
      `<g>${panelAxes(
        PANEL,
        { ticks: [0, 1], position: (v) => 78 + v * 622, format: String, label: 'x / cm⁻¹' },
        { ticks: [0], position: () => 360, format: String, label: 'y', className: 'axis-residual' },
      )}</g>`,
    );
    const groups = byName(axes, 'g').slice(1);
    expect(groups.map((g) => g.attributes.class)).toEqual(['axis axis-x', 'axis axis-y axis-residual']);
  });

  it('runs a wavenumber axis high-to-low for descending, and says so in its label', () => {
    const descending = wavenumberScale([2000, 2200], PANEL, 'descending');
    expect(descending.scale(2200)).toBe(PANEL.left);
    expect(descending.scale(2000)).toBe(PANEL.left + PANEL.width);
    const ascending = wavenumberScale([2000, 2200], PANEL, 'ascending');
    expect(ascending.scale(2000)).toBe(PANEL.left);
    expect(wavenumberAxisLabel('descending')).toBe('wavenumber / cm⁻¹ (decreasing to the right)');
    expect(wavenumberAxisLabel('ascending')).toBe('wavenumber / cm⁻¹ (increasing to the right)');
  });

  it('sets notes in lines under the bottom margin', () => {
    const notes = notesBelow(PANEL, ['first', 'second <b>']).map(parseMarkup);
    expect(notes.map((n) => numberAttribute(n, 'y'))).toEqual([360 + 50 + 4, 360 + 50 + 4 + 15]);
    expect(notes.map((n) => n.attributes.class)).toEqual(['plot-note', 'plot-note']);
    expect(textOf(first(notes.slice(1)))).toBe('second <b>');
    const tight = notesBelow(PANEL, ['a', 'b'], { gap: 10, lineHeight: 14 }).map(parseMarkup);
    expect(tight.map((n) => numberAttribute(n, 'y'))).toEqual([420, 434]);
  });

  it('places markers by a rounded translation', () => {
    expect(translate(12.345, -0.001)).toBe('translate(12.35,0)');
  });
});

describe('page parts', () => {
  it('writes a probability level as a percentage without trailing zeros', () => {
    expect([0.95, 0.9, 0.995, 0.5].map(levelText)).toEqual(['95 %', '90 %', '99.5 %', '50 %']);
  });

  it('takes the file name from a path with either separator', () => {
    expect(fileName('calibrations/lab-co.calibration.json')).toBe('lab-co.calibration.json');
    expect(fileName('C:\\lab\\stack-k2.calibration.json')).toBe('stack-k2.calibration.json');
    expect(fileName('plain.json')).toBe('plain.json');
  });

  it('escapes the text of the header, section headings, footer and hash-styled values', () => {
    const page = parseMarkup(
      `<main>${pageHeader('Report <x>', 'a & b')}${pageSection('gas-CO', 'CO <1>', '<p>body</p>')}` +
        `${pageFooter('tool <1.0>')}</main>`,
    );
    expect(textOf(first(byName(page, 'h1')))).toBe('Report <x>');
    expect(byClass(page, 'subtitle').map(textOf)).toEqual(['a & b']);
    const section = first(byName(page, 'section'));
    expect(section.attributes.id).toBe('gas-CO');
    expect(textOf(first(byName(section, 'h2')))).toBe('CO <1>');
    expect(textOf(first(byName(page, 'footer')))).toBe('tool <1.0>');
    expect(hashValue('a<b').html).toBe('<span class="hash">a&lt;b</span>');
    expect(htmlTable({ header: ['scan'], rows: [[hashCell('x/<y>.jdx')]] })).toContain(
      '<td class="hash">x/&lt;y&gt;.jdx</td>',
    );
  });
});
