/**
 * Batch benchmark: `quantify` over N synthetic scans (CSV and ASDF JCAMP-DX, 14,000 points each,
 * 600–4000 cm⁻¹) with a one-gas band calibration (CO) and a four-gas classical-least-squares
 * calibration (CO, N2O, CO2, H2O), for N = 1, 1,000 and 10,000: scans/s, MB/s and peak RSS of the
 * compiled program; worker threads on and off; the same 1,000 CSV scans through a short numpy
 * script (np.loadtxt + interpolation + matrix projection) when python3 has numpy; and `watch`
 * taking 10 scans/s.
 *
 * Data: standards are simulated with the line-by-line simulator (noise 1·10⁻⁴ AU); samples are
 * mixtures of simulated pure-gas spectra with a sloped baseline and seeded Gaussian noise (a
 * linear mix is enough for timing; the physics is tested elsewhere). Everything is generated
 * deterministically under `bench/data/` (git-ignored) and reused while its recipe is unchanged.
 * The program is compiled with tsc into `bench/data/dist/` and each run is a fresh node process
 * (so the peak RSS is that of one batch; files are in the page cache after the first pass).
 *
 * Run with `npm run bench` (through `bench/run.ts`) or alone with `npx tsx bench/batch.ts`.
 */
import { spawn, spawnSync } from 'node:child_process';
import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readFileSync,
  readdirSync,
  renameSync,
  rmSync,
  statSync,
  writeFileSync,
  writeSync,
} from 'node:fs';
import { cpus, loadavg, totalmem } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { main } from '../src/cli/main.js';
import { readCalibration } from '../src/store/calibration-file.js';
import { formatJcamp } from '../src/formats/jcamp/write.js';
import { parseScan } from '../src/formats/scan.js';
import { predictCls } from '../src/models/cls.js';
import { createGaussian, createRandom } from '../src/simulate/random.js';
import { simulateSpectrum } from '../src/simulate/simulate.js';

const ROOT = fileURLToPath(new URL('..', import.meta.url));
const DATA = join(ROOT, 'bench', 'data');
/** Change when the generated data change, so old data are regenerated. */
const RECIPE = 'batch-v1';
const POINTS = 14_000;
const FIRST_X = 600;
const LAST_X = 4000;
const STEP = (LAST_X - FIRST_X) / (POINTS - 1);
const CONDITIONS = { pathLength_m: 0.1, temperature_K: 296, pressure_kPa: 101.325 };
const SIZES = [1, 1_000, 10_000] as const;
const MAX_SCANS = 10_000;
/** Reference concentrations of the pure spectra (ppm) and the sample ranges drawn around them. */
const GASES = [
  { name: 'CO', unit: 'ppm', ppm: 100, range: [0, 400] },
  { name: 'N2O', unit: 'ppm', ppm: 50, range: [0, 150] },
  { name: 'CO2', unit: 'pct', ppm: 40_000, range: [10_000, 60_000] },
  { name: 'H2O', unit: 'pct', ppm: 20_000, range: [5_000, 40_000] },
] as const;
const CLS_REGIONS = [
  [1960, 2035],
  [2140, 2260],
  [2265, 2300],
];

function simulate(gases: { name: string; ppm: number }[], noise: number, seed: number): Float64Array {
  const result = simulateSpectrum({
    gases,
    range_cm: [FIRST_X, LAST_X],
    resolution_cm: 0.5,
    pointSpacing_cm: STEP,
    ...CONDITIONS,
    noiseRms_AU: noise,
    seed,
  });
  if (result.spectrum.x.length !== POINTS)
    throw new Error(`simulator gave ${result.spectrum.x.length} points, expected ${POINTS}`);
  return result.spectrum.y;
}

// ---------------------------------------------------------------- fast scan writers

const X_TEXT: string[] = Array.from({ length: POINTS }, (_, i) => (FIRST_X + i * STEP).toFixed(4));

/** y with 6 decimals, as instrument exports write it. */
function sixDecimals(value: number): string {
  const micro = Math.round(value * 1e6);
  const magnitude = Math.abs(micro);
  const whole = Math.floor(magnitude / 1e6);
  const fraction = String(magnitude - whole * 1e6).padStart(6, '0');
  return `${micro < 0 ? '-' : ''}${whole}.${fraction}`;
}

