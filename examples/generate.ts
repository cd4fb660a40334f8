/**
 * Regenerates the bundled example data and the calibrations built from it, deterministically:
 *
 *   npm run examples
 *
 * Every scan comes from the line-by-line simulator (`src/simulate`) with a fixed seed, so the
 * files are the same on every run. Calibrations are built with the command-line program itself;
 * their creation time comes from SOURCE_DATE_EPOCH (the reproducible-builds convention) so they
 * do not change either.
 *
 * The scenarios are invented (see examples/README.md): a gas laboratory checking CO cylinders
 * with a band calibration, and a stack test of a calciner with a heated cell for mixtures.
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main } from '../src/cli/main.js';
import { formatJcamp } from '../src/formats/jcamp/write.js';
import { formatSpectrumCsv } from '../src/formats/spectrum-csv-write.js';
import { simulateSpectrum, type SimulationOptions } from '../src/simulate/index.js';
import type { Spectrum } from '../src/spectrum/spectrum.js';

const root = dirname(fileURLToPath(import.meta.url));
const project = dirname(root);

/** 2026-12-01T00:00:00Z: the time stamped into the bundled calibrations. */
const EPOCH = '1796083200';

function write(path: string, text: string): void {
  mkdirSync(dirname(path), { recursive: true });
  writeFileSync(path, text);
}

/** Writes a scan; `withConditions: false` leaves the conditions to the manifest (as many CSV exports do). */
function writeScan(path: string, spectrum: Spectrum, title: string, withConditions = true): void {
  const scan = withConditions ? spectrum : { ...spectrum, metadata: { title } };
  write(
    path,
    path.endsWith('.csv')
      ? formatSpectrumCsv(scan)
      : formatJcamp(scan, { title, origin: 'bandwright examples (simulated)', owner: 'examples' }),
  );
}

function simulate(options: SimulationOptions): Spectrum {
  return simulateSpectrum(options).spectrum;
}

/** Small, repeatable variation of cell conditions between scans (a lab at 22–24 °C, 100.6–102.1 kPa). */
function labConditions(index: number): { temperature_K: number; pressure_kPa: number } {
  return {
    temperature_K: Number((296.2 + 1.1 * Math.sin(1.7 * index)).toFixed(2)),
    pressure_kPa: Number((101.3 + 0.7 * Math.cos(2.3 * index)).toFixed(2)),
  };
}

// ─── Marrowby Gas Laboratory: CO band calibration, samples, weekly check standard ──────────────
const LAB = {
  pathLength_m: 1,
  resolution_cm: 0.5,
  apodization: 'triangular' as const,
  range_cm: [1950, 2350] as const,
  noiseRms_AU: 3e-4,
};

function labCo(): void {
  const folder = join(root, 'lab-co');
  rmSync(folder, { recursive: true, force: true });
  const levels = [0, 0, 20, 20, 50, 50, 100, 100, 200, 200, 350, 350, 500, 500];
  const manifest = ['scan,CO_ppm,path_length_m,temperature_K,pressure_kPa,uncertainty_pct,lot'];
  levels.forEach((ppm, i) => {
    const conditions = labConditions(i);
    const replicate = i % 2 === 0 ? 'a' : 'b';
    const jcamp = i % 4 < 2;
    const name = `standards/co-${String(ppm).padStart(3, '0')}${replicate}.${jcamp ? 'jdx' : 'csv'}`;
    const spectrum = simulate({
      ...LAB,
      ...conditions,
      gases: ppm === 0 ? [] : [{ name: 'CO', ppm }],
      seed: 1000 + i,
    });
    writeScan(join(folder, name), spectrum, `CO standard ${ppm} ppm (${replicate}), cell A, FT-2`, jcamp);
    const lot = ppm === 0 ? 'MGL-Z-2611' : `MGL-CO-${String(ppm).padStart(4, '0')}-2611`;
    const uncertainty = ppm === 0 ? '' : ppm <= 20 ? '2' : '1';
    manifest.push(
      jcamp
        ? `${name},${ppm},,,,${uncertainty},${lot}`
        : `${name},${ppm},1,${conditions.temperature_K},${conditions.pressure_kPa},${uncertainty},${lot}`,
    );
  });
  write(join(folder, 'standards.csv'), `${manifest.join('\n')}\n`);
  write(
    join(folder, 'method.json'),
    `${JSON.stringify(
      {
        title: 'CO in nitrogen, 1 m cell A, bench FTIR FT-2',
        model: 'band',
        gases: [
          {
            name: 'CO',
            unit: 'ppm',
            band: [2020, 2240],
            baseline: [
              [1960, 1990],
              [2260, 2290],
            ],
            model: 'quadratic',
          },
        ],
        recheck: { everyDays: 7, tolerancePct: 5 },
      },
      null,
      2,
    )}\n`,
  );

  const samples: [string, number, number][] = [
    ['cylinder-4471.jdx', 75, 296.4],
    ['cylinder-4472.jdx', 180, 295.9],
    ['cylinder-4475.jdx', 460, 296.8],
    ['loading-bay-grab.csv', 12, 297.1],
    ['boiler-room-grab.jdx', 38, 309.6],
  ];
  samples.forEach(([name, ppm, temperature_K], i) => {
    const spectrum = simulate({
      ...LAB,
      temperature_K,
      pressure_kPa: 101.1,
      gases: [{ name: 'CO', ppm }],
      seed: 2000 + i,
    });
    writeScan(join(folder, 'samples', name), spectrum, `sample ${name.replace(/\.\w+$/, '')}`);
  });

  // Weekly 100 ppm check standard; from the seventh week the instrument's response falls by
  // 1.3 % a week (a fouling cell window), so the last checks leave the ±5 % tolerance.
  const checks = ['scan,certified_ppm,measured_at'];
  for (let week = 0; week < 12; week++) {
    const date = new Date(Date.UTC(2026, 8, 1 + 7 * week, 9, 30));
    const stamp = date.toISOString().slice(0, 10);
    const response = week < 6 ? 1 : 1 - 0.013 * (week - 5);
    const conditions = labConditions(40 + week);
    const spectrum = simulate({
      ...LAB,
      ...conditions,
      gases: [{ name: 'CO', ppm: 100 * response }],
      seed: 3000 + week,
    });
    const name = `checks/check-${stamp}.jdx`;
    writeScan(join(folder, name), spectrum, `CO check standard 100 ppm, lot MGL-CO-0100-2611, ${stamp}`);
    checks.push(`${name},100,${date.toISOString()}`);
  }
  write(join(folder, 'checks.csv'), `${checks.join('\n')}\n`);
}

