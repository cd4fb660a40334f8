/**
 * One test per defect that hostile and broken input revealed in the readers and the core, each
 * checking the refusal (code and message) that replaced a crash, a misleading message or a
 * number that looked like a result.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import {
  calibrationHash,
  sealCalibration,
  verifyCalibration,
  type Calibration,
  type CalibrationBody,
} from '../../src/calibration/calibration.js';
import { buildBandCalibration } from '../../src/calibration/build.js';
import { parseMethod, type BandMethod } from '../../src/calibration/method.js';
import { quantifyBandScan } from '../../src/calibration/quantify.js';
import { BandwrightError } from '../../src/errors.js';
import { parseTable } from '../../src/formats/csv-table.js';
import { parseJcamp } from '../../src/formats/jcamp/read.js';
import { parseManifest, readManifest } from '../../src/store/manifest.js';
import { parseSpectrumTable } from '../../src/formats/spectrum-table/read.js';
import { loadStandards } from '../../src/store/standards.js';
import { fitUnivariate } from '../../src/models/univariate/fit.js';
import type { UnivariateModel } from '../../src/models/univariate/model.js';
import { predictUnivariate } from '../../src/models/univariate/predict.js';
import { makeSpectrum } from '../../src/spectrum/spectrum.js';
import { bandScan } from '../helpers/band-scans.js';
import { temporaryFolder } from '../helpers/cli.js';
import { deleteJsonAt, parseJsonAs, setJsonAt } from '../helpers/json.js';

const bytes = (text: string): Uint8Array => new TextEncoder().encode(text);
const conditions = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };

/** A copy of a calibration's content without its hash, as the file holds it, to edit and re-seal. */
function bodyOf(calibration: Calibration): CalibrationBody {
  const { sha256: _sha256, ...body } = parseJsonAs<Calibration>(JSON.stringify(calibration));
  return body;
}

function thrown(run: () => unknown): BandwrightError {
  try {
    run();
  } catch (error) {
    if (error instanceof BandwrightError) return error;
    throw new Error(`expected a BandwrightError, got ${String(error)}`, { cause: error });
  }
  throw new Error('expected a BandwrightError, nothing was thrown');
}

// Invented standards on a straight line (response = 0.02·x + 0.001), for the model checks only.
const line: UnivariateModel = fitUnivariate(
  { concentration: [0, 50, 100, 200, 400], response: [0.0011, 1.0009, 2.0012, 4.0008, 8.0011] },
  { form: 'linear' },
);

describe('univariate model', () => {
  it('a response so far outside the calibration that its standard error overflows is NO_SOLUTION, not an interval of ±Infinity', () => {
    // Before: value -3.9e303 with se = Infinity, written as "se": null in JSON and exit status 0.
    const error = thrown(() => predictUnivariate(line, [-1e301]));
    expect(error.code).toBe('NO_SOLUTION');
    expect(error.message).toMatch(/not a finite estimate/);
  });

  it('a damaged model with slope 0 gives NO_SOLUTION, not a concentration of Infinity', () => {
    const damaged: UnivariateModel = { ...line, coefficients: { ...line.coefficients, b: 0 } };
    expect(thrown(() => predictUnivariate(damaged, [2])).code).toBe('NO_SOLUTION');
  });

  it('concentrations or responses whose squares overflow are refused by name before the fit', () => {
    // Before: "sxx = Infinity, must be a finite number > 0", naming no input.
    const error = thrown(() =>
      fitUnivariate({ concentration: [0, 1e300, 2e300], response: [0, 1, 2] }, { form: 'linear' }),
    );
    expect(error.code).toBe('INVALID_VALUE');
    expect(error.message).toMatch(/concentration\[1\] = 1e\+300, must be within ±1e\+100/);
  });
});

