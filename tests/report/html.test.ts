/**
 * The HTML reports as pure functions: sections for band and classical-least-squares
 * calibrations, the recheck history, what happened to the recorded inputs, and escaping of every
 * piece of user text (titles, file names, lot numbers, scan names, notes).
 *
 * Known truth: synthetic band scans with analytic areas (tests/helpers/band-scans.ts) and the
 * synthetic two-gas CLS calibration (tests/report/cls-calibration.ts). Escaping: W3C XML 1.0 §2.4
 * and OWASP XSS Prevention rule 1 (the five characters & < > " ').
 */
import { describe, expect, it } from 'vitest';
import { buildBandCalibration, type StandardScan } from '../../src/calibration/build.js';
import { parseMethod, type BandMethod } from '../../src/calibration/method.js';
import { quantifyScan } from '../../src/calibration/quantify.js';
import { calibrationReportHtml, type CalibrationReportInput } from '../../src/report/html.js';
import { quantifyReportHtml } from '../../src/report/html-quantify.js';
import { makeSpectrum } from '../../src/spectrum/spectrum.js';
import { bandScan } from '../helpers/band-scans.js';
import { calibration as clsCalibration, clsStandards, conditions, grid, mixture } from './cls-calibration.js';

const HOSTILE = `<img src=x onerror="alert('x')">&`;
const ESCAPED = '&lt;img src=x onerror=&quot;alert(&#39;x&#39;)&quot;&gt;&amp;';
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };

function has(text: string, pattern: string | RegExp): void {
  const found = typeof pattern === 'string' ? text.includes(pattern) : pattern.test(text);
  expect(found, `expected the page to contain ${String(pattern)}`).toBe(true);
}

function bandStandards(): StandardScan[] {
  return [0, 0, 50, 50, 100, 100, 200, 200].map((ppm, i) => ({
    scan: i === 2 ? `std/${HOSTILE}.csv` : `std/s${i}.csv`,
    line: i + 2,
    spectrum: bandScan(ppm * (1 + 0.002 * Math.sin(3 * i)), { metadata: { ...reference } }),
    concentrations: [{ gas: 'CO', unit: 'ppm', value: ppm }],
    conditions: {},
    lot: i === 4 ? HOSTILE : `L${i}`,
  }));
}

const method = parseMethod(
  {
    model: 'band',
    gases: [
      {
        name: 'CO',
        band: [2040, 2245],
        baseline: [
          [2000, 2030],
          [2255, 2290],
        ],
      },
    ],
  },
  'method.json',
) as BandMethod;

function bandInput(overrides: Partial<CalibrationReportInput> = {}): CalibrationReportInput {
  const standards = bandStandards();
  const calibration = buildBandCalibration(method, standards, {
    inputs: [{ role: 'manifest', path: `../${HOSTILE}/standards.csv`, sha256: 'a'.repeat(64) }],
    createdAt: '2026-12-01T00:00:00.000Z',
    title: `Bench ${HOSTILE}`,
  });
  return {
    calibration,
    calibrationFile: `cal/${HOSTILE}.json`,
    generatedAt: '2026-12-02T00:00:00.000Z',
    tool: { name: 'bandwright', version: '0.1.0' },
    inputs: [
      {
        role: 'manifest',
        path: `../${HOSTILE}/standards.csv`,
        sha256: 'a'.repeat(64),
        status: 'changed',
        currentSha256: 'b'.repeat(64),
      },
    ],
    spectra: standards.map((s, index) => ({ index, spectrum: s.spectrum })),
    spectraNotes: [],
    ...overrides,
  };
}