function csvText(y: Float64Array, title: string): string {
  const lines = [
    `# title = ${title}`,
    `# path_length_m = ${CONDITIONS.pathLength_m}`,
    `# temperature_K = ${CONDITIONS.temperature_K}`,
    `# pressure_kPa = ${CONDITIONS.pressure_kPa}`,
    'wavenumber_cm-1,absorbance',
  ];
  for (let i = 0; i < POINTS; i++) lines.push(`${X_TEXT[i]},${sixDecimals(y[i] as number)}`);
  return `${lines.join('\n')}\n`;
}

const SQZ = '@ABCDEFGHI';
const SQZ_NEGATIVE = '@abcdefghi';
const DIF = '%JKLMNOPQR';
const DIF_NEGATIVE = '%jklmnopqr';
const DUP = '0STUVWXYZs';
function encode(value: number, positive: string, negative: string): string {
  const digits = String(Math.abs(value));
  return ((value < 0 ? negative : positive)[Number(digits[0])] as string) + digits.slice(1);
}

/** ASDF (SQZ + DIF + DUP) JCAMP-DX with YFACTOR 1E-6 and X printed with 4 decimals, as instruments write it. */
function jcampText(y: Float64Array, title: string): string {
  const ints = Array.from(y, (v) => Math.round(v * 1e6) || 0);
  const lines = [
    `##TITLE=${title}`,
    '##JCAMP-DX=5.01',
    '##DATA TYPE=INFRARED SPECTRUM',
    '##ORIGIN=bandwright bench',
    '##OWNER=',
    `##PATH LENGTH=${CONDITIONS.pathLength_m} $$ m`,
    `##TEMPERATURE=${CONDITIONS.temperature_K} $$ K`,
    `##PRESSURE=${CONDITIONS.pressure_kPa} $$ kPa`,
    '##RESOLUTION=0.5',
    '##XUNITS=1/CM',
    '##YUNITS=ABSORBANCE',
    '##XFACTOR=1',
    '##YFACTOR=1E-6',
    `##FIRSTX=${FIRST_X}`,
    `##LASTX=${LAST_X}`,
    `##DELTAX=${STEP}`,
    `##NPOINTS=${POINTS}`,
    `##FIRSTY=${(ints[0] as number) * 1e-6}`,
    '##XYDATA=(X++(Y..Y))',
  ];
  let i = 0;
  for (;;) {
    let line = (X_TEXT[i] as string) + encode(ints[i] as number, SQZ, SQZ_NEGATIVE);
    let j = i;
    while (j + 1 < POINTS) {
      const d = (ints[j + 1] as number) - (ints[j] as number);
      let run = 1;
      while (j + 1 + run < POINTS && (ints[j + 1 + run] as number) - (ints[j + run] as number) === d) run++;
      let token = encode(d, DIF, DIF_NEGATIVE) + (run > 1 ? encode(run, DUP, DUP) : '');
      if (line.length + token.length > 80) {
        run = 1;
        token = encode(d, DIF, DIF_NEGATIVE);
        if (line.length + token.length > 80) break;
      }
      line += token;
      j += run;
    }
    lines.push(line);
    if (j === POINTS - 1) {
      if (j > i) lines.push((X_TEXT[j] as string) + encode(ints[j] as number, SQZ, SQZ_NEGATIVE));
      break;
    }
    i = j;
  }
  lines.push('##END=');
  return `${lines.join('\n')}\n`;
}

// ---------------------------------------------------------------- data

interface BenchData {
  csv: string[];
  jcamp: string[];
  band: string;
  cls: string;
  projection: string;
}

async function quietMain(args: string[]): Promise<void> {
  let stderr = '';
  const status = await main(['node', 'bandwright', ...args], {
    stdout: { write: () => true },
    stderr: { write: (s: string) => (stderr += s) },
    interactive: false,
  });
  if (status !== 0) throw new Error(`bandwright ${args.join(' ')} failed (${status}): ${stderr}`);
}

