/**
 * Calibration curve plot: elements, geometry and the bands it draws.
 *
 * Sources: the DIN 32645 worked example (tests/fixtures/din32645/worked-example.json: standards,
 * printed slope, intercept and residual SD); the prediction interval of a straight-line
 * regression, ŷ ± t(1 − α/2, n − 2)·s·√(1 + 1/n + (x − x̄)²/Sxx) (DIN 32645; Montgomery & Runger,
 * Applied Statistics and Probability for Engineers, §11.7 — from memory) with the t quantile from
 * @stdlib (a reference library); the SVG viewBox mapping (W3C SVG 1.1 §7.7: with width/height
 * equal to the viewBox, one user unit is one CSS pixel), which makes a data value's pixel the
 * affine map of the panel frame.
 */
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import { describe, expect, it } from 'vitest';
import { calibrationCurveData, renderCalibrationCurve } from '../../src/report/svg/calibration-curve.js';
import { din, dinGas } from './din-gas.js';
import {
  byClass,
  numberAttribute,
  parseMarkup,
  pathPoints,
  textOf,
  translation,
  type Node,
} from './markup-tree.js';

function frame(svg: Node, panel: string): { left: number; top: number; width: number; height: number } {
  const rect = byClass(svg, 'panel-frame').find((n) => n.attributes['data-panel'] === panel) as Node;
  return {
    left: numberAttribute(rect, 'x'),
    top: numberAttribute(rect, 'y'),
    width: numberAttribute(rect, 'width'),
    height: numberAttribute(rect, 'height'),
  };
}

const domains = {
  concentrationDomain: [0, 0.5] as const,
  responseDomain: [2000, 8000] as const,
  residualDomain: [-400, 400] as const,
};