describe('manifest', () => {
  it('a concentration above 100 % by volume is refused (a mole fraction cannot exceed 1; common practice)', () => {
    const error = thrown(() => parseManifest('scan,CO_pct\na.csv,0\nb.csv,100.5\n', 'm.csv'));
    expect(error.message).toBe(
      'm.csv line 3: CO_pct = 100.5, above 100 % by volume (10⁶ ppm); a concentration cannot exceed the whole gas',
    );
    expect(parseManifest('scan,CO_pct\na.csv,100\n', 'm.csv').entries[0]?.concentrations[0]?.value).toBe(100);
  });
});

describe('tables with other line ends', () => {
  it('CR-only line ends give the right line numbers (before: every row was "line 1")', () => {
    const error = thrown(() => parseTable('scan,CO_ppm\ra.csv,1\rb.csv,2,3\r', 'm.csv'));
    expect(error.message).toMatch(/^m.csv line 3: 3 cells, the header has 2/);
  });

  it('mixed CRLF and LF line ends read as the rows a person sees (before: rows merged into wrong cell counts)', () => {
    const table = parseTable('scan,CO_ppm\r\na.csv,1\nb.csv,2\r\nc.csv,3\n', 'm.csv');
    expect(table.rows.map((r) => [r.line, r.cells.get('scan'), r.cells.get('co_ppm')])).toEqual([
      [2, 'a.csv', '1'],
      [3, 'b.csv', '2'],
      [4, 'c.csv', '3'],
    ]);
  });

  it('a line break inside a quoted cell stays part of the cell (RFC 4180)', () => {
    const table = parseTable('a,b\r\n"x\r\ny",2\r\n', 't.csv');
    expect(table.rows[0]?.cells.get('a')).toBe('x\r\ny');
  });
});

describe('scans with CR-only line ends', () => {
  const table = '# path_length_m = 1\rwavenumber_cm-1,absorbance\r2000,0.1\r2001,0.2\r';
  it('a spectrum table says so instead of quoting the whole file as one comment value', () => {
    const error = thrown(() => parseSpectrumTable(bytes(table), { source: 'old.csv' }));
    expect(error.message).toBe(
      'old.csv: lines end with CR alone (an old Mac OS export); save the file with LF or CRLF line ends',
    );
  });
  it('a JCAMP-DX file is read line by line, with a warning (before: "##JCAMP-DX= must follow ##TITLE=")', () => {
    const text =
      '##TITLE=t\r##JCAMP-DX=5.01\r##XUNITS=1/CM\r##YUNITS=ABSORBANCE\r##XYPOINTS=(XY..XY)\r1,2\r3,4\r##END=\r';
    const spectrum = parseJcamp(text, { source: 'old.jdx' });
    expect(spectrum.x.length).toBe(2);
    expect(spectrum.metadata.warnings?.[0]?.message).toMatch(/^old.jdx: lines end with CR alone/);
  });
  it('a long comment value is shortened in the message', () => {
    const error = thrown(() =>
      parseSpectrumTable(bytes(`# path_length_m = ${'9'.repeat(500)}x\nx,A\n1,2\n2,3\n`), {
        source: 'long.csv',
      }),
    );
    expect(error.message.length).toBeLessThan(200);
  });
});