async function prepareData(log: (line: string) => void): Promise<BenchData> {
  const scans = join(DATA, 'scans');
  const stamp = join(DATA, 'recipe.txt');
  const data: BenchData = {
    csv: Array.from({ length: MAX_SCANS }, (_, i) =>
      join(scans, 'csv', `s${String(i).padStart(5, '0')}.csv`),
    ),
    jcamp: Array.from({ length: MAX_SCANS }, (_, i) =>
      join(scans, 'jcamp', `s${String(i).padStart(5, '0')}.jdx`),
    ),
    band: join(DATA, 'co-band.calibration.json'),
    cls: join(DATA, 'four-gas-cls.calibration.json'),
    projection: join(DATA, 'cls-projection.json'),
  };
  if (existsSync(stamp) && readFileSync(stamp, 'utf8') === RECIPE) return data;
  const started = performance.now();
  rmSync(DATA, { recursive: true, force: true });
  for (const folder of ['standards', 'scans/csv', 'scans/jcamp'])
    mkdirSync(join(DATA, folder), { recursive: true });

  // Standards from the simulator, written with the project's own JCAMP-DX writer.
  const levels: [string, Record<string, number>][] = [
    ['zero-a', {}],
    ['zero-b', {}],
    ['co-050', { CO: 50 }],
    ['co-150', { CO: 150 }],
    ['co-400', { CO: 400 }],
    ['n2o-020', { N2O: 20 }],
    ['n2o-060', { N2O: 60 }],
    ['n2o-150', { N2O: 150 }],
    ['co2-02pct', { CO2: 20_000 }],
    ['co2-06pct', { CO2: 60_000 }],
    ['h2o-01pct', { H2O: 10_000 }],
    ['h2o-04pct', { H2O: 40_000 }],
    ['mix-1', { CO: 100, N2O: 40, CO2: 40_000, H2O: 30_000 }],
    ['mix-2', { CO: 250, N2O: 15, CO2: 30_000, H2O: 15_000 }],
    ['mix-3', { CO: 30, N2O: 100, CO2: 50_000, H2O: 35_000 }],
  ];
  const manifest = ['scan,CO_ppm,N2O_ppm,CO2_pct,H2O_pct'];
  levels.forEach(([name, ppm], k) => {
    const y = simulate(
      Object.entries(ppm).map(([gas, value]) => ({ name: gas, ppm: value })),
      1e-4,
      100 + k,
    );
    const x = Float64Array.from({ length: POINTS }, (_, i) => FIRST_X + i * STEP);
    x[POINTS - 1] = LAST_X;
    writeFileSync(
      join(DATA, 'standards', `${name}.jdx`),
      formatJcamp(
        { x, y, yKind: 'absorbance', metadata: { ...CONDITIONS } },
        { title: `bench standard ${name}` },
      ),
    );
    manifest.push(
      `standards/${name}.jdx,${ppm.CO ?? 0},${ppm.N2O ?? 0},${(ppm.CO2 ?? 0) / 1e4},${(ppm.H2O ?? 0) / 1e4}`,
    );
  });
  writeFileSync(join(DATA, 'standards.csv'), `${manifest.join('\n')}\n`);
  const bandManifest = [
    manifest[0],
    ...manifest.slice(1).filter((row) => /standards\/(zero|co-)/.test(row as string)),
  ];
  writeFileSync(join(DATA, 'co-standards.csv'), `${bandManifest.join('\n')}\n`);
  writeFileSync(
    join(DATA, 'co-band.method.json'),
    JSON.stringify({
      model: 'band',
      gases: [
        {
          name: 'CO',
          unit: 'ppm',
          band: [2040, 2245],
          baseline: [
            [1960, 1990],
            [2255, 2275],
          ],
          model: 'linear',
        },
      ],
    }),
  );
  writeFileSync(
    join(DATA, 'four-gas-cls.method.json'),
    JSON.stringify({
      model: 'cls',
      gases: GASES.map((g) => ({ name: g.name, unit: g.unit })),
      interferents: [],
      regions: CLS_REGIONS,
      baselineOrder: 1,
    }),
  );
  process.env.SOURCE_DATE_EPOCH = '1767225600';
  await quietMain([
    'calibrate',
    join(DATA, 'co-standards.csv'),
    '--method',
    join(DATA, 'co-band.method.json'),
    '-o',
    data.band,
    '--force',
  ]);
  await quietMain([
    'calibrate',
    join(DATA, 'standards.csv'),
    '--method',
    join(DATA, 'four-gas-cls.method.json'),
    '-o',
    data.cls,
    '--force',
  ]);
  log(
    `  standards simulated and both calibrations built in ${((performance.now() - started) / 1000).toFixed(1)} s`,
  );

  // The CLS prediction as one matrix (gases × channels) for the numpy script: the model is linear
  // (no second-order terms), so its columns are the predictions of unit spectra.
  const calibration = readCalibration(data.cls);
  const model = calibration.cls?.model;
  if (model === undefined || model.grid === null)
    throw new Error('the bench CLS calibration has no channel grid');
  const channels = model.grid.length;
  const matrix: number[][] = model.components
    .filter((c) => c.reported)
    .map(() => new Array<number>(channels).fill(0));
  const unit = new Float64Array(channels);
  for (let j = 0; j < channels; j++) {
    unit.fill(0);
    unit[j] = 1;
    predictCls(model, unit, { phi: 1 }).estimates.forEach(
      (estimate, g) => ((matrix[g] as number[])[j] = estimate.value),
    );
  }
  writeFileSync(
    data.projection,
    JSON.stringify({
      gases: model.components.filter((c) => c.reported).map((c) => `${c.name}_${c.unit}`),
      grid: model.grid,
      matrix,
    }),
  );

  // Samples: mixtures of pure spectra + baseline + noise.
  const pure = GASES.map((gas) => simulate([{ name: gas.name, ppm: gas.ppm }], 0, 1));
  const uniform = createRandom(20_260_101);
  const gaussian = createGaussian(20_260_102);
  const y = new Float64Array(POINTS);
  for (let n = 0; n < MAX_SCANS; n++) {
    const fractions = GASES.map(
      (gas) => (gas.range[0] + uniform() * (gas.range[1] - gas.range[0])) / gas.ppm,
    );
    const offset = 0.01 + 0.01 * uniform();
    const slope = (uniform() - 0.5) * 2e-6;
    for (let i = 0; i < POINTS; i++) {
      let value = offset + slope * (FIRST_X + i * STEP - 2000) + 1e-4 * gaussian();
      for (let g = 0; g < GASES.length; g++)
        value += (fractions[g] as number) * ((pure[g] as Float64Array)[i] as number);
      y[i] = value;
    }
    const title = `bench sample ${n}`;
    writeFileSync(data.csv[n] as string, csvText(y, title));
    writeFileSync(data.jcamp[n] as string, jcampText(y, title));
  }
  // The fast writers must give what the readers accept, matching each other to the printed digits.
  const fromCsv = parseScan(readFileSync(data.csv[0] as string), { source: 'csv' });
  const fromJcamp = parseScan(readFileSync(data.jcamp[0] as string), { source: 'jcamp' });
  let worst = 0;
  for (let i = 0; i < POINTS; i++)
    worst = Math.max(worst, Math.abs((fromCsv.y[i] as number) - (fromJcamp.y[i] as number)));
  if (!(worst <= 1.01e-6)) throw new Error(`bench CSV and JCAMP-DX scans differ by ${worst} AU`);
  writeFileSync(stamp, RECIPE);
  log(
    `  ${MAX_SCANS} CSV and ${MAX_SCANS} JCAMP-DX scans generated in ${((performance.now() - started) / 1000).toFixed(1)} s`,
  );
  return data;
}

