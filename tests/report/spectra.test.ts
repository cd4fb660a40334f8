/**
 * Spectra plot: windows where they belong on either axis direction, the fitted baseline on the
 * known baseline, thinning that keeps every extreme.
 *
 * Known truth: synthetic scans of a Gaussian band on the straight baseline 0.02 + 2e-5·(ν − 2000)
 * AU (tests/helpers/band-scans.ts); 7.5 band SDs from the centre the Gaussian is below 1e-12 of
 * its height, so a straight baseline fitted through the baseline windows must be that line.
 * Pixel positions follow the SVG viewBox mapping (W3C SVG 1.1 §7.7), affine in the panel frame.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { GasCalibration } from '../../src/calibration/calibration.js';
import {
  concentrationGroup,
  gasSpectraData,
  renderSpectra,
  thinForDrawing,
} from '../../src/report/svg/spectra.js';
import { bandScan } from '../helpers/band-scans.js';
import { dinGas } from './din-gas.js';
import { byClass, numberAttribute, parseMarkup, pathPoints, textOf, type Node } from './markup-tree.js';

const gas: GasCalibration = {
  ...dinGas(),
  feature: {
    band: [2040, 2245],
    baseline: [
      [2000, 2030],
      [2255, 2290],
    ],
    baselineOrder: 1,
    response: 'area',
  },
};
const spectra = [0, 100, 100, 400].map((ppm, i) => ({
  label: `std-${i}.jdx`,
  spectrum: bandScan(ppm),
  group: concentrationGroup(ppm, 'ppm'),
}));
const options = { range: [1950, 2350] as const, absorbanceDomain: [0, 0.5] as const };

function panelOf(svg: Node): { left: number; top: number; width: number; height: number } {
  const rect = byClass(svg, 'panel-frame')[0] as Node;
  return {
    left: numberAttribute(rect, 'x'),
    top: numberAttribute(rect, 'y'),
    width: numberAttribute(rect, 'width'),
    height: numberAttribute(rect, 'height'),
  };
}

describe('spectra plot', () => {
  it('draws every spectrum, the band, the baseline windows, the baselines, a legend by concentration and labelled axes', () => {
    const svg = parseMarkup(renderSpectra(gasSpectraData(gas, spectra), { id: 's', ...options }));
    expect(byClass(svg, 'spectrum')).toHaveLength(4);
    expect(byClass(svg, 'band-window')).toHaveLength(1);
    expect(byClass(svg, 'baseline-window')).toHaveLength(2);
    expect(byClass(svg, 'fitted-baseline')).toHaveLength(4);
    const legend = byClass(svg, 'legend-entry').map(textOf);
    expect(legend).toEqual([
      '0 ppm',
      '100 ppm',
      '400 ppm',
      'band 2040–2245 cm⁻¹',
      'baseline windows',
      'fitted baseline',
    ]);
    const labels = byClass(svg, 'axis-label').map(textOf);
    expect(labels).toContain('wavenumber / cm⁻¹ (decreasing to the right)');
    expect(labels).toContain('absorbance (decadic) / AU');
    // The two replicates at 100 ppm share colour and dash: one legend entry, same stroke.
    const [, a, b] = byClass(svg, 'spectrum');
    expect(a?.attributes.stroke).toBe(b?.attributes.stroke);
  });

  it('places the windows on a descending axis (high wavenumbers left) and on an ascending one', () => {
    for (const direction of ['descending', 'ascending'] as const) {
      const svg = parseMarkup(
        renderSpectra(gasSpectraData(gas, spectra), { id: 's', ...options, wavenumberAxis: direction }),
      );
      const panel = panelOf(svg);
      const px = (nu: number): number =>
        panel.left + ((direction === 'descending' ? 2350 - nu : nu - 1950) / 400) * panel.width;
      const band = byClass(svg, 'band-window')[0] as Node;
      expect(
        Math.abs(numberAttribute(band, 'x') - Math.min(px(2040), px(2245))),
        direction,
      ).toBeLessThanOrEqual(0.5);
      expect(
        Math.abs(numberAttribute(band, 'width') - Math.abs(px(2245) - px(2040))),
        direction,
      ).toBeLessThanOrEqual(0.5);
      const spectrum = pathPoints(byClass(svg, 'spectrum')[0]?.attributes.d ?? '');
      const first = spectrum[0] as { x: number };
      const last = spectrum[spectrum.length - 1] as { x: number };
      // Points run in ascending wavenumber: rightwards on an ascending axis, leftwards on a descending one.
      expect(direction === 'ascending' ? first.x < last.x : first.x > last.x, direction).toBe(true);
    }
  });

  it('draws the fitted baseline on the known straight baseline (within 0.5 px)', () => {
    const svg = parseMarkup(
      renderSpectra(gasSpectraData(gas, spectra), { id: 's', ...options, wavenumberAxis: 'ascending' }),
    );
    const panel = panelOf(svg);
    const toNu = (x: number): number => 1950 + ((x - panel.left) / panel.width) * 400;
    const toY = (a: number): number => panel.top + panel.height - (a / 0.5) * panel.height;
    for (const baseline of byClass(svg, 'fitted-baseline')) {
      const points = pathPoints(baseline.attributes.d ?? '');
      expect(points.length).toBeGreaterThan(10);
      for (const p of points) {
        const truth = 0.02 + 2e-5 * (toNu(p.x) - 2000);
        expect(Math.abs(p.y - toY(truth))).toBeLessThanOrEqual(0.5);
      }
    }
  });

  it('notes spectra whose baseline cannot be fitted instead of failing', () => {
    const short = { label: 'short.csv', spectrum: bandScan(50, { from: 2010, to: 2300 }) };
    const data = gasSpectraData(gas, [short]);
    expect(data.baselines).toHaveLength(0);
    expect(data.notes?.[0]).toMatch(/^short\.csv: baseline not drawn \(.*baseline window/);
    expect(textOf(parseMarkup(renderSpectra(data)))).toContain('short.csv: baseline not drawn');
  });

  it('thins long spectra for drawing without losing any extreme (property, fixed seed)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 3, maxLength: 3000 }),
        fc.integer({ min: 1, max: 400 }),
        (values, columns) => {
          const x = Float64Array.from(values, (_, i) => 1000 + i * 0.5);
          const y = Float64Array.from(values);
          const low = 1000;
          const high = 1000 + (values.length - 1) * 0.5;
          const thinned = thinForDrawing(x, y, low, high, columns);
          expect(Math.max(...thinned.y)).toBe(Math.max(...values));
          expect(Math.min(...thinned.y)).toBe(Math.min(...values));
          for (let i = 1; i < thinned.x.length; i++)
            expect(thinned.x[i]).toBeGreaterThan(thinned.x[i - 1] as number);
          expect(thinned.x.length).toBeLessThanOrEqual(Math.max(values.length, 2 * columns + 2));
        },
      ),
      { seed: 20261201, numRuns: 200 },
    );
  });
});