describe('band responses that overflow', () => {
  const method = parseMethod(
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
  const hot = (): ReturnType<typeof bandScan> => {
    const scan = bandScan(100, { metadata: conditions, step: 2 });
    const y = Float64Array.from(scan.y, (v, i) =>
      (scan.x[i] as number) > 2100 && (scan.x[i] as number) < 2180 ? 1e308 : v,
    );
    return makeSpectrum({
      x: scan.x,
      y,
      yKind: 'absorbance',
      metadata: { ...conditions, source: 'hot.csv' },
    });
  };

  it('quantify names the scan and the band (before: "responses[0] = Infinity, must be a finite number")', () => {
    const standards = [0, 50, 100, 200].map((ppm, i) => ({
      scan: `s${ppm}.csv`,
      line: i + 2,
      spectrum: bandScan(ppm, { metadata: conditions, step: 2 }),
      concentrations: [{ gas: 'CO', unit: 'ppm' as const, value: ppm }],
      conditions: {},
    }));
    const calibration = buildBandCalibration(method, standards, { inputs: [] });
    const error = thrown(() => quantifyBandScan(calibration, hot()));
    expect(error.message).toMatch(
      /^hot.csv: CO band 2040–2245 cm⁻¹ gives an area of Infinity, must be finite/,
    );
  });

  it('calibrate names the standard and its manifest line', () => {
    const standards = [
      {
        scan: 'hot.csv',
        line: 2,
        spectrum: hot(),
        concentrations: [{ gas: 'CO', unit: 'ppm' as const, value: 10 }],
        conditions: {},
      },
    ];
    expect(thrown(() => buildBandCalibration(method, standards, { inputs: [] })).message).toMatch(
      /^hot.csv \(manifest line 2\): CO band .* gives an area of Infinity/,
    );
  });
});

describe('a calibration whose hash matches but whose content is malformed', () => {
  const method = parseMethod(
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
  const standards = [0, 50, 100, 200].map((ppm, i) => ({
    scan: `s${ppm}.csv`,
    line: i + 2,
    spectrum: bandScan(ppm, { metadata: conditions, step: 2 }),
    concentrations: [{ gas: 'CO', unit: 'ppm' as const, value: ppm }],
    conditions: {},
  }));
  const good = buildBandCalibration(method, standards, { inputs: [], createdAt: '2026-01-01T00:00:00.000Z' });
  /** The calibration with one edit, re-sealed so the hash matches the edited content. */
  const resealed = (edit: (c: CalibrationBody) => void): Calibration => {
    const body = bodyOf(good);
    edit(body);
    return sealCalibration(body);
  };

  it.each([
    // Before: TypeError "Cannot read properties of undefined (reading 'coefficients')".
    [
      'a missing model',
      (c: CalibrationBody) => deleteJsonAt(c, ['gases', 0, 'model']),
      /gases\[0\]\.model = missing, must be an object/,
    ],
    // Before: TypeError "calibration.gases is not iterable".
    ['gases not a list', (c: CalibrationBody) => setJsonAt(c, ['gases'], {}), /gases = \{\}, must be a list/],
    // Before: a concentration of null (NaN) with exit status 0.
    [
      'a text coefficient',
      (c: CalibrationBody) => setJsonAt(c, ['gases', 0, 'model', 'coefficients', 'b'], 'x'),
      /gases\[0\]\.model\.coefficients\.b = "x", must be a finite number/,
    ],
    // Before: -100 ppm for a 100 ppm sample, exit status 0.
    [
      'a negative reference path length',
      (c: CalibrationBody) => (c.reference.pathLength_m = -1),
      /reference\.pathLength_m = -1, must be a number > 0/,
    ],
    [
      'an inverted band',
      (c: CalibrationBody) => setJsonAt(c, ['gases', 0, 'feature', 'band'], [2245, 2040]),
      /gases\[0\]\.feature\.band = \[2245,2040\], must be \[low, high\]/,
    ],
    [
      'an unknown method kind',
      (c: CalibrationBody) => setJsonAt(c, ['method', 'model'], 'neural'),
      /method\.model = "neural", must be one of band, responses, cls/,
    ],
    [
      'an input without a proper hash',
      (c: CalibrationBody) => (c.inputs = [{ role: 'standard', path: 'a.csv', sha256: 'xyz' }]),
      /inputs\[0\]\.sha256 = "xyz", must be 64 lower-case hexadecimal digits/,
    ],
  ])('%s is a SCHEMA error naming the field', (_name, edit, message) => {
    const calibration = resealed(edit);
    expect(calibrationHash(calibration)).toBe(calibration.sha256);
    const error = thrown(() => verifyCalibration(JSON.parse(JSON.stringify(calibration)), 'c.json'));
    expect(error.code).toBe('SCHEMA');
    expect(error.message).toMatch(message);
  });

  it('the unedited calibration verifies', () => {
    expect(verifyCalibration(JSON.parse(JSON.stringify(good)), 'c.json').sha256).toBe(good.sha256);
  });
});

describe('standards that are not files', () => {
  const folder = temporaryFolder();
  afterAll(() => folder.cleanup());
  it('a manifest row naming a folder says which row (before: only "d is a folder")', () => {
    mkdirSync(join(folder.path, 'd'));
    writeFileSync(join(folder.path, 'm.csv'), 'scan,CO_ppm\nd,0\n');
    const manifest = readManifest(join(folder.path, 'm.csv'));
    expect(thrown(() => loadStandards(manifest)).message).toMatch(
      /m\.csv line 2: .*d is a folder, expected a file/,
    );
  });
});

describe('JCAMP-DX writer', () => {
  it('writes a spectrum with subnormal ordinates (before: YFACTOR 1E-331 underflowed and the writer refused it)', async () => {
    const { formatJcamp } = await import('../../src/formats/jcamp/write.js');
    const spectrum = makeSpectrum({
      x: Float64Array.from([2000, 2001, 2002]),
      y: Float64Array.from([9e-323, 0, 0.5e-300]),
      yKind: 'absorbance',
      metadata: {},
    });
    const text = formatJcamp(spectrum, { title: 'tiny', compression: 'affn' });
    expect(text).toMatch(/##YFACTOR=1E-300/);
    expect(Array.from(parseJcamp(text, { source: 'tiny.jdx' }).y)).toEqual([0, 0, 1e-300]);
  });
});

describe('interval ends that were NaN or infinite', () => {
  it('a Fieller interval at a level near 0 has finite ends (before: both NaN when the discriminant rounded below 0)', () => {
    // The standards of the fuzz counterexample (seed 20261201): a nearly flat response.
    const model = fitUnivariate(
      {
        concentration: [10, 0.5, 1, 5, 10, 100, 1e6, 1],
        response: [0.01, 0.01, 0.01, 0.010001874890664796, 0.01, 0.01, 0.01, 0.01],
      },
      { form: 'linear' },
    );
    const estimate = predictUnivariate(model, [-1, -0], {
      level: 8.890919915373989e-104,
      method: 'fieller',
    });
    expect(estimate.unbounded || (Number.isFinite(estimate.low) && Number.isFinite(estimate.high))).toBe(
      true,
    );
    if (!estimate.unbounded) expect(estimate.low as number).toBeLessThanOrEqual(estimate.high as number);
  });

  it('a CLS sample with absorbances of 1e200 is NO_SOLUTION (before: an infinite concentration)', async () => {
    const { fitCls, predictCls } = await import('../../src/models/cls/spectral.js');
    // Invented pure spectrum: a Gaussian on 11 channels; standards at 2 and 5 ppm.
    const pure = Array.from({ length: 11 }, (_, j) => Math.exp(-0.5 * (j / 10 / 0.2) ** 2));
    const model = fitCls(
      {
        channels: 11,
        spectra: [2, 5].map((c) => pure.map((v, j) => c * v + 1e-4 * Math.sin(7 * j + c))),
        concentrations: [[2], [5]],
        phi: [1, 1],
        components: [{ name: 'CO', reported: true, unit: 'ppm' }],
      },
      { baselineOrder: 0 },
    );
    const sample = pure.map((v) => 10 * v);
    sample[2] = 1e200;
    const error = thrown(() => predictCls(model, sample, { phi: 1 }));
    expect(error.code).toBe('NO_SOLUTION');
    expect(error.message).toMatch(/not a finite estimate; its absorbance reaches 1e\+200/);
  });
});

describe('a CLS calibration whose model is damaged but re-sealed', () => {
  it('a negative interval inflation is a SCHEMA error (before: intervals with low above high, found by the calibration fuzz test)', async () => {
    const { buildClsCalibration } = await import('../../src/calibration/build-cls.js');
    const standards = [0, 50, 100, 200, 400].map((ppm, i) => ({
      scan: `s${ppm}.csv`,
      line: i + 2,
      spectrum: bandScan(ppm, { metadata: conditions, step: 4, from: 1990, to: 2300 }),
      concentrations: [{ gas: 'CO', unit: 'ppm' as const, value: ppm }],
      conditions: {},
    }));
    const method = parseMethod(
      { model: 'cls', gases: ['CO'], regions: [[2060, 2230]], baselineOrder: 1 },
      'method',
    );
    const good = buildClsCalibration(method as Parameters<typeof buildClsCalibration>[0], standards, {
      inputs: [],
      createdAt: '2026-01-01T00:00:00.000Z',
    });
    const body = bodyOf(good);
    setJsonAt(body, ['cls', 'model', 'crossValidation', 'inflation', 0], -2.8e165);
    const error = thrown(() =>
      verifyCalibration(JSON.parse(JSON.stringify(sealCalibration(body))), 'c.json'),
    );
    expect(error.code).toBe('SCHEMA');
    expect(error.message).toMatch(
      /c.json: cls.model = .*cannot predict \(a blank gives CO = .*not a finite estimate with a standard error >= 0\)/,
    );
  });

  it('a channel moved far outside the regions is a SCHEMA error, and a scan that does not reach the channels is WINDOW (before: the resampling kernel looped forever, found by the calibration fuzz test)', async () => {
    const { buildClsCalibration, onChannels } = await import('../../src/calibration/build-cls.js');
    const standards = [0, 50, 100, 200, 400].map((ppm, i) => ({
      scan: `s${ppm}.csv`,
      line: i + 2,
      spectrum: bandScan(ppm, { metadata: conditions, step: 4, from: 1990, to: 2300 }),
      concentrations: [{ gas: 'CO', unit: 'ppm' as const, value: ppm }],
      conditions: {},
    }));
    const method = parseMethod(
      { model: 'cls', gases: ['CO'], regions: [[2060, 2230]], baselineOrder: 1 },
      'method',
    );
    const good = buildClsCalibration(method as Parameters<typeof buildClsCalibration>[0], standards, {
      inputs: [],
      createdAt: '2026-01-01T00:00:00.000Z',
    });
    const body = bodyOf(good);
    const grid = body.cls?.model.grid;
    if (grid === undefined || grid === null) expect.fail('the model has no channel grid');
    setJsonAt(body, ['cls', 'model', 'grid', grid.length - 1], 2.2278701032325086e74);
    const error = thrown(() =>
      verifyCalibration(JSON.parse(JSON.stringify(sealCalibration(body))), 'c.json'),
    );
    expect(error.code).toBe('SCHEMA');
    expect(error.message).toMatch(
      /cls.model.grid\[\d+\] = 2.22787\d*e\+74, must lie inside one of cls.regions/,
    );
    const offset = bandScan(100, {
      metadata: { ...conditions, source: 'short.csv' },
      step: 3,
      from: 1990,
      to: 2300,
    });
    const channels = Float64Array.from([2060, 2100, 2400]);
    expect(thrown(() => onChannels(offset, channels, [[2060, 2230]])).message).toMatch(
      /short.csv: covers 1990–2299 cm⁻¹, which does not contain the calibration's channels 2060–2400 cm⁻¹/,
    );
  });
});

describe('JSON numbers beyond the double range', () => {
  it('1e400 in a method is refused where it is written (before: read as Infinity and shown as "[2040,null]")', async () => {
    const { parseJson } = await import('../../src/store/json-file.js');
    const error = thrown(() =>
      parseJson('{\n "gases": [{"name": "CO",\n "band": [2040, 1e400]}]}', 'm.json'),
    );
    expect(error.message).toBe('m.json line 3: number 1e400 is too large for a double-precision number');
    expect(parseJson('{"title": "1e400 in a string is text", "x": 1e300}', 'm.json')).toEqual({
      title: '1e400 in a string is text',
      x: 1e300,
    });
  });
});