// ---------------------------------------------------------------- runs

interface RunResult {
  /** Worker threads the batch used. */
  workers: number;
  /** Processor time of the whole process (all threads), s. */
  cpuSeconds: number;
  scans: number;
  failed: number;
  seconds: number;
  wallSeconds: number;
  maxRss_MB: number;
  status: number;
}

const CHILD = join(DATA, 'child.mjs');

function buildProgram(log: (line: string) => void): void {
  const started = performance.now();
  const tsc = join(ROOT, 'node_modules', 'typescript', 'bin', 'tsc');
  // Type errors elsewhere in a working tree do not stop tsc from emitting; the files are checked below.
  spawnSync(
    process.execPath,
    [tsc, '-p', join(ROOT, 'tsconfig.build.json'), '--outDir', join(DATA, 'dist')],
    { stdio: 'ignore' },
  );
  if (
    !existsSync(join(DATA, 'dist', 'cli', 'main.js')) ||
    !existsSync(join(DATA, 'dist', 'batch', 'worker.js'))
  )
    throw new Error('tsc did not produce bench/data/dist');
  writeFileSync(
    CHILD,
    [
      "import { main } from './dist/cli/main.js';",
      "const status = await main(['node', 'bandwright', ...process.argv.slice(2)], { stdout: { write: () => true }, interactive: false });",
      'const usage = process.resourceUsage();',
      'process.stderr.write(`\\nBENCH ${JSON.stringify({ status, maxRss_kB: usage.maxRSS, cpu_us: usage.userCPUTime + usage.systemCPUTime })}\\n`);',
      '',
    ].join('\n'),
  );
  log(`  program compiled into bench/data/dist in ${((performance.now() - started) / 1000).toFixed(1)} s`);
}