// ─── Quillon Fen Works, calciner stack K2: heated-cell mixtures for classical least squares ───
const STACK = {
  pathLength_m: 2,
  temperature_K: 453.15,
  resolution_cm: 0.5,
  apodization: 'triangular' as const,
  range_cm: [1950, 2350] as const,
  noiseRms_AU: 3e-4,
};

/**
 * A stack gas composition, every gas in ppm (CO2 and H2O too: 1 % = 10,000 ppm). A type rather than an
 * interface, so that Object.entries knows its values are numbers.
 */
type StackGases = Record<'CO' | 'N2O' | 'CO2' | 'H2O', number>;

const NONE: StackGases = { CO: 0, N2O: 0, CO2: 0, H2O: 0 };

/**
 * The stack method's standards, as the team prepares them: zero nitrogen twice; CO and N2O from
 * certified cylinders through a dilution system at levels spanning the stack (CO up to 300 ppm,
 * 600 ppm·m in the 2 m cell, where its lines still follow a second-order curve; N2O up to 40 ppm);
 * CO2 at four levels and water vapour from a vaporiser at seven levels across the 8–20 % a wet
 * calciner stack carries (water saturates most and is measured for the dry basis, so it gets the
 * most levels); and four matrix standards, CO and N2O spiked into humid CO2 as the stack gas is.
 */
const STACK_STANDARDS: [string, StackGases][] = [
  ['zero-a', NONE],
  ['zero-b', NONE],
  ...[25, 50, 100, 200, 300].map((ppm): [string, StackGases] => [
    `co-${String(ppm).padStart(3, '0')}`,
    { ...NONE, CO: ppm },
  ]),
  ...[5, 10, 20, 40].map((ppm): [string, StackGases] => [
    `n2o-${String(ppm).padStart(2, '0')}`,
    { ...NONE, N2O: ppm },
  ]),
  ...[4, 8, 10, 12].map((pct): [string, StackGases] => [
    `co2-${String(pct).padStart(2, '0')}pct`,
    { ...NONE, CO2: pct * 1e4 },
  ]),
  ...[8, 10, 12, 14, 16, 18, 20].map((pct): [string, StackGases] => [
    `h2o-${String(pct).padStart(2, '0')}pct`,
    { ...NONE, H2O: pct * 1e4 },
  ]),
  ['mix-1', { CO: 150, N2O: 25, CO2: 100000, H2O: 150000 }],
  ['mix-2', { CO: 60, N2O: 8, CO2: 90000, H2O: 120000 }],
  ['mix-3', { CO: 250, N2O: 35, CO2: 110000, H2O: 100000 }],
  ['mix-4', { CO: 20, N2O: 15, CO2: 80000, H2O: 180000 }],
];

