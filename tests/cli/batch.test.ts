/**
 * Batch quantify: a long batch with corrupt scans, results in input order with and without
 * worker threads, the streamed outputs against the whole-batch formatters, --from lists, and a
 * SIGTERM in the middle of a batch run in a child process.
 *
 * Known truth: each scan holds a Gaussian band of analytic area h·s·√(2π) proportional to the
 * concentration (tests/helpers/band-scans.ts; Beer–Lambert for gases, DESIGN §3).
 */
import { spawn } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, readdirSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import Papa from 'papaparse';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jsonDocumentSink, textTableSink } from '../../src/batch/sinks.js';
import { resultsCsvRow, type BatchItem, type BatchSetup } from '../../src/batch/scan-quantifier.js';
import { runBatch, type WorkerHeapLimits } from '../../src/batch/engine.js';
import { readCalibration } from '../../src/store/calibration-file.js';
import { formatResultsText, resultsCsv, resultsDocument, type BatchEntry } from '../../src/report/results.js';
import { BAND_OPTIONS, bandScan, writeScan, writeStandardSeries } from '../helpers/band-scans.js';
import { runCli, temporaryFolder } from '../helpers/cli.js';
import { gasAt, scanFailure, type ResultLine } from '../helpers/documents.js';
import { parseJsonAs, parseJsonLinesAs, readJsonAs } from '../helpers/json.js';
import type { Calibration } from '../../src/calibration/calibration.js';

const folder = temporaryFolder('bandwright-batch-');
const at = (name: string) => join(folder.path, name);
const reference = { pathLength_m: 1, temperature_K: 296.15, pressure_kPa: 101.325 };
const SCANS = 2_000;
/** Scans made unreadable, by index: a truncated JCAMP-DX file, text that is no table, a NaN. */
const CORRUPT = new Map<number, (path: string) => void>([
  [17, (path) => writeFileSync(path, readFileSync(path, 'utf8').split('\n').slice(0, 12).join('\n'))],
  [1_000, (path) => writeFileSync(path, 'this is not a spectrum\n')],
  [1_998, (path) => writeFileSync(path, 'wavenumber_cm-1,absorbance\n2000,0.1\n2001,NaN\n')],
]);
const names = Array.from(
  { length: SCANS },
  (_, i) => `scans/s${String(i).padStart(4, '0')}.${i % 2 === 0 ? 'csv' : 'jdx'}`,
);
const csvRows = (path: string) =>
  Papa.parse<Record<string, string>>(readFileSync(path, 'utf8'), { header: true, skipEmptyLines: true });

beforeAll(async () => {
  writeStandardSeries(at, reference);
  const calibrated = await runCli('calibrate', at('standards.csv'), ...BAND_OPTIONS, '-o', at('co.json'));
  expect(calibrated.status).toBe(0);
  // Small scans (4 cm⁻¹ spacing, 101 points) keep 2,000 of them quick to write and read.
  mkdirSync(at('scans'));
  names.forEach((name, i) => writeScan(at(name), bandScan(5 + (i % 380), { metadata: reference, step: 4 })));
  for (const [index, corrupt] of CORRUPT) corrupt(at(names[index] as string));
}, 120_000);
afterAll(() => folder.cleanup());

