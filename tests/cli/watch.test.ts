/**
 * `watch`: a scan written in pieces is read once, whole; files renamed into place are taken at
 * once; `--once` for cron goes on from its record; bad files get error rows; results files of
 * another calibration are refused. Known truth: Gaussian bands of analytic area
 * (tests/helpers/band-scans.ts; Beer–Lambert for gases, DESIGN §3).
 */
import { spawn } from 'node:child_process';
import { appendFileSync, existsSync, mkdirSync, readFileSync, renameSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { formatSpectrumCsv } from '../../src/formats/spectrum-csv-write.js';
import { BAND_OPTIONS, bandScan, writeScan, writeStandardSeries } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { gasAt, scanFailure, type ResultLine, type WatchStateLine } from '../helpers/documents.js';
import { parseJsonLinesAs } from '../helpers/json.js';

const folder = temporaryFolder('bandwright-watch-');
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const rowsOf = (path: string) =>
  Papa.parse<Record<string, string>>(readFileSync(path, 'utf8'), { header: true, skipEmptyLines: true }).data;
const pause = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

beforeAll(async () => {
  writeStandardSeries(at, reference);
  expect((await runCli('calibrate', at('standards.csv'), ...BAND_OPTIONS, '-o', at('co.json'))).status).toBe(
    0,
  );
});
afterAll(() => folder.cleanup());

describe('watch in a separate process', () => {
  it('reads a scan written in pieces once, whole; takes a renamed scan; stops on SIGTERM with every result written', async () => {
    mkdirSync(at('incoming'));
    const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href;
    const cli = join(import.meta.dirname, '..', '..', 'src', 'cli', 'main.ts');
    const child = spawn(
      process.execPath,
      [
        '--import',
        tsx,
        cli,
        'watch',
        at('co.json'),
        at('incoming'),
        '--csv',
        at('watched.csv'),
        '--settle',
        '1500',
        '--poll',
        '100',
      ],
      { stdio: ['ignore', 'ignore', 'pipe'] },
    );
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
    for (let waited = 0; !stderr.includes('watching'); waited += 20) {
      if (waited > 30_000) throw new Error(`watch did not start; stderr: ${stderr}`);
      await pause(20);
    }
    // 137 ppm written in five pieces, 80 ms apart (far shorter than the 1.5 s settle time, even on
    // a busy machine); any piece read on its own would fail to parse or give another value.
    const text = formatSpectrumCsv(bandScan(137, { metadata: reference }));
    const cut = [0, 0.2, 0.4, 0.6, 0.8, 1].map((f) => Math.round(f * text.length));
    for (let k = 0; k < 5; k++) {
      appendFileSync(at('incoming/pieces.csv'), text.slice(cut[k], cut[k + 1]));
      await pause(80);
    }
    // A scan renamed into place from a hidden name.
    writeScan(at('incoming/.tmp-renamed.csv'), bandScan(42, { metadata: reference }));
    await pause(30);
    renameSync(at('incoming/.tmp-renamed.csv'), at('incoming/renamed.csv'));
    for (
      let waited = 0;
      !(existsSync(at('watched.csv')) && rowsOf(at('watched.csv')).length >= 2);
      waited += 20
    ) {
      if (waited > 30_000) throw new Error(`no results; stderr: ${stderr}`);
      await pause(20);
    }
    await pause(2000); // long enough for a second reading, if there were one
    child.kill('SIGTERM');
    expect(await exited).toBe(0);
    const rows = rowsOf(at('watched.csv'));
    expect(rows.map((row) => row.scan).sort()).toEqual([
      at('incoming/pieces.csv'),
      at('incoming/renamed.csv'),
    ]);
    const pieces = rows.find((row) => row.scan === at('incoming/pieces.csv'));
    expect(pieces?.error).toBe('');
    expect(Number(pieces?.CO_ppm)).toBeCloseTo(137, 0);
    expect(Number(rows.find((row) => row.scan === at('incoming/renamed.csv'))?.CO_ppm)).toBeCloseTo(42, 0);
    expect(stderr).toMatch(/2 scan\(s\) quantified, 0 failed, .*stopped by SIGTERM/);
    // The record of processed files names both, with their sizes.
    const record = parseJsonLinesAs<WatchStateLine>(readFileSync(at('.watched.csv.watch-state'), 'utf8'));
    expect(record.map((r) => r.name).sort()).toEqual(['pieces.csv', 'renamed.csv']);
    expect(record.find((r) => r.name === 'pieces.csv')?.size).toBe(Buffer.byteLength(text));
  });
});

describe('watch --once', () => {
  it('quantifies what is there, gives a bad file an error row, and goes on from its record next time', async () => {
    mkdirSync(at('cron'));
    writeScan(at('cron/a.csv'), bandScan(60, { metadata: reference }));
    writeScan(at('cron/b.jdx'), bandScan(120, { metadata: reference }));
    writeFileSync(at('cron/bad.csv'), 'not a scan\n');
    const first = await runCli(
      'watch',
      at('co.json'),
      at('cron'),
      '--jsonl',
      at('cron.jsonl'),
      '--once',
      '--settle',
      '50',
    );
    expect(first.status).toBe(1);
    expect(first.stderr).toMatch(/bad\.csv line 1: .*no delimiter/);
    const lines = parseJsonLinesAs<ResultLine>(readFileSync(at('cron.jsonl'), 'utf8'));
    expect(lines.map((line) => line.scan)).toEqual([at('cron/a.csv'), at('cron/b.jdx'), at('cron/bad.csv')]);
    expect(gasAt(lines[0]).value).toBeCloseTo(60, 0);
    expect(scanFailure(lines[2]).error).toMatch(/bad\.csv/);
    writeScan(at('cron/c.csv'), bandScan(90, { metadata: reference }));
    const second = await runCli(
      'watch',
      at('co.json'),
      at('cron'),
      '--jsonl',
      at('cron.jsonl'),
      '--once',
      '--settle',
      '50',
    );
    expect(second.status).toBe(0);
    const after = parseJsonLinesAs<ResultLine>(readFileSync(at('cron.jsonl'), 'utf8'));
    expect(after.map((line) => line.scan)).toEqual([
      at('cron/a.csv'),
      at('cron/b.jdx'),
      at('cron/bad.csv'),
      at('cron/c.csv'),
    ]);
    expect(gasAt(after[3]).value).toBeCloseTo(90, 0);
  });

  it('prints a line per result on stdout when no results file is given', async () => {
    mkdirSync(at('plain'));
    writeScan(at('plain/x.csv'), bandScan(75, { metadata: reference }));
    const run = await runCli('watch', at('co.json'), at('plain'), '--once', '--settle', '50');
    expect(run.status).toBe(0);
    expect(run.stdout).toMatch(/plain\/x\.csv: CO 7[45]\.\d+ ppm \[/);
  });

  it("refuses a results CSV whose header is not this calibration's, writing nothing", async () => {
    mkdirSync(at('other'));
    writeScan(at('other/x.csv'), bandScan(75, { metadata: reference }));
    writeFileSync(
      at('other.csv'),
      'scan,NO_ppm,NO_low,NO_high,NO_flags,residual_rms,calibration_sha256,error\n',
    );
    const run = await runCli(
      'watch',
      at('co.json'),
      at('other'),
      '--csv',
      at('other.csv'),
      '--once',
      '--settle',
      '50',
    );
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/other\.csv line 1: the header .* does not match this calibration's columns/);
    expect(readFileSync(at('other.csv'), 'utf8')).toBe(
      'scan,NO_ppm,NO_low,NO_high,NO_flags,residual_rms,calibration_sha256,error\n',
    );
    expect(existsSync(at('.other.csv.watch-state'))).toBe(false);
  });
});
