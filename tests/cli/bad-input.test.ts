/**
 * Bad input: each case gets a message naming the file, line or parameter, the value and the
 * rule; exit status 1 (2 for usage errors); and no output file written or changed.
 */
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bandScan, writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { gasAt, scanFailure, type QuantifyDocument } from '../helpers/documents.js';
import { parseJsonAs, readJsonAs } from '../helpers/json.js';
import type { Calibration } from '../../src/calibration/calibration.js';

const folder = temporaryFolder();
const at = (name: string) => join(folder.path, name);
const conditions = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const bandArgs = ['--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2030,2255:2290'];

function manifest(name: string, rows: string[], header = 'scan,CO_ppm'): string {
  writeFileSync(at(name), `${[header, ...rows].join('\n')}\n`);
  return at(name);
}

beforeAll(() => {
  [0, 50, 100, 200, 400].forEach((ppm) =>
    writeScan(at(`s${ppm}.csv`), bandScan(ppm, { metadata: conditions })),
  );
  writeScan(at('bare.csv'), bandScan(100, { metadata: {} }));
  writeScan(at('narrow.csv'), bandScan(100, { metadata: conditions, from: 2100, to: 2300 }));
  writeFileSync(at('empty.csv'), '');
  writeFileSync(at('nonnumeric.csv'), 'wavenumber_cm-1,absorbance\n2000,0.1\n2001,abc\n');
  writeFileSync(at('nan.csv'), 'wavenumber_cm-1,absorbance\n2000,0.1\n2001,NaN\n');
  writeFileSync(
    at('duplicate-x.csv'),
    'wavenumber_cm-1,absorbance\n2000,0.1\n2001,0.2\n2001,0.3\n2002,0.1\n',
  );
  writeFileSync(at('zigzag-x.csv'), 'wavenumber_cm-1,absorbance\n2000,0.1\n2002,0.2\n2001,0.3\n2003,0.1\n');
  manifest('good.csv', ['s0.csv,0', 's50.csv,50', 's100.csv,100', 's200.csv,200', 's400.csv,400']);
});
afterAll(() => folder.cleanup());

/** Runs a command that must fail, and checks that it wrote nothing new. */
async function expectFailure(args: string[], message: RegExp, status = 1): Promise<void> {
  const before = folder.files();
  const run = await runCli(...args);
  expect(run.stderr).toMatch(message);
  expect(run.status).toBe(status);
  expect(folder.files()).toEqual(before);
}

