/**
 * Resource limits: every limit refuses a larger input with a message that names the file, the
 * size and the variable that raises it, before the content is parsed; the environment variables
 * change the limits; a malformed variable is a usage error (status 2); `--help` lists them.
 */
import { cpSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { BandwrightError } from '../../src/errors.js';
import { readJson } from '../../src/store/json-file.js';
import { RESOURCE_LIMIT_SETTINGS, resourceLimits } from '../../src/resource-limits.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-limits-');
const at = (name: string): string => join(folder.path, name);
const lab = join(import.meta.dirname, '..', 'fixtures', 'bad', 'lab');
const band = ['--gas', 'CO', '--band', '2040:2245', '--baseline', '2000:2030,2255:2290'];
const variables = Object.values(RESOURCE_LIMIT_SETTINGS).map((s) => s.variable);

beforeAll(() => {
  for (const name of [
    's0.csv',
    's50.csv',
    's100.csv',
    's200.csv',
    's400.csv',
    'standards.csv',
    'co.calibration.json',
    'method.json',
  ])
    cpSync(join(lab, name), at(name));
  cpSync(join(lab, 'scans', 'good.jdx'), at('good.jdx'));
});
afterEach(() => {
  for (const variable of variables) delete process.env[variable];
});
afterAll(() => folder.cleanup());

/** Runs a command that must fail with the message and status, writing nothing. */
async function refused(args: string[], message: string, status = 1): Promise<void> {
  const before = folder.files();
  const run = await runCli(...args);
  expect(run.stderr).toContain(message);
  expect(run.status, run.stderr).toBe(status);
  expect(folder.files()).toEqual(before);
}

describe('defaults', () => {
  it('are the documented ones when no variable is set', () => {
    expect(resourceLimits({})).toEqual({
      maxScanBytes: 200_000_000,
      maxPoints: 2_000_000,
      maxTableBytes: 64 * 1024 * 1024,
      maxTableRows: 1_000_000,
    });
    expect(resourceLimits({ BANDWRIGHT_MAX_POINTS: '5e6', BANDWRIGHT_MAX_TABLE_ROWS: ' 10 ' })).toMatchObject(
      { maxPoints: 5_000_000, maxTableRows: 10 },
    );
  });

  it.each(['abc', '-5', '1.5', '0', '1e400', '2^20'])(
    'BANDWRIGHT_MAX_POINTS=%s is a usage error naming the variable (status 2)',
    async (value) => {
      expect(() => resourceLimits({ BANDWRIGHT_MAX_POINTS: value })).toThrow(BandwrightError);
      process.env.BANDWRIGHT_MAX_POINTS = value;
      await refused(
        ['inspect', at('s100.csv')],
        `BANDWRIGHT_MAX_POINTS = ${JSON.stringify(value)}, must be a whole number >= 2 (most data points in one scan)`,
        2,
      );
    },
  );

  it('--help lists every variable with its default', async () => {
    const run = await runCli('--help');
    expect(run.status).toBe(0);
    for (const setting of Object.values(RESOURCE_LIMIT_SETTINGS))
      expect(run.stdout).toMatch(new RegExp(`${setting.variable}\\s+.*\\(default ${setting.default}\\)`));
  });
});

describe('each limit refuses a larger input, naming it and the variable', () => {
  it('scan points (tables and JCAMP-DX): BANDWRIGHT_MAX_POINTS', async () => {
    process.env.BANDWRIGHT_MAX_POINTS = '50';
    await refused(
      ['inspect', at('s100.csv')],
      's100.csv line 55: more than 50 data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)',
    );
    await refused(
      ['inspect', at('good.jdx')],
      'good.jdx: ##NPOINTS=79, more than 50 data points, the limit (maxPoints; BANDWRIGHT_MAX_POINTS raises it)',
    );
    await refused(
      ['calibrate', at('standards.csv'), ...band, '-o', at('out.json')],
      's0.csv line 55: more than 50 data points',
    );
    process.env.BANDWRIGHT_MAX_POINTS = '79';
    expect((await runCli('inspect', at('s100.csv'), at('good.jdx'))).status).toBe(0);
  });

  it('scan bytes, read directly or as a standard: BANDWRIGHT_MAX_SCAN_BYTES', async () => {
    process.env.BANDWRIGHT_MAX_SCAN_BYTES = '1000';
    await refused(['inspect', at('s100.csv')], 's100.csv: ');
    await refused(
      ['inspect', at('s100.csv')],
      'bytes, above the limit of 1000 bytes (BANDWRIGHT_MAX_SCAN_BYTES raises it)',
    );
    await refused(
      ['calibrate', at('standards.csv'), ...band, '-o', at('out.json')],
      'standards.csv line 2: ',
    );
    await refused(
      ['calibrate', at('standards.csv'), ...band, '-o', at('out.json')],
      'above the limit of 1000 bytes (BANDWRIGHT_MAX_SCAN_BYTES raises it)',
    );
  });

  it('table, calibration and history bytes: BANDWRIGHT_MAX_TABLE_BYTES', async () => {
    process.env.BANDWRIGHT_MAX_TABLE_BYTES = '60';
    await refused(
      ['calibrate', at('standards.csv'), ...band, '-o', at('out.json')],
      'standards.csv: 71 bytes, above the limit of 60 bytes (BANDWRIGHT_MAX_TABLE_BYTES raises it)',
    );
    await refused(['quantify', at('co.calibration.json'), at('s100.csv')], 'co.calibration.json: ');
    await refused(
      ['quantify', at('co.calibration.json'), at('s100.csv')],
      'bytes, above the limit of 60 bytes (BANDWRIGHT_MAX_TABLE_BYTES raises it)',
    );
  });

  it('table rows: BANDWRIGHT_MAX_TABLE_ROWS', async () => {
    process.env.BANDWRIGHT_MAX_TABLE_ROWS = '4';
    await refused(
      ['calibrate', at('standards.csv'), ...band, '-o', at('out.json')],
      'standards.csv: more than 4 data rows, the limit (BANDWRIGHT_MAX_TABLE_ROWS raises it)',
    );
    process.env.BANDWRIGHT_MAX_TABLE_ROWS = '5';
    const run = await runCli('calibrate', at('standards.csv'), ...band, '-o', at('limits-out/co.json'));
    expect(run.status, run.stderr).toBe(0);
  });

  it('method files: fixed at 1 MiB and 32 levels of nesting, whatever the variables say', async () => {
    process.env.BANDWRIGHT_MAX_TABLE_BYTES = String(64 * 1024 * 1024);
    const method = JSON.stringify({ gases: [{ name: 'CO', band: [2040, 2245] }] });
    writeFileSync(at('big.method.json'), method + ' '.repeat(1024 * 1024 + 1 - method.length));
    await refused(
      ['calibrate', at('standards.csv'), '--method', at('big.method.json'), '-o', at('out.json')],
      'big.method.json: 1048577 bytes, above the limit of 1048576 bytes',
    );
    writeFileSync(at('deep.method.json'), `{"gases": ${'['.repeat(33)}${']'.repeat(33)}}`);
    await refused(
      ['calibrate', at('standards.csv'), '--method', at('deep.method.json'), '-o', at('out.json')],
      'deep.method.json line 1: nested deeper than 32 levels',
    );
  });

  it('JSON nesting is checked without recursion, so 100,000 levels give a message, not a stack overflow', () => {
    writeFileSync(at('very-deep.json'), '['.repeat(100_000) + ']'.repeat(100_000));
    expect(() => readJson(at('very-deep.json'))).toThrow(
      /very-deep.json line 1: nested deeper than 64 levels/,
    );
  });
});
