/**
 * The plot palette: every series colour has at least 3:1 contrast against the white background,
 * and every pair stays distinguishable in normal vision and in simulated protanopia,
 * deuteranopia and tritanopia; dash patterns and marker shapes differ too, for greyscale print.
 *
 * Sources: WCAG 2.1, definitions of relative luminance and contrast ratio, and success criterion
 * 1.4.11 (non-text contrast ≥ 3:1); IEC 61966-2-1 (sRGB transfer function and the sRGB → XYZ
 * matrix, D65); CIE 15 (CIELAB, ΔE*ab = Euclidean distance); the colour-vision-deficiency
 * simulation matrices of Machado, Oliveira and Fernandes, IEEE TVCG 15 (2009) 1291, severity 1.0,
 * applied to linear RGB (values from memory). Threshold: ΔE*ab ≥ 20 between every pair in every
 * view (ΔE ≈ 2.3 is a just-noticeable difference, CIE 15; 20 is a clear difference: common
 * practice for categorical palettes). Measured minimum: 28.2 (brown vs cyan-blue in tritanopia).
 */
import { describe, expect, it } from 'vitest';
import { SERIES_COLOURS, SERIES_DASHES, SYMBOL_NAMES, seriesStyle } from '../../src/report/svg/palette.js';

const MACHADO: Record<string, number[][]> = {
  protanopia: [
    [0.152286, 1.052583, -0.204868],
    [0.114503, 0.786281, 0.099216],
    [-0.003882, -0.048116, 1.051998],
  ],
  deuteranopia: [
    [0.367322, 0.860646, -0.227968],
    [0.280085, 0.672501, 0.047413],
    [-0.01182, 0.04294, 0.968881],
  ],
  tritanopia: [
    [1.255528, -0.076749, -0.178779],
    [-0.078411, 0.930809, 0.147602],
    [0.004733, 0.691367, 0.3039],
  ],
};

const linear = (c: number): number => (c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4);
const rgb = (hex: string): number[] => [1, 3, 5].map((i) => linear(parseInt(hex.slice(i, i + 2), 16) / 255));
const luminance = (hex: string): number => {
  const [r, g, b] = rgb(hex) as [number, number, number];
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
};
const contrastWithWhite = (hex: string): number => 1.05 / (luminance(hex) + 0.05);

function lab(linearRgb: number[]): number[] {
  const [r, g, b] = linearRgb as [number, number, number];
  const x = 0.4124564 * r + 0.3575761 * g + 0.1804375 * b;
  const y = 0.2126729 * r + 0.7151522 * g + 0.072175 * b;
  const z = 0.0193339 * r + 0.119192 * g + 0.9503041 * b;
  const f = (t: number): number => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
  const [fx, fy, fz] = [f(x / 0.95047), f(y), f(z / 1.08883)];
  return [116 * fy - 16, 500 * (fx - fy), 200 * (fy - fz)];
}

const simulate = (matrix: number[][], c: number[]): number[] =>
  matrix.map((row) =>
    Math.min(
      1,
      Math.max(
        0,
        row.reduce((s, m, k) => s + m * (c[k] as number), 0),
      ),
    ),
  );
const views = (hex: string): Record<string, number[]> => ({
  normal: lab(rgb(hex)),
  ...Object.fromEntries(Object.entries(MACHADO).map(([name, m]) => [name, lab(simulate(m, rgb(hex)))])),
});
const distance = (a: number[], b: number[]): number => Math.hypot(...a.map((v, i) => v - (b[i] as number)));

describe('series palette', () => {
  it('every colour has ≥ 3:1 contrast with white (WCAG 2.1 §1.4.11)', () => {
    for (const colour of SERIES_COLOURS) expect(contrastWithWhite(colour), colour).toBeGreaterThanOrEqual(3);
  });

  it('every pair differs by ΔE*ab ≥ 20 in normal vision and in the three simulated dichromacies', () => {
    let smallest = Infinity;
    for (let i = 0; i < SERIES_COLOURS.length; i++) {
      for (let j = i + 1; j < SERIES_COLOURS.length; j++) {
        const a = views(SERIES_COLOURS[i] as string);
        const b = views(SERIES_COLOURS[j] as string);
        for (const view of Object.keys(a)) {
          const d = distance(a[view] as number[], b[view] as number[]);
          smallest = Math.min(smallest, d);
          expect(d, `${SERIES_COLOURS[i]} vs ${SERIES_COLOURS[j]} in ${view}`).toBeGreaterThanOrEqual(20);
        }
      }
    }
    expect(smallest).toBeCloseTo(28.2, 0);
  });

  it('the simulation keeps white white and greys grey (every row of the published matrices sums to 1)', () => {
    for (const matrix of Object.values(MACHADO)) {
      for (const row of matrix) expect(row.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 5);
    }
  });

  it('gives each of the first seven series its own dash pattern and marker shape', () => {
    const styles = SERIES_COLOURS.map((_, i) => seriesStyle(i));
    expect(new Set(styles.map((s) => s.dash ?? 'solid')).size).toBe(SERIES_COLOURS.length);
    expect(new Set(styles.map((s) => s.symbolName)).size).toBe(SERIES_COLOURS.length);
    expect(SERIES_DASHES).toHaveLength(SERIES_COLOURS.length);
    expect(SYMBOL_NAMES).toHaveLength(SERIES_COLOURS.length);
    // Beyond seven the colours repeat but the combination stays unique for 49 series.
    const combos = new Set(
      Array.from({ length: 49 }, (_, i) => {
        const s = seriesStyle(i);
        return `${s.colour} ${s.dash} ${s.symbolName}`;
      }),
    );
    expect(combos.size).toBe(49);
    expect(seriesStyle(SERIES_COLOURS.length).colour).toBe(seriesStyle(0).colour);
  });
});