describe('calibrate refuses bad input', () => {
  const out = ['-o', at('out.json')];
  it.each([
    ['a missing manifest', () => [at('nope.csv'), ...bandArgs, ...out], /nope.csv: no such file/],
    [
      'an empty manifest',
      () => [manifest('m-empty.csv', [], ''), ...bandArgs, ...out],
      /m-empty.csv: the table is empty/,
    ],
    [
      'a missing scan',
      () => [manifest('m-missing.csv', ['gone.csv,10']), ...bandArgs, ...out],
      /m-missing.csv line 2: standard scan .*gone.csv does not exist/,
    ],
    [
      'an empty scan',
      () => [manifest('m-emptyscan.csv', ['empty.csv,10']), ...bandArgs, ...out],
      /empty.csv/,
    ],
    [
      'a non-numeric cell in a scan',
      () => [manifest('m-nonnum.csv', ['nonnumeric.csv,10']), ...bandArgs, ...out],
      /nonnumeric.csv line 3/,
    ],
    ['NaN in a scan', () => [manifest('m-nan.csv', ['nan.csv,10']), ...bandArgs, ...out], /nan.csv line 3/],
    [
      'duplicate x',
      () => [manifest('m-dupx.csv', ['duplicate-x.csv,10']), ...bandArgs, ...out],
      /duplicate-x.csv.*(duplicate|monotonic|increasing)/i,
    ],
    [
      'non-monotonic x',
      () => [manifest('m-zigzag.csv', ['zigzag-x.csv,10']), ...bandArgs, ...out],
      /zigzag-x.csv.*(monotonic|increasing|decreasing)/i,
    ],
    [
      'a non-numeric concentration',
      () => [manifest('m-conc.csv', ['s0.csv,ten']), ...bandArgs, ...out],
      /m-conc.csv line 2: CO_ppm = "ten", must be a number/,
    ],
    [
      'a band outside the scan',
      () => [
        manifest('m-narrow.csv', ['narrow.csv,100', 's0.csv,0', 's50.csv,50', 's200.csv,200']),
        ...bandArgs,
        ...out,
      ],
      /narrow.csv: band 2040–2245 cm⁻¹ lies outside the scan's range 2100–2300 cm⁻¹/,
    ],
    [
      'a baseline window outside the scan',
      () => [at('good.csv'), '--gas', 'CO', '--band', '2040:2245', '--baseline', '1900:1940', ...out],
      /baseline window 1 1900–1940 cm⁻¹ lies outside/,
    ],
    [
      'a baseline window overlapping the band',
      () => [at('good.csv'), '--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2050', ...out],
      /baseline\[0\] = 2000–2050 cm⁻¹ overlaps the band 2040–2245 cm⁻¹/,
    ],
    [
      'too few distinct standards for a quadratic',
      () => [
        manifest('m-few.csv', ['s0.csv,0', 's50.csv,50', 's100.csv,100']),
        ...bandArgs,
        '--model',
        'quadratic',
        ...out,
      ],
      /distinct concentration levels/,
    ],
    [
      'all standards at one concentration',
      () => [manifest('m-one.csv', ['s100.csv,100', 's100.csv,100', 's100.csv,100']), ...bandArgs, ...out],
      /one concentration|distinct concentration levels/,
    ],
    [
      'a negative path length',
      () => [manifest('m-neg.csv', ['s0.csv,0,-1'], 'scan,CO_ppm,path_length_m'), ...bandArgs, ...out],
      /m-neg.csv line 2: path_length_m = -1, must be > 0/,
    ],
    [
      'a zero path length',
      () => [manifest('m-zero.csv', ['s0.csv,0,0'], 'scan,CO_ppm,path_length_m'), ...bandArgs, ...out],
      /m-zero.csv line 2: path_length_m = 0, must be > 0/,
    ],
    [
      'missing conditions',
      () => [manifest('m-bare.csv', ['bare.csv,100', 's0.csv,0', 's50.csv,50']), ...bandArgs, ...out],
      /bare.csv \(manifest line 2\): no path length .*option --path-length\)/,
    ],
    [
      'an unknown gas',
      () => [at('good.csv'), '--gas', 'XQ', '--band', '2040:2245', ...out],
      /gas "XQ" is not in the species table/,
    ],
    [
      'an IR-inactive gas',
      () => [manifest('m-n2.csv', ['s0.csv,0'], 'scan,N2_ppm'), ...bandArgs, ...out],
      /N2 \(nitrogen\) cannot be measured by infrared absorption: homonuclear diatomic/,
    ],
    [
      'a manifest pointing outside its folder',
      () => [manifest('m-outside.csv', ['../elsewhere.csv,0']), ...bandArgs, ...out],
      /must be a path inside the manifest's folder/,
    ],
  ])('%s', async (_name, args, message) => {
    await expectFailure(['calibrate', ...args()], message);
  });

  it('refuses to overwrite a calibration without --force, and replaces it with --force', async () => {
    const first = await runCli('calibrate', at('good.csv'), ...bandArgs, '-o', at('kept.json'));
    expect(first.status).toBe(0);
    const original = readFileSync(at('kept.json'), 'utf8');
    await expectFailure(
      ['calibrate', at('good.csv'), ...bandArgs, '--model', 'origin', '-o', at('kept.json')],
      /kept.json exists; use --force to replace it/,
    );
    expect(readFileSync(at('kept.json'), 'utf8')).toBe(original);
    const forced = await runCli(
      'calibrate',
      at('good.csv'),
      ...bandArgs,
      '--model',
      'origin',
      '-o',
      at('kept.json'),
      '--force',
    );
    expect(forced.status).toBe(0);
    expect(readFileSync(at('kept.json'), 'utf8')).not.toBe(original);
  });

  it('treats a malformed option value as a usage error (status 2)', async () => {
    await expectFailure(
      ['calibrate', at('good.csv'), '--gas', 'CO', '--band', '2040-2245', '-o', at('x.json')],
      /--band = "2040-2245", must be low:high/,
      2,
    );
    await expectFailure(
      ['calibrate', at('good.csv'), ...bandArgs, '--path-length', 'long', '-o', at('x.json')],
      /--path-length = "long", must be a number/,
      2,
    );
  });
});

