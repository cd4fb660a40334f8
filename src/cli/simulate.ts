/**
 * `bandwright simulate`: a physics-based gas-cell spectrum with known truth, written as
 * JCAMP-DX or CSV with the cell conditions in its header.
 */
import { extname } from 'node:path';
import type { Command } from 'commander';
import { BandwrightError } from '../errors.js';
import { formatJcamp } from '../formats/jcamp/write.js';
import { formatSpectrumCsv } from '../formats/spectrum-csv-write.js';
import { simulateSpectrum, type SimulationOptions } from '../simulate/index.js';
import { writeFileAtomic } from '../store/atomic-write.js';
import { note, type CommandContext } from './context.js';
import { collect, parseNumberOption, parsePositiveOption, parseWindowOption } from './parse.js';

interface SimulateFlags {
  gas?: string[];
  pathLength: string;
  temperature: string;
  pressure: string;
  resolution: string;
  apodization: string;
  range?: string;
  spacing?: string;
  noise: string;
  seed: string;
  baseline?: string;
  title?: string;
  output?: string;
  force?: boolean;
}

/**
 * Parses `--gas NAME=ppm` values.
 *
 * @param values - option values
 * @throws BandwrightError `USAGE` for a malformed value
 */
export function parseGasOptions(values: readonly string[]): { name: string; ppm: number }[] {
  return values.map((text) => {
    const match = /^([^=]+)=(.+)$/.exec(text);
    if (match === null)
      throw new BandwrightError('USAGE', `--gas = ${JSON.stringify(text)}, must be NAME=ppm, e.g. CO=100`, {
        parameter: '--gas',
      });
    return {
      name: (match[1] as string).trim(),
      ppm: parseNumberOption(match[2] as string, `--gas ${match[1]}`, [(n) => n >= 0, 'must be >= 0 ppm']),
    };
  });
}

/**
 * Registers `simulate` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerSimulate(program: Command, context: CommandContext): void {
  program
    .command('simulate')
    .description(
      'write a simulated gas-cell absorbance spectrum (line-by-line physics, instrument function, noise)',
    )
    .option(
      '--gas <name=ppm>',
      'a gas and its mole fraction in ppm (repeat for mixtures), e.g. CO=100',
      collect,
    )
    .option('--path-length <m>', 'optical path length, m', '1')
    .option('--temperature <K>', 'gas temperature, K', '296')
    .option('--pressure <kPa>', 'gas pressure, kPa', '101.325')
    .option('--resolution <cm-1>', 'instrument resolution 1/OPD, cm⁻¹', '0.5')
    .option('--apodization <kind>', 'boxcar (sinc) or triangular (sinc²)', 'triangular')
    .option('--range <lo:hi>', "output range, cm⁻¹ (default: the gases' bands ± 150 cm⁻¹)")
    .option('--spacing <cm-1>', 'output point spacing, cm⁻¹ (default: resolution/2)')
    .option('--noise <AU>', 'RMS white noise added to absorbance, AU', '0')
    .option('--seed <n>', 'noise seed (integer)', '1')
    .option('--baseline <c0,c1,...>', 'baseline polynomial coefficients about the range centre, AU/(cm⁻¹)^k')
    .option('--title <text>', 'title written into the file')
    .option('-o, --output <file>', 'output file: .jdx/.dx/.jcamp for JCAMP-DX, .csv for CSV')
    .option('--force', 'replace an existing output file')
    .action((flags: SimulateFlags) => {
      if (flags.output === undefined)
        throw new BandwrightError('USAGE', 'simulate: give -o <scan.jdx|scan.csv>', { parameter: '-o' });
      const extension = extname(flags.output).toLowerCase();
      const jcamp = ['.jdx', '.dx', '.jcamp'].includes(extension);
      if (!jcamp && extension !== '.csv')
        throw new BandwrightError(
          'USAGE',
          `-o ${flags.output}: the extension must be .jdx, .dx, .jcamp or .csv`,
          { parameter: '-o' },
        );
      if (flags.apodization !== 'boxcar' && flags.apodization !== 'triangular') {
        throw new BandwrightError(
          'USAGE',
          `--apodization = ${JSON.stringify(flags.apodization)}, must be boxcar or triangular`,
          { parameter: '--apodization' },
        );
      }
      const options: SimulationOptions = {
        gases: parseGasOptions(flags.gas ?? []),
        pathLength_m: parsePositiveOption(flags.pathLength, '--path-length'),
        temperature_K: parsePositiveOption(flags.temperature, '--temperature'),
        pressure_kPa: parsePositiveOption(flags.pressure, '--pressure'),
        resolution_cm: parsePositiveOption(flags.resolution, '--resolution'),
        apodization: flags.apodization,
        noiseRms_AU: parseNumberOption(flags.noise, '--noise', [(n) => n >= 0, 'must be >= 0 AU']),
        seed: parseNumberOption(flags.seed, '--seed', [Number.isInteger, 'must be a whole number']),
        ...(flags.range === undefined ? {} : { range_cm: parseWindowOption(flags.range, '--range') }),
        ...(flags.spacing === undefined
          ? {}
          : { pointSpacing_cm: parsePositiveOption(flags.spacing, '--spacing') }),
        ...(flags.baseline === undefined
          ? {}
          : {
              baseline: flags.baseline
                .split(',')
                .map((c, i) => parseNumberOption(c, `--baseline coefficient ${i}`)),
            }),
        ...(flags.title === undefined ? {} : { title: flags.title }),
      };
      const result = simulateSpectrum(options);
      const title = flags.title ?? result.spectrum.metadata.title ?? 'simulated spectrum';
      const text = jcamp
        ? formatJcamp(result.spectrum, { title, origin: 'bandwright simulate' })
        : formatSpectrumCsv(result.spectrum);
      writeFileAtomic(flags.output, text, { overwrite: flags.force === true });
      for (const gas of result.gases) {
        note(
          context,
          `${gas.name}: ${gas.ppm} ppm, ` +
            `weak-absorption band area ${gas.weakLimitBandArea_AU_cm.toPrecision(5)} AU·cm⁻¹ ` +
            `(${gas.lineCount} lines${gas.approximate ? ', approximate band model' : ''})`,
        );
      }
      for (const warning of [...result.warnings, ...result.notes]) note(context, `note: ${warning}`);
      note(context, `simulated spectrum written to ${flags.output} (${result.spectrum.x.length} points)`);
    });
}