describe('a 2,000-scan batch with 3 corrupt files', () => {
  let inThread: string;
  it('gives 1,997 results and 3 error rows, in input order, and exit status 1', async () => {
    const run = await runCli(
      'quantify',
      at('co.json'),
      at('scans'),
      '--csv',
      at('thread.csv'),
      '--jsonl',
      at('thread.jsonl'),
      '--workers',
      '0',
      '--quiet',
    );
    expect(run.status).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/3 of 2000 scan\(s\) could not be quantified/);
    expect(run.stderr).toMatch(/2000 scan\(s\), 3 failed, in [\d.]+ s \(\d+ scans\/s\)/);
    const parsed = csvRows(at('thread.csv'));
    expect(parsed.data).toHaveLength(SCANS);
    expect(parsed.data.map((row) => row.scan)).toEqual(names.map((name) => at(name)));
    const failed = parsed.data.flatMap((row, i) => (row.error === '' ? [] : [i]));
    expect(failed).toEqual([...CORRUPT.keys()]);
    expect(parsed.data[1_000]?.error).toMatch(/s1000\.csv line 1: .* has no delimiter/);
    expect(parsed.data[1_998]?.error).toMatch(/s1998\.csv line 3/);
    // Good rows carry the concentration the scan was made with (5 + i mod 380 ppm).
    for (const i of [0, 1, 2, 999, 1_999])
      expect(Number(parsed.data[i]?.CO_ppm)).toBeCloseTo(5 + (i % 380), 0);
    inThread = readFileSync(at('thread.csv'), 'utf8');
    // No partial file is left behind.
    expect(readdirSync(folder.path).filter((name) => name.includes('.partial-'))).toEqual([]);
  });

  it('gives byte-identical CSV, JSON lines and JSON with two worker threads', async () => {
    const run = await runCli(
      'quantify',
      at('co.json'),
      at('scans'),
      '--csv',
      at('workers.csv'),
      '--jsonl',
      at('workers.jsonl'),
      '--workers',
      '2',
      '--json',
    );
    expect(run.status).toBe(1);
    expect(readFileSync(at('workers.csv'), 'utf8')).toBe(inThread);
    expect(readFileSync(at('workers.jsonl'), 'utf8')).toBe(readFileSync(at('thread.jsonl'), 'utf8'));
    const threadJson = await runCli('quantify', at('co.json'), at('scans'), '--workers', '0', '--json');
    expect(run.stdout).toBe(threadJson.stdout);
    // Without --json the workers send only the result lines, not the entries: same files.
    const quiet = await runCli(
      'quantify',
      at('co.json'),
      at('scans'),
      '--csv',
      at('workers-quiet.csv'),
      '--jsonl',
      at('workers-quiet.jsonl'),
      '--workers',
      '2',
      '--quiet',
    );
    expect(quiet.status).toBe(1);
    expect(quiet.stderr).toMatch(/2 worker threads/);
    expect(readFileSync(at('workers-quiet.csv'), 'utf8')).toBe(inThread);
    expect(readFileSync(at('workers-quiet.jsonl'), 'utf8')).toBe(readFileSync(at('thread.jsonl'), 'utf8'));
  });

  it('finishes in this thread, with the same items, when the workers run out of heap', async () => {
    const calibration = readCalibration(at('co.json'));
    const paths = names.slice(0, 120).map((name) => at(name));
    const setup: BatchSetup = {
      calibration,
      options: {},
      lineFormats: [{ kind: 'csv', gases: [{ gas: 'CO', unit: 'ppm' }], sha256: calibration.sha256 }],
      keepEntries: true,
    };
    const collect = async (workers: number, workerHeap?: WorkerHeapLimits) => {
      const items: { item: BatchItem; index: number }[] = [];
      const outcome = await runBatch(setup, paths, {
        workers,
        onItem: (item, index) => items.push({ item, index }),
        ...(workerHeap === undefined ? {} : { workerHeap }),
      });
      return { items, outcome };
    };
    const here = await collect(0);
    // A heap far too small for the worker to even load its modules.
    const starved = await collect(2, { maxYoungGenerationSizeMb: 1, maxOldGenerationSizeMb: 2 });
    expect(starved.outcome).toEqual({ delivered: 120, stopped: false, workersOutOfMemory: 2 });
    expect(starved.items.map((entry) => entry.index)).toEqual(paths.map((_, i) => i));
    expect(starved.items).toEqual(here.items);
    expect(here.items[17]?.item.error).toMatch(/s0017\.jdx/);
  }, 60_000);

  it('writes one results element per JSON line, each with the calibration hash', () => {
    const calibrationSha256 = readJsonAs<Calibration>(at('co.json')).sha256;
    const lines = parseJsonLinesAs<ResultLine>(readFileSync(at('thread.jsonl'), 'utf8'));
    expect(lines).toHaveLength(SCANS);
    for (const line of lines) expect(line.calibrationSha256).toBe(calibrationSha256);
    expect(gasAt(lines[0])).toMatchObject({ gas: 'CO', unit: 'ppm' });
    expect(scanFailure(lines[17]).error).toMatch(/s0017\.jdx/);
  });
});

