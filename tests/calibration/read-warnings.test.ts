/**
 * What reading leniently leaves on a scan reaching the results and the calibration: read
 * warnings first among a result's warnings, then quantification's own (with codes); saturated
 * (undefined) points flagged `saturated` with how many and where; standards saturated where the
 * method reads them, and quantitative reference spectra, refused naming the file.
 *
 * Data: Gaussian bands of analytic area on a sloped baseline (tests/helpers/band-scans.ts), with
 * warnings and undefined points put on them here the way a reader does (synthetic, known truth).
 */
import { describe, expect, it } from 'vitest';
import { buildClsCalibration } from '../../src/calibration/build-cls.js';
import { buildBandCalibration, type StandardScan } from '../../src/calibration/build.js';
import { parseMethod, type BandMethod, type ClsMethod } from '../../src/calibration/method.js';
import { quantifyScan } from '../../src/calibration/quantify.js';
import { isBandwrightError } from '../../src/errors.js';
import { formatCalibrationSummary } from '../../src/report/calibration-summary.js';
import { makeSpectrum, type ReadWarning, type Spectrum } from '../../src/spectrum/spectrum.js';
import { bandScan } from '../helpers/band-scans.js';

const conditions = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const createdAt = '2026-01-01T00:00:00.000Z';
const LINE_START: ReadWarning = {
  code: 'line-start-x',
  message: 'std-100.jdx line 14: line-start X 2000.1 differs from the grid by 0.1 cm⁻¹ (tolerance 0.5)',
};

/** A copy of a scan with NaN at the given wavenumbers (counted) and the given read warnings. */
function marked(
  spectrum: Spectrum,
  source: string,
  options: { undefinedAt?: readonly number[]; warnings?: readonly ReadWarning[] } = {},
): Spectrum {
  const y = Float64Array.from(spectrum.y);
  const at = options.undefinedAt ?? [];
  spectrum.x.forEach((x, i) => {
    if (at.includes(x)) y[i] = Number.NaN;
  });
  return makeSpectrum({
    ...spectrum,
    y,
    metadata: {
      ...spectrum.metadata,
      source,
      ...(at.length > 0 ? { saturatedPoints: at.length } : {}),
      ...(options.warnings === undefined ? {} : { warnings: options.warnings }),
    },
  });
}

function standards(change: (ppm: number, spectrum: Spectrum) => Spectrum = (_, s) => s): StandardScan[] {
  return [0, 50, 100, 200, 400].map((ppm, i) => ({
    scan: `std-${ppm}.jdx`,
    line: i + 2,
    spectrum: change(ppm, marked(bandScan(ppm, { metadata: conditions }), `standards/std-${ppm}.jdx`)),
    concentrations: [{ gas: 'CO', unit: 'ppm' as const, value: ppm }],
    conditions: {},
  }));
}