/**
 * Stack samples (the truth). The last was taken while the conditioning tower's water sprays
 * over-injected: 30 % water, beyond the 8–20 % of the water standards, so the fit cannot follow
 * its saturated lines and the sample is flagged poor-fit.
 */
const STACK_SAMPLES: [string, StackGases][] = [
  ['k2-0905', { CO: 42, N2O: 12, CO2: 92000, H2O: 141000 }],
  ['k2-0910', { CO: 118, N2O: 9, CO2: 96000, H2O: 152000 }],
  ['k2-0915', { CO: 265, N2O: 14, CO2: 88000, H2O: 118000 }],
  ['k2-0920', { CO: 19, N2O: 31, CO2: 103000, H2O: 97000 }],
  ['k2-0925', { CO: 74, N2O: 22, CO2: 99000, H2O: 165000 }],
  ['k2-0930-spray-upset', { CO: 88, N2O: 17, CO2: 94000, H2O: 300000 }],
];

function stackMixture(): void {
  const folder = join(root, 'stack-mixture');
  rmSync(folder, { recursive: true, force: true });
  const manifest = ['scan,CO_ppm,N2O_ppm,CO2_pct,H2O_pct,pressure_kPa,uncertainty_pct,lot'];
  STACK_STANDARDS.forEach(([name, c], i) => {
    const pressure_kPa = Number((100.9 + 0.4 * Math.sin(i)).toFixed(2));
    const gases = Object.entries(c)
      .filter(([, ppm]) => ppm > 0)
      .map(([gas, ppm]) => ({ name: gas, ppm }));
    const spectrum = simulate({ ...STACK, pressure_kPa, gases, seed: 5000 + i });
    writeScan(
      join(folder, 'standards', `${name}.jdx`),
      spectrum,
      `stack method standard ${name}, heated cell, unit P7`,
    );
    const uncertainty = name.startsWith('zero') ? '' : name.startsWith('h2o') ? '3' : '2';
    manifest.push(
      `standards/${name}.jdx,${c.CO},${c.N2O},${c.CO2 / 1e4},${c.H2O / 1e4},,${uncertainty},QF-${name.toUpperCase()}`,
    );
  });
  write(join(folder, 'standards.csv'), `${manifest.join('\n')}\n`);
  write(
    join(folder, 'method.json'),
    `${JSON.stringify(
      {
        title:
          'Calciner K2 stack: CO and N2O under CO2 and water, heated 2 m cell at 180 °C, portable FTIR P7',
        model: 'cls',
        gases: [
          { name: 'CO', unit: 'ppm', secondOrder: true },
          { name: 'N2O', unit: 'ppm', secondOrder: true },
        ],
        interferents: [
          { name: 'CO2', unit: 'pct' },
          { name: 'H2O', unit: 'pct', secondOrder: true },
        ],
        regions: [
          [1992, 2025],
          [2030, 2075.5],
          [2201.5, 2250],
        ],
        baselineOrder: 1,
        recheck: { everyDays: 1, tolerancePct: 5 },
      },
      null,
      2,
    )}\n`,
  );
  STACK_SAMPLES.forEach(([name, c], i) => {
    const gases = Object.entries(c).map(([gas, ppm]) => ({ name: gas, ppm }));
    const spectrum = simulate({ ...STACK, pressure_kPa: 100.7, gases, seed: 6000 + i });
    writeScan(
      join(folder, 'samples', `${name}.jdx`),
      spectrum,
      `stack K2 sample ${name}, heated cell, unit P7`,
    );
  });
}

async function calibrations(): Promise<void> {
  const folder = join(project, 'calibrations');
  process.env.SOURCE_DATE_EPOCH = EPOCH;
  const status = await main(
    [
      'node',
      'bandwright',
      'calibrate',
      join(root, 'lab-co', 'standards.csv'),
      '--method',
      join(root, 'lab-co', 'method.json'),
      '-o',
      join(folder, 'lab-co.calibration.json'),
      '--force',
    ],
    {
      stdout: { write: () => true },
    },
  );
  if (status !== 0) throw new Error(`calibrate lab-co failed with status ${status}`);
  const stack = join(root, 'stack-mixture');
  const stackStatus = await main(
    [
      'node',
      'bandwright',
      'calibrate',
      join(stack, 'standards.csv'),
      '--method',
      join(stack, 'method.json'),
      '-o',
      join(folder, 'stack-k2.calibration.json'),
      '--force',
    ],
    {
      stdout: { write: () => true },
    },
  );
  if (stackStatus !== 0) throw new Error(`calibrate stack-mixture failed with status ${stackStatus}`);
}

labCo();
stackMixture();
await calibrations();
console.log('examples and calibrations regenerated');
