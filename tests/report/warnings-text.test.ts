/**
 * Warnings as the results and inspect outputs show them: `{code, message}` in JSON, a line per
 * warning in text (message and code), the codes in the results CSV's `warnings` column (and the
 * earlier column set for appending to an older file), and what `inspect` says about saturated
 * points and quantitative reference spectra.
 */
import { describe, expect, it } from 'vitest';
import type { ScanResult } from '../../src/calibration/result.js';
import { describeScan, formatScanDescriptions } from '../../src/report/inspect.js';
import {
  formatResultsText,
  resultColumns,
  resultRow,
  resultsDocument,
  warningText,
  type BatchEntry,
} from '../../src/report/results.js';
import { makeSpectrum, type ReadWarning } from '../../src/spectrum/spectrum.js';

const LINE_START: ReadWarning = {
  code: 'line-start-x',
  message: 's1.jdx line 14: line-start X 2000.1 differs from the grid by 0.1 cm⁻¹',
};
const result: ScanResult = {
  scan: 's1.jdx',
  conditions: { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 },
  gases: [{ gas: 'CO', value: 71.3, unit: 'ppm', low: 70.5, high: 72.1, se: 0.4, flags: [], notes: [] }],
  residualRms: 3e-4,
  cautions: [],
  warnings: [
    LINE_START,
    { code: 'interferent', message: 'interferent H2O modelled at 1.2 % (not reported)' },
    {
      code: 'line-start-x',
      message: 's1.jdx line 20: line-start X 2010.1 differs from the grid by 0.1 cm⁻¹',
    },
  ],
};
const failure: BatchEntry = {
  scan: 's2.jdx',
  error: 's2.jdx: 400 saturated points …',
  warnings: [{ code: 'saturated', message: 's2.jdx: 400 points with transmittance ≤ 0 at 2100–2200 cm⁻¹' }],
};

describe('results with warnings', () => {
  it('JSON: each result carries warnings as {code, message} (DESIGN §4)', () => {
    const document = JSON.parse(
      JSON.stringify(resultsDocument([result, failure], { file: 'c.json', sha256: 'ab' }, 0.95)),
    ) as { results: { warnings: unknown }[] };
    expect(document.results[0]?.warnings).toEqual(result.warnings);
    expect(document.results[1]?.warnings).toEqual([
      { code: 'saturated', message: 's2.jdx: 400 points with transmittance ≤ 0 at 2100–2200 cm⁻¹' },
    ]);
  });

  it('text: one note per warning, message then code, the scan named once', () => {
    const text = formatResultsText([result, failure], 0.95);
    expect(text).toContain(
      '  s1.jdx line 14: line-start X 2000.1 differs from the grid by 0.1 cm⁻¹ (line-start-x)',
    );
    expect(text).toContain('  s1.jdx: interferent H2O modelled at 1.2 % (not reported) (interferent)');
    expect(text).toContain('  s2.jdx: 400 points with transmittance ≤ 0 at 2100–2200 cm⁻¹ (saturated)');
    expect(warningText('x.csv', { code: 'model', message: 'did not converge' })).toBe(
      'x.csv: did not converge (model)',
    );
  });

  it('CSV: a warnings column with each code once, in order; failures too; the earlier layout without it', () => {
    const gases = [{ gas: 'CO', unit: 'ppm' }];
    expect(resultColumns(gases)).toEqual([
      'scan',
      'CO_ppm',
      'CO_low',
      'CO_high',
      'CO_flags',
      'residual_rms',
      'calibration_sha256',
      'error',
      'warnings',
    ]);
    expect(resultRow(result, gases, 'ab')).toEqual([
      's1.jdx',
      71.3,
      70.5,
      72.1,
      '',
      3e-4,
      'ab',
      '',
      'line-start-x interferent',
    ]);
    expect(resultRow(failure, gases, 'ab').slice(-2)).toEqual([
      's2.jdx: 400 saturated points …',
      'saturated',
    ]);
    expect(resultColumns(gases, { warningsColumn: false }).at(-1)).toBe('error');
    expect(resultRow(result, gases, 'ab', { warningsColumn: false })).toHaveLength(8);
  });
});

describe('inspect', () => {
  const x = Float64Array.from({ length: 5 }, (_, i) => 2140 + i);

  it('reports saturated points and every read warning, in JSON and under the scan’s row', () => {
    const spectrum = makeSpectrum({
      x,
      y: Float64Array.from([0.5, Number.NaN, Number.NaN, 0.1, 0.5]),
      yKind: 'transmittance',
      metadata: {
        source: 'cell.jdx',
        format: 'jcamp',
        saturatedPoints: 2,
        warnings: [
          LINE_START,
          { code: 'saturated', message: 'cell.jdx: 2 points with transmittance ≤ 0 at 2141–2142 cm⁻¹' },
        ],
      },
    });
    const description = describeScan('cell.jdx', spectrum);
    expect(description.saturatedPoints).toBe(2);
    expect(description.warnings.map((w) => w.code)).toEqual(['line-start-x', 'saturated']);
    // The peak comes from the defined points: T = 0.1 is A = 1 (A = −log10 T; common practice).
    expect(description.peakAbsorbance).toBeCloseTo(1, 12);
    expect(description.peakPosition_cm).toBe(2143);
    const lines = formatScanDescriptions([
      description,
      { ...description, scan: 'other.jdx', warnings: [] },
    ]).split('\n');
    expect(lines[2]).toMatch(/^cell\.jdx\s+jcamp\s+5/);
    expect(lines[3]).toBe(`  warning (line-start-x): ${LINE_START.message}`);
    expect(lines[4]).toBe(
      '  warning (saturated): cell.jdx: 2 points with transmittance ≤ 0 at 2141–2142 cm⁻¹',
    );
    expect(lines[5]).toMatch(/^other\.jdx\s+jcamp/);
    // Without a saturated warning of its own, the count is still said.
    expect(lines[6]).toBe('  2 saturated point(s): y undefined (transmittance at or below zero as printed)');
  });

  it('describes a quantitative reference spectrum in its own unit, never as absorbance', () => {
    const reference = makeSpectrum({
      x,
      y: Float64Array.from([1e-4, 2.5e-4, 5e-5, 0, 0]),
      yKind: 'absorbance-per-amount',
      metadata: { source: 'co-ref.jdx' },
    });
    const description = describeScan('co-ref.jdx', reference);
    expect(description.yKind).toBe('absorbance-per-amount');
    expect(description.yUnit).toMatch(/^decadic absorbance per µmol\/mol per metre, \(µmol\/mol\)⁻¹ m⁻¹/);
    expect(description.peakAbsorbance).toBeUndefined();
    expect(description.peakAbsorptivity_per_ppm_m).toBe(2.5e-4);
    const text = formatScanDescriptions([description]);
    expect(text).toMatch(/absorbance-per-amount\s+0\.0002500 \/ppm·m/);
    expect(text).toMatch(/usable as a reference spectrum of its gas, not as a sample scan or standard/);
  });
});