const bandMethod = parseMethod(
  {
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
  'method',
) as BandMethod;
const clsMethod = parseMethod(
  { model: 'cls', gases: ['CO'], regions: [[2060, 2230]], baselineOrder: 1 },
  'method',
) as ClsMethod;
const band = buildBandCalibration(bandMethod, standards(), { inputs: [], createdAt });
const cls = buildClsCalibration(clsMethod, standards(), { inputs: [], createdAt });

function thrown(action: () => unknown): Error {
  try {
    action();
  } catch (error) {
    return error as Error;
  }
  throw new Error('expected an error, none was thrown');
}

describe('read warnings in results', () => {
  it('a band result carries the scan’s read warnings, in file order, with their codes', () => {
    const warnings: ReadWarning[] = [
      { code: 'trailing-bytes', message: 'sample.jdx: 1 byte after the last ##END= (0x1A), ignored' },
      { code: 'label-text', message: 'sample.jdx line 9: ##PATH LENGTH=18 CM CELL: text "CELL" ignored' },
    ];
    const result = quantifyScan(
      band,
      marked(bandScan(120, { metadata: conditions }), 'sample.jdx', { warnings }),
    );
    expect(result.warnings).toEqual(warnings);
    expect(result.gases[0]?.flags).toEqual([]);
  });

  it('a CLS result lists the read warnings first, then its own (interferent, model) with codes', () => {
    const withWater = parseMethod(
      {
        model: 'cls',
        gases: ['CO'],
        interferents: ['N2O'],
        regions: [[2060, 2230]],
        baselineOrder: 1,
      },
      'method',
    ) as ClsMethod;
    // N2O standards: a second, narrower band at 2200 cm⁻¹ (invented shape; only its separability matters).
    const n2o = (ppm: number, spectrum: Spectrum): Spectrum => {
      const y = Float64Array.from(spectrum.y, (v, i) => {
        const x = spectrum.x[i] as number;
        return v + 1e-3 * ppm * Math.exp(-0.5 * ((x - 2200) / 4) ** 2);
      });
      return { ...spectrum, y };
    };
    const scans = standards().map((standard, i) => ({
      ...standard,
      spectrum: i % 2 === 0 ? n2o(20 * i, standard.spectrum) : standard.spectrum,
      concentrations: [
        ...standard.concentrations,
        { gas: 'N2O', unit: 'ppm' as const, value: i % 2 === 0 ? 20 * i : 0 },
      ],
    }));
    const calibration = buildClsCalibration(withWater, scans, { inputs: [], createdAt });
    const sample = marked(bandScan(120, { metadata: conditions }), 'sample.jdx', { warnings: [LINE_START] });
    const result = quantifyScan(calibration, sample);
    expect(result.warnings[0]).toEqual(LINE_START);
    expect(result.warnings.slice(1).map((w) => w.code)).toEqual(['interferent']);
    expect(result.warnings[1]?.message).toMatch(
      /^interferent N2O modelled at -?[\d.e-]+ ppm \(not reported\)/,
    );
  });
});

describe('saturated points in a sample', () => {
  const sample = bandScan(120, { metadata: conditions });
  const top = [2142.5, 2143, 2143.5];

  it('band: flagged saturated, the note naming how many and where; the value is below the unsaturated one', () => {
    const whole = quantifyScan(band, marked(sample, 'sample.jdx'));
    const result = quantifyScan(band, marked(sample, 'sample.jdx', { undefinedAt: top }));
    const gas = result.gases[0]!;
    expect(gas.flags).toContain('saturated');
    expect(gas.notes.join('\n')).toMatch(
      /3 saturated points at 2142\.5–2143\.5 cm⁻¹ in the band \(transmittance at or below zero as printed\): bridged by linear interpolation from their neighbours, so the area and the result are lower bounds/,
    );
    expect(gas.value).toBeLessThan(whole.gases[0]!.value);
    // The cap lost over 1.5 cm⁻¹ of a band 15 cm⁻¹ wide is small: within 0.1 % of the unsaturated value.
    expect(gas.value).toBeGreaterThan(0.999 * whole.gases[0]!.value);
  });

  it('band: saturated points in a baseline window are left out of the fit and flagged; elsewhere they are harmless', () => {
    const inBaseline = quantifyScan(band, marked(sample, 'sample.jdx', { undefinedAt: [2010, 2010.5] }));
    expect(inBaseline.gases[0]?.flags).toContain('saturated');
    expect(inBaseline.gases[0]?.notes.join('\n')).toMatch(
      /2 saturated points at 2010–2010\.5 cm⁻¹ in the baseline windows: left out of the baseline fit/,
    );
    // The baseline is straight, so leaving two of its points out changes nothing (arithmetic).
    expect(inBaseline.gases[0]?.value).toBeCloseTo(120, 6);
    const outside = quantifyScan(band, marked(sample, 'sample.jdx', { undefinedAt: [2320, 2320.5] }));
    expect(outside.gases[0]?.flags).toEqual([]);
    expect(outside.gases[0]?.value).toBeCloseTo(120, 6);
  });

  it('CLS: the undefined channels are left out and the gas still found; flagged with how many and where', () => {
    const result = quantifyScan(cls, marked(sample, 'sample.jdx', { undefinedAt: top }));
    const gas = result.gases[0]!;
    expect(gas.flags).toContain('saturated');
    // Region 2060–2230 cm⁻¹ at 0.5 cm⁻¹ holds 341 channels, 3 left out (arithmetic).
    expect(gas.notes.join('\n')).toMatch(
      /3 saturated points at 2142\.5–2143\.5 cm⁻¹ on the calibration's channels .*: left out, the gases fitted by least squares on the other 338 of 341 channels/,
    );
    expect(gas.value).toBeCloseTo(120, 3);
  });

  it('CLS: a scan with too few defined channels is refused naming the scan, a typed error', () => {
    const most = Array.from(sample.x).filter((x) => x >= 2060 && x <= 2228.5);
    const error = thrown(() => quantifyScan(cls, marked(sample, 'sample.jdx', { undefinedAt: most })));
    expect(isBandwrightError(error, 'INSUFFICIENT_DATA')).toBe(true);
    expect(error.message).toMatch(
      /^sample\.jdx: 338 saturated points at 2060–2228\.5 cm⁻¹ on the calibration's channels, so the scan cannot be quantified: 338 of the 341 channels are undefined \(saturated\): region 1 keeps 3 channel\(s\), its order-1 baseline needs at least 4$/,
    );
  });
});

describe('standards', () => {
  it('a standard saturated inside the band is refused, naming the file, the count and where', () => {
    const saturated = standards((ppm, s) =>
      ppm === 400 ? marked(s, 'standards/std-400.jdx', { undefinedAt: [2143, 2143.5] }) : s,
    );
    const error = thrown(() => buildBandCalibration(bandMethod, saturated, { inputs: [], createdAt }));
    expect(isBandwrightError(error, 'INVALID_VALUE')).toBe(true);
    expect(error.message).toMatch(
      /^std-400\.jdx \(manifest line 6\): 2 saturated points at 2143–2143\.5 cm⁻¹ \(transmittance at or below zero as printed\) inside the CO band and baseline windows 2040–2245 cm⁻¹, 2000–2030 cm⁻¹, 2255–2290 cm⁻¹; a standard must not be saturated/,
    );
    const clsError = thrown(() => buildClsCalibration(clsMethod, saturated, { inputs: [], createdAt }));
    expect(clsError.message).toMatch(
      /^std-400\.jdx \(manifest line 6\): 2 saturated points at 2143–2143\.5 cm⁻¹ .* inside the region 2060–2230 cm⁻¹; a standard must not be saturated/,
    );
  });

  it('saturated points outside the windows and regions are harmless', () => {
    const harmless = standards((ppm, s) =>
      ppm === 400 ? marked(s, 'standards/std-400.jdx', { undefinedAt: [2330, 2330.5] }) : s,
    );
    expect(
      buildBandCalibration(bandMethod, harmless, { inputs: [], createdAt }).gases[0]?.model.coefficients.b,
    ).toBeCloseTo(band.gases[0]!.model.coefficients.b, 10);
    expect(() => buildClsCalibration(clsMethod, harmless, { inputs: [], createdAt })).not.toThrow();
  });

  it('read warnings of the standards go into the calibration’s warnings with file and code, and into its summary', () => {
    const warned = standards((ppm, s) =>
      ppm === 100 ? marked(s, 'standards/std-100.jdx', { warnings: [LINE_START] }) : s,
    );
    for (const calibration of [
      buildBandCalibration(bandMethod, warned, { inputs: [], createdAt }),
      buildClsCalibration(clsMethod, warned, { inputs: [], createdAt }),
    ]) {
      expect(calibration.warnings).toContain(
        `standard std-100.jdx (manifest line 4): ${LINE_START.message} (line-start-x)`,
      );
      expect(formatCalibrationSummary(calibration)).toContain(`(line-start-x)`);
    }
  });
});

describe('quantitative reference spectra are not scans', () => {
  const reference = makeSpectrum({
    x: bandScan(1).x,
    y: Float64Array.from(bandScan(1).y, (v) => v * 1e-3),
    yKind: 'absorbance-per-amount',
    metadata: { source: 'references/co-296K.jdx' },
  });

  it('quantify refuses one as a sample, naming the file and what it is', () => {
    for (const calibration of [band, cls]) {
      const error = thrown(() => quantifyScan(calibration, reference));
      expect(isBandwrightError(error, 'INVALID_VALUE')).toBe(true);
      expect(error.message).toBe(
        'references/co-296K.jdx: a quantitative reference spectrum (decadic absorbance per µmol/mol per metre ' +
          'of path), not a measured spectrum; it is usable as a reference spectrum of its gas (absorbance only ' +
          'for a stated amount and path length), not as a sample scan',
      );
    }
  });

  it('calibrate refuses one as a standard', () => {
    const withReference = standards((ppm, s) => (ppm === 50 ? reference : s));
    expect(() => buildBandCalibration(bandMethod, withReference, { inputs: [], createdAt })).toThrow(
      /^references\/co-296K\.jdx: a quantitative reference spectrum .* not as a standard$/,
    );
    expect(() => buildClsCalibration(clsMethod, withReference, { inputs: [], createdAt })).toThrow(
      /not as a standard$/,
    );
  });
});