describe('streamed outputs give the whole-batch text', () => {
  const calibration = { file: 'co.json', sha256: 'a'.repeat(64) };
  const entries: BatchEntry[] = [
    {
      scan: 'a.jdx',
      conditions: reference,
      gases: [
        {
          gas: 'CO',
          value: 71.3,
          unit: 'ppm',
          low: 70.5,
          high: 72.1,
          se: 0.4,
          flags: ['extrapolated'],
          notes: ['outside'],
        },
      ],
      residualRms: 3e-4,
      cautions: ['caution text'],
      warnings: [],
    },
    { scan: 'b.csv', error: 'b.csv line 2: "abc" is not a number' },
    {
      scan: 'c.csv',
      conditions: reference,
      gases: [
        {
          gas: 'CO',
          value: -0.2,
          unit: 'ppm',
          low: Number.NEGATIVE_INFINITY,
          high: 1,
          se: 0.5,
          flags: ['below-lod'],
          notes: [],
        },
      ],
      cautions: [],
      warnings: [{ code: 'model', message: 'w' }],
    },
  ];
  const collect = () => {
    let text = '';
    return { sink: { write: (s: string) => (text += s) }, text: () => text };
  };

  it('the --json document, entry by entry, equals JSON.stringify of the whole document', () => {
    for (const count of [0, 1, 3]) {
      const out = collect();
      const sink = jsonDocumentSink(out.sink, calibration, 0.95);
      for (const entry of entries.slice(0, count)) sink.add({ lines: [], entry });
      sink.finish();
      expect(out.text()).toBe(
        `${JSON.stringify(resultsDocument(entries.slice(0, count), calibration, 0.95), null, 2)}\n`,
      );
    }
  });

  it('the table of a batch within one page equals formatResultsText; longer batches come in pages', () => {
    const out = collect();
    const sink = textTableSink(out.sink, 0.9);
    for (const entry of entries) sink.add({ lines: [], entry });
    sink.finish();
    expect(out.text()).toBe(`${formatResultsText(entries, 0.9)}\n`);
    const paged = collect();
    const pages = textTableSink(paged.sink, 0.95, 2);
    for (const entry of entries) pages.add({ lines: [], entry });
    pages.finish();
    expect(paged.text()).toBe(
      `${formatResultsText(entries.slice(0, 2), 0.95)}\n\n${formatResultsText(entries.slice(2), 0.95)}\n`,
    );
  });

  it('CSV rows one at a time equal resultsCsv of the batch', () => {
    const gases = [{ gas: 'CO', unit: 'ppm' }];
    const whole = resultsCsv(entries, gases, calibration.sha256);
    const header = whole.slice(0, whole.indexOf('\n') + 1);
    expect(header + entries.map((entry) => resultsCsvRow(entry, gases, calibration.sha256)).join('')).toBe(
      whole,
    );
  });
});