function runCli(args: string[]): RunResult {
  const started = performance.now();
  const child = spawnSync(process.execPath, [CHILD, ...args], { encoding: 'utf8', maxBuffer: 1 << 28 });
  const wallSeconds = (performance.now() - started) / 1000;
  const stderr = child.stderr;
  const bench = /BENCH (\{.*\})/.exec(stderr);
  const summary =
    /(\d+) scan\(s\), (\d+) failed, in ([\d.]+) s \(\d+ scans\/s(?:, (\d+) worker threads)?\)/.exec(stderr);
  if (bench === null || summary === null)
    throw new Error(`bandwright ${args.join(' ')}: no summary; stderr: ${stderr.slice(-2000)}`);
  const report = JSON.parse(bench[1] as string) as { status: number; maxRss_kB: number; cpu_us: number };
  return {
    workers: Number(summary[4] ?? 0),
    cpuSeconds: report.cpu_us / 1e6,
    scans: Number(summary[1]),
    failed: Number(summary[2]),
    seconds: Number(summary[3]),
    wallSeconds,
    maxRss_MB: report.maxRss_kB / 1024,
    status: report.status,
  };
}

function listFile(paths: readonly string[], name: string): string {
  const path = join(DATA, name);
  writeFileSync(path, `${paths.join('\n')}\n`);
  return path;
}

function bytesOf(paths: readonly string[]): number {
  let total = 0;
  for (const path of paths) total += statSync(path).size;
  return total;
}

function row(cells: (string | number)[]): string {
  return `| ${cells.join(' | ')} |`;
}

function numpyBatch(
  list: string,
  projection: string,
  out: string,
): { seconds: number; wallSeconds: number } | string {
  const probe = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' });
  if (probe.error !== undefined || probe.status !== 0)
    return 'python3 with numpy not found (Debian: apt-get install python3-numpy); numpy comparison skipped';
  const started = performance.now();
  const run = spawnSync('python3', [join(ROOT, 'bench', 'numpy_batch.py'), list, projection, out], {
    encoding: 'utf8',
    maxBuffer: 1 << 24,
  });
  const wallSeconds = (performance.now() - started) / 1000;
  if (run.status !== 0) return `numpy script failed: ${run.stderr.slice(-1000)}`;
  const report = JSON.parse(run.stdout.trim().split('\n').pop() as string) as { seconds: number };
  return { seconds: report.seconds, wallSeconds };
}

/** Largest relative difference of the gas columns between our results CSV and the numpy one (same scans, same order). */
function compareResults(ours: string, theirs: string): number {
  const read = (path: string): string[][] =>
    readFileSync(path, 'utf8')
      .trim()
      .split('\n')
      .map((line) => line.split(','));
  const [ourHeader, ...ourRows] = read(ours);
  const [theirHeader, ...theirRows] = read(theirs);
  let worst = 0;
  (theirHeader as string[]).slice(1).forEach((column, k) => {
    const index = (ourHeader as string[]).indexOf(column);
    theirRows.forEach((cells, r) => {
      const a = Number(ourRows[r]?.[index]);
      const b = Number(cells[k + 1]);
      worst = Math.max(worst, Math.abs(a - b) / Math.max(1e-9, Math.abs(b)));
    });
  });
  return worst;
}