describe('calibration curve plot', () => {
  const gas = dinGas();
  const input = calibrationCurveData(gas, { level: 0.95, points: 51 });
  const svg = parseMarkup(renderCalibrationCurve(input, { id: 'din', ...domains }));

  it('has a marker per standard, the curve, both bands, the limits, residuals and labelled axes', () => {
    expect(svg.name).toBe('svg');
    expect(svg.attributes.viewBox).toBe(`0 0 ${svg.attributes.width} ${svg.attributes.height}`);
    expect(byClass(svg, 'standard')).toHaveLength(10);
    expect(byClass(svg, 'residual')).toHaveLength(10);
    for (const cls of ['fitted-curve', 'prediction-band', 'confidence-band']) {
      const [path] = byClass(svg, cls);
      expect(path?.name, cls).toBe('path');
      expect(pathPoints(path?.attributes.d ?? '').length, cls).toBeGreaterThanOrEqual(51);
    }
    expect(byClass(svg, 'limit-line').map((n) => n.attributes['data-limit'])).toEqual(['LOD', 'LOQ']);
    expect(byClass(svg, 'zero-line')).toHaveLength(1);
    const labels = byClass(svg, 'axis-label').map(textOf);
    expect(labels).toContain('CO concentration / ppm');
    expect(labels).toContain('band area / AU·cm⁻¹');
    expect(labels).toContain('residual');
    // Real text elements carry the tick labels, with ASCII minus (-400 on the residual axis).
    const ticks = byClass(svg, 'tick-label').map(textOf);
    expect(ticks).toContain('0.3');
    expect(ticks.some((t) => t.startsWith('-'))).toBe(true);
    expect(ticks.join('')).not.toContain('\u2212');
    expect(textOf(svg)).toContain('95 % prediction band (one new response)');
  });

  it('puts a standard at its concentration and response within 0.5 px (affine map of the panel)', () => {
    const panel = frame(svg, 'curve');
    const marker = byClass(svg, 'standard').find(
      (n) => n.attributes['data-concentration'] === '0.25',
    ) as Node;
    expect(marker.attributes['data-response']).toBe('5058');
    const [x, y] = translation(marker);
    const expectedX = panel.left + ((0.25 - 0) / (0.5 - 0)) * panel.width;
    const expectedY = panel.top + panel.height - ((5058 - 2000) / (8000 - 2000)) * panel.height;
    expect(Math.abs(x - expectedX), `x ${x} vs ${expectedX}`).toBeLessThanOrEqual(0.5);
    expect(Math.abs(y - expectedY), `y ${y} vs ${expectedY}`).toBeLessThanOrEqual(0.5);
  });

  it('draws the fitted line and the 95 % prediction band of the textbook formula (printed DIN coefficients)', () => {
    const panel = frame(svg, 'curve');
    const toY = (v: number): number => panel.top + panel.height - ((v - 2000) / 6000) * panel.height;
    const toX = (c: number): number => panel.left + (c / 0.5) * panel.width;
    const { slope, intercept, residualSD } = din.printed;
    const n = din.data.concentration.length;
    const mean = din.data.concentration.reduce((a, b) => a + b, 0) / n;
    const sxx = din.data.concentration.reduce((a, b) => a + (b - mean) ** 2, 0);
    const t = tQuantile(0.975, n - 2);
    const curve = pathPoints(byClass(svg, 'fitted-curve')[0]?.attributes.d ?? '');
    const band = pathPoints(byClass(svg, 'prediction-band')[0]?.attributes.d ?? '');
    input.curve.forEach((point, k) => {
      const c = point.concentration;
      const fitted = intercept + slope * c;
      const half = t * residualSD * Math.sqrt(1 + 1 / n + (c - mean) ** 2 / sxx);
      // Printed values carry 7 digits; 0.5 px on a 6000-unit axis is about 10 response units.
      expect(Math.abs((curve[k]?.x ?? NaN) - toX(c))).toBeLessThanOrEqual(0.5);
      expect(Math.abs((curve[k]?.y ?? NaN) - toY(fitted)), `curve at ${c}`).toBeLessThanOrEqual(0.5);
      expect(Math.abs((band[k]?.y ?? NaN) - toY(fitted + half)), `upper band at ${c}`).toBeLessThanOrEqual(
        0.5,
      );
      // d3's area runs along the upper edge, then back along the lower edge.
      expect(
        Math.abs((band[2 * input.curve.length - 1 - k]?.y ?? NaN) - toY(fitted - half)),
        `lower band at ${c}`,
      ).toBeLessThanOrEqual(0.5);
    });
  });

  it('draws residuals on their own axis and the limits at their concentrations in both panels', () => {
    const residualPanel = frame(svg, 'residuals');
    gas.model.residuals.forEach((residual, i) => {
      const marker = byClass(svg, 'residual')[i] as Node;
      const [, y] = translation(marker);
      const expected =
        residualPanel.top + residualPanel.height - ((residual + 400) / 800) * residualPanel.height;
      expect(Math.abs(y - expected)).toBeLessThanOrEqual(0.5);
    });
    const panel = frame(svg, 'curve');
    const lod = byClass(svg, 'limit-line')[0] as Node;
    const lines = lod.children.filter((c) => c.name === 'line');
    expect(lines).toHaveLength(2);
    const expectedX = panel.left + ((gas.model.limits.detection.value as number) / 0.5) * panel.width;
    for (const line of lines)
      expect(Math.abs(numberAttribute(line, 'x1') - expectedX)).toBeLessThanOrEqual(0.5);
  });

  it('escapes a hostile gas label and scan names in text and titles', () => {
    const hostile = {
      ...input,
      gas: '<script>alert("x")</script>',
      standards: input.standards.map((s) => ({ ...s, label: 'a & b <lot>' })),
    };
    const markup = renderCalibrationCurve(hostile);
    expect(markup).not.toContain('<script>');
    const tree = parseMarkup(markup);
    expect(textOf(tree)).toContain('<script>alert("x")</script> calibration curve');
    expect(textOf(tree)).toContain('a & b <lot>');
  });
});