describe('--from lists and output files', () => {
  it('reads paths from a list (comments, blank lines, CRLF); a missing listed file is an error row', async () => {
    writeFileSync(
      at('list.txt'),
      `# first two scans, then one that is gone\r\n${at(names[0] as string)}\r\n\r\n${at(names[1] as string)}\n${at('scans/gone.csv')}\n`,
    );
    const run = await runCli('quantify', at('co.json'), '--from', at('list.txt'), '--csv', at('from.csv'));
    expect(run.status).toBe(1);
    const parsed = csvRows(at('from.csv'));
    expect(parsed.data.map((row) => row.scan)).toEqual([
      at(names[0] as string),
      at(names[1] as string),
      at('scans/gone.csv'),
    ]);
    expect(parsed.data[2]?.error).toMatch(/gone\.csv: no such file/);
    expect(run.stdout).toMatch(/s0000\.csv\s+CO/);
  });

  it('refuses an existing --jsonl file without --force before reading a scan, and replaces it with --force', async () => {
    writeFileSync(at('kept.jsonl'), 'earlier results\n');
    const refused = await runCli(
      'quantify',
      at('co.json'),
      at(names[0] as string),
      '--jsonl',
      at('kept.jsonl'),
    );
    expect(refused.status).toBe(1);
    expect(refused.stderr).toMatch(/kept\.jsonl exists; use --force to replace it/);
    expect(readFileSync(at('kept.jsonl'), 'utf8')).toBe('earlier results\n');
    const forced = await runCli(
      'quantify',
      at('co.json'),
      at(names[0] as string),
      '--jsonl',
      at('kept.jsonl'),
      '--force',
    );
    expect(forced.status).toBe(0);
    expect(parseJsonAs<ResultLine>(readFileSync(at('kept.jsonl'), 'utf8')).scan).toBe(at(names[0] as string));
  });

  it('treats --json with --quiet, and a bad --workers value, as usage errors', async () => {
    expect(
      (await runCli('quantify', at('co.json'), at(names[0] as string), '--json', '--quiet')).status,
    ).toBe(2);
    const bad = await runCli('quantify', at('co.json'), at(names[0] as string), '--workers', 'many');
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/--workers = "many", must be auto or a whole number/);
  });
});

describe('SIGTERM during a batch', () => {
  it('leaves a valid CSV with every finished row, in input order, and exit status 143', async () => {
    // 100 passes over the 2,000 scans: far longer than the time to the signal.
    const listed = Array.from({ length: 100 }, () => names.map((name) => at(name))).flat();
    writeFileSync(at('long.txt'), `${listed.join('\n')}\n`);
    const tsx = pathToFileURL(createRequire(import.meta.url).resolve('tsx')).href;
    const cli = join(import.meta.dirname, '..', '..', 'src', 'cli', 'main.ts');
    const child = spawn(
      process.execPath,
      [
        '--import',
        tsx,
        cli,
        'quantify',
        at('co.json'),
        '--from',
        at('long.txt'),
        '--csv',
        at('stopped.csv'),
        '--workers',
        '0',
        '--quiet',
      ],
      { stdio: ['ignore', 'ignore', 'pipe'] },
    );
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
    const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
    const partial = at(`.stopped.csv.partial-${child.pid}`);
    // Wait until rows are being written, then stop the batch.
    for (
      let waited = 0;
      !(existsSync(partial) && readFileSync(partial, 'utf8').split('\n').length > 20);
      waited += 20
    ) {
      if (waited > 60_000) throw new Error(`no rows after 60 s; stderr: ${stderr}`);
      await new Promise((resolve) => setTimeout(resolve, 20));
    }
    child.kill('SIGTERM');
    const code = await exited;
    expect(stderr).toMatch(/interrupted by SIGTERM after \d+ of 200000 scans/);
    expect(code).toBe(143);
    expect(existsSync(partial)).toBe(false);
    const text = readFileSync(at('stopped.csv'), 'utf8');
    expect(text.endsWith('\n')).toBe(true);
    const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
    expect(parsed.errors).toEqual([]);
    expect(parsed.meta.fields).toEqual([
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
    const done = parsed.data.length;
    expect(done).toBeGreaterThan(18);
    expect(done).toBeLessThan(listed.length);
    expect(stderr).toMatch(new RegExp(`after ${done} of 200000 scans`));
    expect(parsed.data.map((row) => row.scan)).toEqual(listed.slice(0, done));
    // Every finished row is whole: a number in each concentration cell, or an error.
    for (const row of parsed.data) expect(row.error !== '' || Number.isFinite(Number(row.CO_ppm))).toBe(true);
  });
});