describe('quantify refuses bad input', () => {
  beforeAll(async () => {
    expect((await runCli('calibrate', at('good.csv'), ...bandArgs, '-o', at('co.json'))).status).toBe(0);
  });

  it('refuses a tampered calibration, saying so, and writes no results', async () => {
    const calibration = readJsonAs<Calibration>(at('co.json'));
    calibration.gases[0]!.model.coefficients.b *= 1.1;
    writeFileSync(at('tampered.json'), JSON.stringify(calibration, null, 2));
    await expectFailure(
      ['quantify', at('tampered.json'), at('s100.csv'), '--csv', at('r.csv')],
      /tampered.json: content does not match its recorded sha256/,
    );
    expect(existsSync(at('r.csv'))).toBe(false);
  });

  it('refuses a calibration of a newer schema', async () => {
    const calibration = readJsonAs<Calibration>(at('co.json'));
    writeFileSync(at('future.json'), JSON.stringify({ ...calibration, schemaVersion: '9.0' }));
    await expectFailure(
      ['quantify', at('future.json'), at('s100.csv')],
      /schemaVersion 9.0 is newer than this tool reads/,
    );
  });

  it('reports a scan without conditions in its row and exits 1, keeping the good scans', async () => {
    const run = await runCli('quantify', at('co.json'), at('s100.csv'), at('bare.csv'), '--json');
    expect(run.status).toBe(1);
    const results = parseJsonAs<QuantifyDocument>(run.stdout).results;
    expect(gasAt(results[0]).value).toBeCloseTo(100, 0);
    expect(scanFailure(results[1]).error).toMatch(/bare.csv: no path length .*option --path-length\)/);
  });

  it('takes missing conditions from options', async () => {
    const run = await runCli(
      'quantify',
      at('co.json'),
      at('bare.csv'),
      '--json',
      '--path-length',
      '1',
      '--temperature',
      '296.15',
      '--pressure',
      '101.325',
    );
    expect(run.status).toBe(0);
    expect(gasAt(parseJsonAs<QuantifyDocument>(run.stdout).results[0]).value).toBeCloseTo(100, 0);
  });

  it('refuses an O2 correction too near air, naming the values', async () => {
    await expectFailure(
      ['quantify', at('co.json'), at('s100.csv'), '--o2', '20.8', '--o2-ref', '7'],
      /measured O2 = 20.8 % is within 0.5 % points of the O2 of air/,
    );
  });
});

describe('manifest warnings', () => {
  it('warns when one scan is listed twice (one measurement counted as two standards)', async () => {
    manifest('m-twice.csv', [
      's0.csv,0',
      's50.csv,50',
      's50.csv,50',
      's100.csv,100',
      's200.csv,200',
      's400.csv,400',
    ]);
    const run = await runCli('calibrate', at('m-twice.csv'), ...bandArgs, '-o', at('twice.json'));
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/m-twice.csv line 4: scan s50.csv is already listed at line 3/);
  });
});