async function watchRun(data: BenchData): Promise<string> {
  const folder = join(DATA, 'watch');
  rmSync(folder, { recursive: true, force: true });
  mkdirSync(join(folder, 'in'), { recursive: true });
  const out = join(folder, 'results.jsonl');
  const count = 100;
  const child = spawn(
    process.execPath,
    [CHILD, 'watch', data.cls, join(folder, 'in'), '--jsonl', out, '--settle', '200', '--poll', '500'],
    { stdio: ['ignore', 'ignore', 'pipe'] },
  );
  let stderr = '';
  child.stderr.on('data', (chunk: Buffer) => (stderr += chunk.toString()));
  const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
  await new Promise((resolve) => setTimeout(resolve, 1500));
  const arrivals: number[] = [];
  const seen: number[] = [];
  const lines = (): number => (existsSync(out) ? readFileSync(out, 'utf8').split('\n').length - 1 : 0);
  const started = performance.now();
  const poller = setInterval(() => {
    const n = lines();
    while (seen.length < n) seen.push(performance.now());
  }, 10);
  for (let i = 0; i < count; i++) {
    const target = performance.now() - started;
    const due = i * 100;
    if (due > target) await new Promise((resolve) => setTimeout(resolve, due - target));
    // Written under a hidden name and renamed into place, as an instrument's export should.
    const hidden = join(folder, 'in', `.incoming-${i}`);
    const bytes = readFileSync(data.jcamp[i] as string);
    const descriptor = openSync(hidden, 'w');
    writeSync(descriptor, bytes);
    closeSync(descriptor);
    renameSync(hidden, join(folder, 'in', `k${String(i).padStart(4, '0')}.jdx`));
    arrivals.push(performance.now());
  }
  const deadline = performance.now() + 15_000;
  while (seen.length < count && performance.now() < deadline)
    await new Promise((resolve) => setTimeout(resolve, 20));
  clearInterval(poller);
  const elapsed = (performance.now() - started) / 1000;
  child.kill('SIGTERM');
  const code = await exited;
  const lags = seen.map((time, i) => time - (arrivals[i] as number)).sort((a, b) => a - b);
  const median = lags[Math.floor(lags.length / 2)] ?? Number.NaN;
  const worst = lags[lags.length - 1] ?? Number.NaN;
  const files = readdirSync(join(folder, 'in')).length;
  return `watch, four-gas CLS, ${count} JCAMP-DX scans arriving at 10 scans/s (renamed into place): ${seen.length} of ${files} quantified in ${elapsed.toFixed(1)} s; result ${median.toFixed(0)} ms after arrival (median), ${worst.toFixed(0)} ms at worst; stopped by SIGTERM with exit status ${code}${seen.length < count ? `; stderr: ${stderr.slice(-500)}` : ''}`;
}

/** Parts of the batch benchmark. */
export type BatchBenchPart = 'table' | 'workers' | 'memory' | 'numpy' | 'watch';

/**
 * Runs the batch benchmark.
 *
 * @param log - receives each line as it is made
 * @param parts - which parts to run (default all; `numpy` needs `table` for its comparison)
 * @returns the lines it reports
 */
