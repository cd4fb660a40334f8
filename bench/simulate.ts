/**
 * Benchmark of the gas-cell simulator: time to simulate one CO spectrum (100 ppm, 1 m, 296 K,
 * 101.325 kPa, 1900–2400 cm⁻¹ at 0.5 cm⁻¹), median of several runs after a warm-up. Target:
 * under 100 ms on the project's 2-core machine. Also times a nine-gas mixture over 700–4200 cm⁻¹
 * for scale.
 *
 * Run alone with `npx tsx bench/simulate.ts`, or call `run()` from a bench runner.
 */
import { pathToFileURL } from 'node:url';
import { simulateSpectrum, type SimulationOptions } from '../src/simulate/simulate.js';

function median(values: number[]): number {
  const sorted = [...values].sort((a, b) => a - b);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1
    ? (sorted[middle] as number)
    : ((sorted[middle - 1] as number) + (sorted[middle] as number)) / 2;
}

function time(
  options: SimulationOptions,
  warmups: number,
  runs: number,
): { median_ms: number; min_ms: number; finePoints: number; outputPoints: number } {
  let finePoints = 0;
  let outputPoints = 0;
  for (let i = 0; i < warmups; i++) simulateSpectrum(options);
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const start = performance.now();
    const result = simulateSpectrum(options);
    times.push(performance.now() - start);
    finePoints = result.fineGrid.points;
    outputPoints = result.spectrum.x.length;
  }
  return { median_ms: median(times), min_ms: Math.min(...times), finePoints, outputPoints };
}

/**
 * Runs the benchmark.
 *
 * @returns the lines it reports (also printed when the file is run directly)
 */
export function run(): string[] {
  const lines: string[] = [];
  const co: SimulationOptions = {
    gases: [{ name: 'CO', ppm: 100 }],
    pathLength_m: 1,
    temperature_K: 296,
    pressure_kPa: 101.325,
    range_cm: [1900, 2400],
    resolution_cm: 0.5,
    apodization: 'triangular',
  };
  for (const apodization of ['triangular', 'boxcar'] as const) {
    const t = time({ ...co, apodization }, 3, 15);
    lines.push(
      `simulate CO 100 ppm, 1 m, 296 K, 101.325 kPa, 1900–2400 cm⁻¹ at 0.5 cm⁻¹ (${apodization}): median ${t.median_ms.toFixed(1)} ms, min ${t.min_ms.toFixed(1)} ms over 15 runs (target < 100 ms); ${t.finePoints} fine-grid points, ${t.outputPoints} output points`,
    );
  }
  const mixture: SimulationOptions = {
    ...co,
    gases: [
      { name: 'CO', ppm: 100 },
      { name: 'NO', ppm: 50 },
      { name: 'HCl', ppm: 5 },
      { name: 'CO2', ppm: 100_000 },
      { name: 'N2O', ppm: 1 },
      { name: 'H2O', ppm: 20_000 },
      { name: 'CH4', ppm: 10 },
      { name: 'NH3', ppm: 5 },
      { name: 'SO2', ppm: 50 },
    ],
    range_cm: [700, 4200],
  };
  const m = time(mixture, 1, 5);
  lines.push(
    `simulate nine-gas mixture, 700–4200 cm⁻¹ at 0.5 cm⁻¹: median ${m.median_ms.toFixed(1)} ms over 5 runs; ${m.finePoints} fine-grid points`,
  );
  return lines;
}

if (process.argv[1] !== undefined && import.meta.url === pathToFileURL(process.argv[1]).href) {
  for (const line of run()) console.log(line);
}
