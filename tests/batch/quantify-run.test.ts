/**
 * The quantify engine on its own: a run that keeps entries and spectra for a report, a stop asked
 * through an AbortSignal, responses given instead of scans written as a scan's result would be,
 * and a watched folder taken once or until a stop.
 *
 * Known truth: each scan holds a Gaussian band of analytic area proportional to the concentration
 * (tests/helpers/band-scans.ts; Beer–Lambert for gases, DESIGN §3).
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { quantifyGivenResponses, quantifyScans, type QuantifyJob } from '../../src/batch/quantify-run.js';
import { watchFolder } from '../../src/batch/watch-run.js';
import { readCalibration } from '../../src/store/calibration-file.js';
import { readScan } from '../../src/store/scan-file.js';
import { resultsCsv, resultsDocument, type BatchEntry } from '../../src/report/results.js';
import type { Calibration } from '../../src/calibration/calibration.js';
import { BAND_OPTIONS, bandScan, writeScan, writeStandardSeries } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';

const folder = temporaryFolder('bandwright-engine-');
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const gases = [{ gas: 'CO', unit: 'ppm' }];
let calibration: Calibration;
const job = (outputs: QuantifyJob['outputs']): QuantifyJob => ({
  calibration,
  calibrationPath: at('co.json'),
  options: {},
  outputs,
});
const paths = ['a.csv', 'b.jdx', 'narrow.csv', 'c.csv', 'd.jdx'].map(at);

beforeAll(async () => {
  writeStandardSeries(at, reference);
  const calibrated = await runCli('calibrate', at('standards.csv'), ...BAND_OPTIONS, '-o', at('co.json'));
  expect(calibrated.status, calibrated.stderr).toBe(0);
  calibration = readCalibration(at('co.json'));
  writeScan(at('a.csv'), bandScan(60, { metadata: reference }));
  writeScan(at('b.jdx'), bandScan(120, { metadata: reference }));
  // Read, but not quantified: the band's baseline windows lie outside it.
  writeScan(at('narrow.csv'), bandScan(50, { from: 2100, to: 2300, metadata: reference }));
  writeScan(at('c.csv'), bandScan(240, { metadata: reference }));
  writeScan(at('d.jdx'), bandScan(30, { metadata: reference }));
});
afterAll(() => folder.cleanup());

describe('quantifyScans', () => {
  it('keeps every entry and every spectrum read, each with arrays of its own, in this thread', async () => {
    const outcome = await quantifyScans(
      job({ mode: 'replace', csv: at('kept.csv'), collectEntries: true, collectSpectra: true }),
      paths,
      { workers: 2 },
    );
    expect(outcome.workers).toBe(0);
    expect(outcome).toMatchObject({ scans: 5, failed: 1, total: 5, stopped: false, files: [at('kept.csv')] });
    expect(outcome.entries.map((entry) => entry.scan)).toEqual(paths);
    // The narrow scan was read, so its spectrum is kept for the report, though it failed.
    expect(outcome.spectra.map((sample) => sample.scan)).toEqual(paths);
    outcome.spectra.forEach((sample) => {
      expect(Array.from(sample.spectrum.y)).toEqual(Array.from(readScan(sample.scan).y));
    });
    expect(readFileSync(at('kept.csv'), 'utf8')).toBe(resultsCsv(outcome.entries, gases, calibration.sha256));
  });

  it('stops at a signal: the scans before it are written, the rest are not started', async () => {
    const controller = new AbortController();
    const seen: number[] = [];
    const outcome = await quantifyScans(job({ mode: 'replace', csv: at('stopped.csv') }), paths, {
      workers: 0,
      signal: controller.signal,
      onItem: (_item, counts) => {
        seen.push(counts.done);
        if (counts.done === 2) controller.abort('SIGTERM');
      },
    });
    expect(seen).toEqual([1, 2]);
    expect(outcome).toMatchObject({ scans: 2, failed: 0, total: 5, stopped: true });
    const rows = readFileSync(at('stopped.csv'), 'utf8').trimEnd().split('\n');
    expect(rows).toHaveLength(3);
    expect(rows.slice(1).map((row) => row.split(',')[0])).toEqual(paths.slice(0, 2));
  });
});

describe('quantifyGivenResponses', () => {
  it('writes the one entry to the files and the --json document as a scan result is written', () => {
    let stdout = '';
    const outcome = quantifyGivenResponses(
      job({
        mode: 'replace',
        csv: at('response.csv'),
        jsonl: at('response.jsonl'),
        stdout: { sink: { write: (text: string) => (stdout += text) }, form: 'json' },
        collectEntries: true,
      }),
      [2.0, 2.02],
    );
    const entries = outcome.entries;
    expect(entries).toHaveLength(1);
    expect(entries[0]?.scan).toBe('mean of 2 responses');
    expect(readFileSync(at('response.csv'), 'utf8')).toBe(resultsCsv(entries, gases, calibration.sha256));
    expect(JSON.parse(readFileSync(at('response.jsonl'), 'utf8'))).toEqual(
      JSON.parse(JSON.stringify({ ...entries[0], calibrationSha256: calibration.sha256 })),
    );
    const document = resultsDocument(entries, { file: at('co.json'), sha256: calibration.sha256 }, 0.95);
    expect(stdout).toBe(`${JSON.stringify(document, null, 2)}\n`);
  });
});

describe('watchFolder', () => {
  it('takes the complete scans once, in name order, appending each result', async () => {
    mkdirSync(at('incoming'));
    writeScan(at('incoming/x.csv'), bandScan(75, { metadata: reference }));
    writeScan(at('incoming/y.jdx'), bandScan(150, { metadata: reference }));
    const scanned: BatchEntry[] = [];
    const outcome = await watchFolder({
      job: { calibration, calibrationPath: at('co.json'), options: {}, outputs: { jsonl: at('w.jsonl') } },
      folder: at('incoming'),
      settleMs: 0,
      pollMs: 100,
      once: true,
      events: { onScan: (_file, item) => scanned.push(item.entry as BatchEntry) },
    });
    expect(outcome).toMatchObject({ scans: 2, failed: 0, stillWriting: [] });
    expect(scanned.map((entry) => entry.scan)).toEqual([at('incoming/x.csv'), at('incoming/y.jdx')]);
    const lines = readFileSync(at('w.jsonl'), 'utf8').trimEnd().split('\n');
    expect(lines.map((line) => (JSON.parse(line) as { scan: string }).scan)).toEqual(
      scanned.map((entry) => entry.scan),
    );
    // The record of processed files lies beside the results file.
    expect(readFileSync(at('.w.jsonl.watch-state'), 'utf8').trimEnd().split('\n')).toHaveLength(2);
  });

  it('watches until the signal aborts, then returns', async () => {
    mkdirSync(at('quiet'));
    const controller = new AbortController();
    const outcome = await watchFolder({
      job: { calibration, calibrationPath: at('co.json'), options: {}, outputs: {} },
      folder: at('quiet'),
      settleMs: 0,
      pollMs: 10_000,
      signal: controller.signal,
      events: { onWatching: () => setTimeout(() => controller.abort('SIGINT'), 50) },
    });
    expect(outcome).toMatchObject({ scans: 0, failed: 0 });
    // The stop woke the sleep at once instead of waiting for the next look.
    expect(outcome.seconds).toBeLessThan(5);
  });
});
