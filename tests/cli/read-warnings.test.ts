/**
 * Read warnings and saturated points through the commands: `inspect` (text and JSON), `quantify`
 * (--json, --csv, --jsonl, the table) and `calibrate` (the calibration's warnings). The readers'
 * own tests cover producing warnings; here the scan parser is wrapped so that files named
 * `*warned*` come back with two warnings and files named `*saturated*` with their band top
 * undefined, the way a lenient reader hands them on.
 */
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { basename, join } from 'node:path';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type * as ScanModule from '../../src/formats/scan.js';
import type { Spectrum } from '../../src/spectrum/spectrum.js';
import { BAND_OPTIONS, bandScan, writeScan } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { parseJsonAs } from '../helpers/json.js';

/** What the wrapped parser adds, by file name. */
function lenient(spectrum: Spectrum, source: string): Spectrum {
  const name = basename(source);
  if (name.includes('warned'))
    return {
      ...spectrum,
      metadata: {
        ...spectrum.metadata,
        warnings: [
          { code: 'trailing-bytes', message: `${source}: 1 byte after the last record (0x1A), ignored` },
          { code: 'label-text', message: `${source} line 3: text after the path length's unit ignored` },
        ],
      },
    };
  if (name.includes('saturated')) {
    const y = Float64Array.from(spectrum.y);
    let count = 0;
    spectrum.x.forEach((x, i) => {
      if (x >= 2142.5 && x <= 2143.5) {
        y[i] = Number.NaN;
        count++;
      }
    });
    return {
      ...spectrum,
      y,
      metadata: {
        ...spectrum.metadata,
        saturatedPoints: count,
        warnings: [
          {
            code: 'saturated',
            message: `${source}: ${count} points with transmittance at or below zero at 2142.5–2143.5 cm⁻¹`,
          },
        ],
      },
    };
  }
  return spectrum;
}

vi.mock('../../src/formats/scan.js', async (importOriginal) => {
  const original = await importOriginal<typeof ScanModule>();
  class LenientParser extends original.ScanParser {
    override parse(...args: Parameters<InstanceType<typeof original.ScanParser>['parse']>): Spectrum {
      return lenient(super.parse(...args), args[1].source);
    }
  }
  return {
    ...original,
    ScanParser: LenientParser,
    parseScan: (...args: Parameters<typeof original.parseScan>) =>
      lenient(original.parseScan(...args), args[1].source),
  };
});

const folder = temporaryFolder();
const at = (name: string) => join(folder.path, name);
const conditions = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
afterAll(() => folder.cleanup());

beforeAll(async () => {
  const rows = ['scan,CO_ppm'];
  for (const ppm of [0, 50, 100, 200, 400]) {
    const name = ppm === 100 ? `std-${ppm}-warned.csv` : `std-${ppm}.csv`;
    writeScan(at(name), bandScan(ppm, { metadata: conditions }));
    rows.push(`${name},${ppm}`);
  }
  writeFileSync(at('standards.csv'), `${rows.join('\n')}\n`);
  for (const name of ['sample-warned.csv', 'sample-saturated.csv', 'sample-plain.csv'])
    writeScan(at(name), bandScan(120, { metadata: conditions }));
  const run = await runCli(
    'calibrate',
    at('standards.csv'),
    ...BAND_OPTIONS,
    '--path-length',
    '1',
    '--temperature',
    '296.15',
    '--pressure',
    '101.325',
    '-o',
    at('co.json'),
  );
  expect(run.status, run.stderr).toBe(0);
});

const scans = () => [at('sample-warned.csv'), at('sample-saturated.csv'), at('sample-plain.csv')];
const conditionFlags = ['--path-length', '1', '--temperature', '296.15', '--pressure', '101.325'];

interface JsonResult {
  scan: string;
  warnings: { code: string; message: string }[];
  gases: { flags: string[]; notes: string[] }[];
}