export async function run(
  log: (line: string) => void = () => undefined,
  parts: readonly BatchBenchPart[] = ['table', 'workers', 'memory', 'numpy', 'watch'],
): Promise<string[]> {
  const lines: string[] = [];
  const say = (line: string): void => {
    lines.push(line);
    log(line);
  };
  const cpu = cpus()[0]?.model ?? 'unknown CPU';
  const load = (): string =>
    loadavg()
      .map((l) => l.toFixed(2))
      .join(' ');
  say(
    `machine: ${cpus().length} × ${cpu}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, node ${process.version}, ${new Date().toISOString().slice(0, 10)}; load average at start ${load()}`,
  );
  const data = await prepareData(say);
  buildProgram(say);
  const results = join(DATA, 'results');
  mkdirSync(results, { recursive: true });
  const ours: Record<string, RunResult> = {};
  // One read of every scan first, so that no run pays for a first read from disk the next gets from the page cache.
  const warmStarted = performance.now();
  for (const path of [...data.csv, ...data.jcamp]) readFileSync(path);
  say(
    `  ${2 * MAX_SCANS} scans read once (page cache) in ${((performance.now() - warmStarted) / 1000).toFixed(1)} s`,
  );
  if (parts.includes('table')) {
    say('');
    say(
      row([
        'format',
        'calibration',
        'N',
        'workers',
        'batch s',
        'scans/s',
        'MB/s',
        'peak RSS MB',
        'process s',
      ]),
    );
    say(row(['---', '---', '---:', '---', '---:', '---:', '---:', '---:', '---:']));
    for (const format of ['csv', 'jcamp'] as const) {
      for (const calibration of ['band', 'cls'] as const) {
        for (const n of SIZES) {
          const paths = data[format].slice(0, n);
          const list = listFile(paths, `list-${format}-${n}.txt`);
          const out = join(results, `${format}-${calibration}-${n}.csv`);
          const result = runCli([
            'quantify',
            data[calibration],
            '--from',
            list,
            '--csv',
            out,
            '--force',
            '--quiet',
          ]);
          if (result.failed > 0 || result.scans !== n)
            throw new Error(`${format} ${calibration} ${n}: ${result.failed} failed of ${result.scans}`);
          ours[`${format}-${calibration}-${n}`] = result;
          const megabytes = bytesOf(paths) / 1e6;
          say(
            row([
              format === 'csv' ? 'CSV' : 'JCAMP-DX',
              calibration === 'band' ? 'CO band' : 'four-gas CLS',
              n.toLocaleString('en-US'),
              `auto (${result.workers})`,
              result.seconds.toFixed(2),
              (n / result.seconds).toFixed(0),
              (megabytes / result.seconds).toFixed(0),
              result.maxRss_MB.toFixed(0),
              result.wallSeconds.toFixed(2),
            ]),
          );
        }
      }
    }
  }
  if (parts.includes('workers')) {
    say('');
    say(
      'worker threads (--workers; with workers the main thread only writes), four-gas CLS, N = 10,000, with the processor time used (user + system, all threads):',
    );
    for (const format of ['csv', 'jcamp'] as const) {
      const list = join(DATA, `list-${format}-10000.txt`);
      const speeds: string[] = [];
      for (const workers of [0, 1, 2]) {
        const result = runCli([
          'quantify',
          data.cls,
          '--from',
          list,
          '--csv',
          join(results, `${format}-workers-${workers}.csv`),
          '--force',
          '--quiet',
          '--workers',
          String(workers),
        ]);
        speeds.push(
          `${workers} → ${(result.scans / result.seconds).toFixed(0)} scans/s, ${result.cpuSeconds.toFixed(1)} CPU s, ${result.maxRss_MB.toFixed(0)} MB`,
        );
        if (
          workers > 0 &&
          readFileSync(join(results, `${format}-workers-${workers}.csv`), 'utf8') !==
            readFileSync(join(results, `${format}-workers-0.csv`), 'utf8')
        ) {
          throw new Error(`${format}: results with ${workers} workers differ from those without`);
        }
      }
      say(
        `  ${format === 'csv' ? 'CSV' : 'JCAMP-DX'}: ${speeds.join(', ')}; results identical with and without workers`,
      );
    }
  }
  if (parts.includes('memory')) {
    // Peak RSS against N beyond the table: the 10,000 JCAMP-DX scans three times over.
    const list = listFile([...data.jcamp, ...data.jcamp, ...data.jcamp], 'list-jcamp-30000.txt');
    const parts30: string[] = [];
    for (const workers of ['0', '2']) {
      const result = runCli([
        'quantify',
        data.cls,
        '--from',
        list,
        '--csv',
        join(results, `jcamp-30000-${workers}.csv`),
        '--force',
        '--quiet',
        '--workers',
        workers,
      ]);
      parts30.push(
        `--workers ${workers}: ${result.maxRss_MB.toFixed(0)} MB at ${(result.scans / result.seconds).toFixed(0)} scans/s`,
      );
    }
    say(`peak RSS at N = 30,000 (four-gas CLS, JCAMP-DX): ${parts30.join('; ')}`);
  }
  if (parts.includes('numpy') && ours['csv-cls-1000'] !== undefined) {
    say('');
    const numpy = numpyBatch(
      join(DATA, 'list-csv-1000.txt'),
      data.projection,
      join(results, 'numpy-1000.csv'),
    );
    if (typeof numpy === 'string') say(numpy);
    else {
      const mine = ours['csv-cls-1000'] as RunResult;
      const difference = compareResults(join(results, 'csv-cls-1000.csv'), join(results, 'numpy-1000.csv'));
      say(
        `numpy (np.loadtxt + np.interp + matrix projection), same 1,000 CSV scans, four gases: ${numpy.seconds.toFixed(2)} s (${(1000 / numpy.seconds).toFixed(0)} scans/s; ${numpy.wallSeconds.toFixed(2)} s with interpreter start); bandwright ${mine.seconds.toFixed(2)} s (${mine.wallSeconds.toFixed(2)} s with start): ${(numpy.seconds / mine.seconds).toFixed(1)}× faster (${(numpy.wallSeconds / mine.wallSeconds).toFixed(1)}× counting process start); concentrations agree within ${difference.toExponential(1)} (relative)`,
      );
    }
  }
  if (parts.includes('watch')) say(await watchRun(data));
  say(`load average at the end ${load()} (other work on the machine lowers the figures)`);
  return lines;
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href) {
  const asked = process.argv.slice(2) as BatchBenchPart[];
  await run((line) => console.log(line), asked.length > 0 ? asked : undefined);
}