describe('calibration report (band method)', () => {
  it('escapes every piece of user text: title, file names, scan names, lot cells, input paths', () => {
    const html = calibrationReportHtml(bandInput());
    expect(html.includes(HOSTILE), 'raw user text in the page').toBe(false);
    expect(/<img/i.test(html), 'an element made from user text').toBe(false);
    for (const where of [
      `Calibration report: Bench ${ESCAPED}`,
      `cal/${ESCAPED}.json`,
      `std/${ESCAPED}.csv`,
      `../${ESCAPED}/standards.csv`,
    ])
      has(html, where);
    // The lot is in the standards table and in the plots' hover titles.
    expect(html.split(ESCAPED).length - 1).toBeGreaterThanOrEqual(8);
  });

  it('says which recorded inputs changed, with both hashes', () => {
    const html = calibrationReportHtml(bandInput());
    has(html, 'CHANGED since the calibration was built (SHA-256 differs); now ' + 'b'.repeat(64));
    has(html, '1 of 1 recorded input file(s) are missing or no longer match their recorded SHA-256');
  });

  it('leaves the spectra plot out and says why when no standard spectrum could be verified', () => {
    const html = calibrationReportHtml(
      bandInput({
        spectra: [],
        spectraNotes: ['8 of 8 standard spectra are not drawn: std/s0.csv (missing)'],
      }),
    );
    expect(html.match(/class="plot plot-calibration-curve"/g)).toHaveLength(1);
    has(html, '8 of 8 standard spectra are not drawn: std/s0.csv (missing)');
    // The notes are also printed under the (empty) spectra plot, so --plot files carry them too.
    expect(html.match(/class="plot plot-spectra"/g)).toHaveLength(1);
    has(html, 'no spectra to draw');
  });

  it('shows the recheck history: control chart, every check in the table, failed rows marked, notes', () => {
    const history = {
      gas: 'CO',
      chart: {
        records: [
          {
            time: '2026-12-03T09:00:00.000Z',
            recoveryPct: 100.4,
            verdict: 'pass' as const,
            rules: [],
            label: `checks/${HOSTILE}.csv`,
          },
          { time: '2026-12-10T09:00:00.000Z', recoveryPct: 93.8, verdict: 'fail' as const, rules: ['1-3s'] },
        ],
        centrePct: 100,
        tolerancePct: 5,
        sigmaPct: 5 / 3,
        sigmaSource: 'tolerance/3',
      },
      rows: [
        {
          time: '2026-12-03T09:00:00.000Z',
          certified: 100,
          measured: 100.4,
          unit: 'ppm',
          recoveryPct: 100.4,
          verdict: 'pass',
          rules: [],
          scan: `checks/${HOSTILE}.csv`,
        },
        {
          time: '2026-12-05T09:00:00.000Z',
          certified: 0,
          measured: 0.2,
          unit: 'ppm',
          verdict: 'pass',
          rules: [],
          scan: 'zero.csv',
        },
        {
          time: '2026-12-10T09:00:00.000Z',
          certified: 100,
          measured: 93.8,
          unit: 'ppm',
          recoveryPct: 93.8,
          verdict: 'fail',
          rules: ['1-3s'],
          scan: 'c2.csv',
        },
      ],
      notes: ['σ: tolerance/3 until 8 checks exist'],
      source: 'cal.history.csv',
    };
    const html = calibrationReportHtml(bandInput({ histories: [history] }));
    expect(html.match(/class="plot plot-control-chart"/g)).toHaveLength(1);
    has(html, 'Rechecks of CO');
    has(html, '<td class="number">zero gas</td>');
    expect(html.match(/<tr class="failed">/g)).toHaveLength(1);
    has(html, 'σ: tolerance/3 until 8 checks exist');
    has(html, `checks/${ESCAPED}.csv`);
    has(html, '<dt>recheck history</dt><dd>cal.history.csv</dd>');
  });

  it('repeats the safety cautions at the top and the end', () => {
    const html = calibrationReportHtml(bandInput());
    expect(html.match(/not a life-safety monitor/g)).toHaveLength(2);
    expect(html.indexOf('id="safety"')).toBeLessThan(html.indexOf('id="summary"'));
  });
});

describe('calibration report (classical least squares)', () => {
  it('describes the components and fit statistics and draws the standards over the fit regions', () => {
    const standards = clsStandards();
    const calibration = clsCalibration(standards);
    const html = calibrationReportHtml({
      calibration,
      calibrationFile: 'mix.json',
      generatedAt: '2026-12-02T00:00:00.000Z',
      tool: { name: 'bandwright', version: '0.1.0' },
      inputs: [],
      spectra: standards.map((s, index) => ({ index, spectrum: s.spectrum })),
      spectraNotes: [],
    });
    has(html, 'id="cls"');
    has(html, '<td>CO</td><td>reported</td><td>ppm</td>');
    has(html, '<td>N2O</td><td>reported</td><td>ppm</td>');
    has(html, '2000–2300 cm⁻¹');
    expect(html.match(/class="plot plot-calibration-curve"/g)).toBeNull();
    expect(html.match(/class="region"/g)).toHaveLength(1);
    // Legend groups name what each standard contains.
    has(html, '>zero gas</text>');
    has(html, '>CO 50 ppm, N2O 150 ppm</text>');
  });
});

describe('quantification report', () => {
  it('lists results with intervals and flags, and one collapsed section per sample with its plot', () => {
    const calibration = clsCalibration();
    const sample = makeSpectrum({
      x: grid,
      y: mixture(80, 120, () => 0),
      yKind: 'absorbance',
      metadata: { source: `samples/${HOSTILE}.csv`, ...conditions },
    });
    const zero = makeSpectrum({
      x: grid,
      y: mixture(0, 0, () => 0),
      yKind: 'absorbance',
      metadata: { source: 'zero.csv', ...conditions },
    });
    const entries = [
      quantifyScan(calibration, sample),
      quantifyScan(calibration, zero),
      { scan: 'broken.csv', error: `broken.csv line 3: ${HOSTILE}` },
    ];
    const html = quantifyReportHtml({
      calibration,
      calibrationFile: 'mix.json',
      entries,
      level: 0.95,
      spectra: [
        { scan: `samples/${HOSTILE}.csv`, spectrum: sample },
        { scan: 'zero.csv', spectrum: zero },
      ],
      generatedAt: '2026-12-02T00:00:00.000Z',
      tool: { name: 'bandwright', version: '0.1.0' },
      options: ['mg/m³ at 273.15 K and 101.325 kPa'],
    });
    expect(html.includes(HOSTILE), 'raw user text in the page').toBe(false);
    expect(html.match(/<details id="sample-\d">/g)).toHaveLength(3);
    expect(html.match(/class="plot plot-cls-fit"/g)).toHaveLength(2);
    has(html, 'Results with 95 % prediction intervals');
    has(html, '&lt; LOD (');
    has(html, 'below-lod');
    has(html, '<tr class="failed">');
    has(html, `Could not be quantified: broken.csv line 3: ${ESCAPED}`);
    has(html, '<dt>reporting</dt><dd>mg/m³ at 273.15 K and 101.325 kPa</dd>');
    has(html, '3 sample(s) · CO, N2O · 95 % prediction intervals');
  });
});