describe('read warnings through the commands', () => {
  it('calibrate records a standard’s warnings with its file and code, shown in the summary', () => {
    const calibration = parseJsonAs<{ warnings: string[] }>(readFileSync(at('co.json'), 'utf8'));
    expect(calibration.warnings).toEqual([
      expect.stringMatching(
        /^standard std-100-warned\.csv \(manifest line 4\): .*std-100-warned\.csv: 1 byte after the last record \(0x1A\), ignored \(trailing-bytes\)$/,
      ),
      expect.stringMatching(
        /std-100-warned\.csv line 3: text after the path length's unit ignored \(label-text\)$/,
      ),
    ]);
  });

  it('inspect prints each warning under its file; --json carries warnings and the saturated count', async () => {
    const text = await runCli('inspect', ...scans());
    expect(text.status).toBe(0);
    const lines = text.stdout.split('\n');
    const row = lines.findIndex((line) => line.includes('sample-warned.csv'));
    expect(lines[row + 1]).toMatch(
      /^ {2}warning \(trailing-bytes\): .*sample-warned\.csv: 1 byte after the last record/,
    );
    expect(lines[row + 2]).toMatch(/^ {2}warning \(label-text\): /);
    expect(lines[row + 3]).toMatch(/sample-saturated\.csv/);
    const json = await runCli('inspect', ...scans(), '--json');
    const described = parseJsonAs<{
      scans: { scan: string; warnings: { code: string }[]; saturatedPoints?: number }[];
    }>(json.stdout).scans;
    expect(described.map((d) => d.warnings.map((w) => w.code))).toEqual([
      ['trailing-bytes', 'label-text'],
      ['saturated'],
      [],
    ]);
    // 2142.5–2143.5 cm⁻¹ at 0.5 cm⁻¹: 3 points (arithmetic).
    expect(described[1]?.saturatedPoints).toBe(3);
    expect(described[2]?.saturatedPoints).toBeUndefined();
  });

  it('quantify --json, --jsonl and --csv carry each scan’s warnings; saturated points flag the gas', async () => {
    const run = await runCli(
      'quantify',
      at('co.json'),
      ...scans(),
      ...conditionFlags,
      '--json',
      '--jsonl',
      at('r.jsonl'),
      '--csv',
      at('r.csv'),
    );
    expect(run.status, run.stderr).toBe(0);
    const results = parseJsonAs<{ results: JsonResult[] }>(run.stdout).results;
    expect(results[0]?.warnings.map((w) => w.code)).toEqual(['trailing-bytes', 'label-text']);
    expect(results[0]?.warnings[0]?.message).toMatch(/sample-warned\.csv: 1 byte after the last record/);
    expect(results[1]?.warnings.map((w) => w.code)).toEqual(['saturated']);
    expect(results[1]?.gases[0]?.flags).toContain('saturated');
    expect(results[1]?.gases[0]?.notes.join('\n')).toMatch(
      /3 saturated points at 2142\.5–2143\.5 cm⁻¹ in the band/,
    );
    expect(results[2]?.warnings).toEqual([]);
    const lines = readFileSync(at('r.jsonl'), 'utf8')
      .trim()
      .split('\n')
      .map((line) => JSON.parse(line) as JsonResult);
    expect(lines.map((line) => line.warnings)).toEqual(results.map((r) => r.warnings));
    const csv = Papa.parse<Record<string, string>>(readFileSync(at('r.csv'), 'utf8').trim(), {
      header: true,
    });
    expect(csv.data.map((row) => row.warnings)).toEqual(['trailing-bytes label-text', 'saturated', '']);
    expect(csv.data[1]?.CO_flags).toBe('saturated');
  });

  it('the HTML report lists each warning with its code beside the sample', async () => {
    const run = await runCli(
      'quantify',
      at('co.json'),
      at('sample-warned.csv'),
      ...conditionFlags,
      '--quiet',
      '--report',
      at('report.html'),
    );
    expect(run.status, run.stderr).toBe(0);
    const html = readFileSync(at('report.html'), 'utf8');
    expect(html).toMatch(
      /sample-warned\.csv: 1 byte after the last record \(0x1A\), ignored \(trailing-bytes\)/,
    );
  });

  it('the quantify table lists each warning with its code under Notes', async () => {
    const run = await runCli('quantify', at('co.json'), at('sample-warned.csv'), ...conditionFlags);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toMatch(
      /Notes:\n {2}.*sample-warned\.csv: 1 byte after the last record \(0x1A\), ignored \(trailing-bytes\)/,
    );
  });

  it('calibrate refuses a standard saturated inside its band, naming the file, the count and where', async () => {
    writeScan(at('std-300-saturated.csv'), bandScan(300, { metadata: conditions }));
    writeFileSync(
      at('saturated.csv'),
      `${readFileSync(at('standards.csv'), 'utf8')}std-300-saturated.csv,300\n`,
    );
    const run = await runCli(
      'calibrate',
      at('saturated.csv'),
      ...BAND_OPTIONS,
      ...conditionFlags,
      '-o',
      at('no.json'),
    );
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(
      /std-300-saturated\.csv \(manifest line 7\): 3 saturated points at 2142\.5–2143\.5 cm⁻¹ .* inside the CO band and baseline windows .*a standard must not be saturated/,
    );
    expect(folder.files()).not.toContain('no.json');
  });

  it('watch keeps appending to a results CSV made before the warnings column, in that file’s columns', async () => {
    mkdirSync(at('incoming'));
    writeScan(at('incoming/warned-1.csv'), bandScan(120, { metadata: conditions }));
    const earlier = 'scan,CO_ppm,CO_low,CO_high,CO_flags,residual_rms,calibration_sha256,error\n';
    writeFileSync(at('earlier.csv'), `${earlier}old.csv,1,0.9,1.1,,0,0000,\n`);
    const run = await runCli(
      'watch',
      at('co.json'),
      at('incoming'),
      '--csv',
      at('earlier.csv'),
      '--once',
      '--settle',
      '50',
      ...conditionFlags,
    );
    expect(run.status, run.stderr).toBe(0);
    const parsed = Papa.parse<string[]>(readFileSync(at('earlier.csv'), 'utf8').trim());
    expect(parsed.data).toHaveLength(3);
    expect(parsed.data.map((row) => row.length)).toEqual([8, 8, 8]);
    expect(parsed.data[2]?.[0]).toMatch(/warned-1\.csv$/);
    // A new file gets the warnings column.
    const fresh = await runCli(
      'watch',
      at('co.json'),
      at('incoming'),
      '--csv',
      at('fresh.csv'),
      '--once',
      '--settle',
      '50',
      ...conditionFlags,
    );
    expect(fresh.status, fresh.stderr).toBe(0);
    const rows = Papa.parse<Record<string, string>>(readFileSync(at('fresh.csv'), 'utf8').trim(), {
      header: true,
    });
    expect(rows.data[0]?.warnings).toBe('trailing-bytes label-text');
  });
});
