/**
 * `bandwright calibrate`: build a calibration from a manifest of standards (with a method file
 * or with flags for one gas), or from a table of responses.
 */
import { basename, dirname, extname, isAbsolute, join, relative, resolve } from 'node:path';
import type { Command } from 'commander';
import { buildClsCalibration } from '../calibration/build-cls.js';
import { buildBandCalibration, buildResponseCalibration } from '../calibration/build.js';
import type { Calibration, CalibrationInput } from '../calibration/calibration.js';
import { parseMethod, parseResponseMethod, type BandMethod } from '../calibration/method.js';
import { BandwrightError } from '../errors.js';
import { calibrationPlots, type StandardSpectrum } from '../report/svg/plot-set.js';
import { Y_KINDS } from '../spectrum/spectrum.js';
import { readMethod, writeCalibration } from '../store/calibration-file.js';
import { sha256OfFile } from '../store/hash.js';
import { readManifest } from '../store/manifest.js';
import { readScan } from '../store/scan-file.js';
import { loadStandards } from '../store/standards.js';
import { readResponseTable } from '../store/tables.js';
import { formatCalibrationSummary } from '../report/calibration-summary.js';
import { note, type CommandContext } from './context.js';
import { conditionOptions, wavenumberAxisOption, yKindOption } from './options.js';
import { refuseExistingPlots, writePlotFiles } from './output-files.js';
import { creationTime, parsePositiveOption, parseWindowListOption, parseWindowOption } from './parse.js';

interface CalibrateOptions {
  method?: string;
  responses?: string;
  gas?: string;
  unit?: string;
  band?: string;
  baseline?: string;
  baselineOrder?: string;
  responseKind?: string;
  model?: string;
  weights?: string;
  output?: string;
  force?: boolean;
  pathLength?: string;
  temperature?: string;
  pressure?: string;
  yKind?: string;
  title?: string;
  everyDays?: string;
  tolerancePct?: string;
  json?: boolean;
  plot?: string;
  wavenumberAxis?: string;
}

function recheckFromFlags(options: CalibrateOptions): { everyDays?: number; tolerancePct?: number } {
  const recheck: { everyDays?: number; tolerancePct?: number } = {};
  if (options.everyDays !== undefined)
    recheck.everyDays = parsePositiveOption(options.everyDays, '--every-days');
  if (options.tolerancePct !== undefined)
    recheck.tolerancePct = parsePositiveOption(options.tolerancePct, '--tolerance-pct');
  return recheck;
}

function methodFromFlags(options: CalibrateOptions): BandMethod {
  if (options.gas === undefined)
    throw new BandwrightError(
      'USAGE',
      'calibrate: give --method <method.json>, or --gas with --band for a one-gas band calibration',
      { parameter: '--gas' },
    );
  if (options.band === undefined)
    throw new BandwrightError('USAGE', `calibrate: --gas ${options.gas} needs --band low:high (cm⁻¹)`, {
      parameter: '--band',
    });
  const gas: Record<string, unknown> = {
    name: options.gas,
    unit: options.unit ?? 'ppm',
    band: parseWindowOption(options.band, '--band'),
    baseline: options.baseline === undefined ? [] : parseWindowListOption(options.baseline, '--baseline'),
    response: options.responseKind ?? 'area',
    model: options.model ?? 'linear',
    weights: options.weights ?? 'none',
  };
  if (options.baselineOrder !== undefined) gas.baselineOrder = Number(options.baselineOrder);
  return parseMethod(
    { model: 'band', gases: [gas], recheck: recheckFromFlags(options) },
    'options',
  ) as BandMethod;
}

function defaultOutput(input: string): string {
  return join(dirname(input), `${basename(input, extname(input))}.calibration.json`);
}

function relativeTo(folder: string, path: string): string {
  const rel = relative(folder, resolve(path));
  return rel === '' || isAbsolute(rel) ? resolve(path) : rel;
}

/**
 * Registers `calibrate` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerCalibrate(program: Command, context: CommandContext): void {
  program
    .command('calibrate')
    .description(
      'build a calibration from a manifest of standard scans (with --method, or --gas and --band), or from --responses',
    )
    .argument('[manifest]', 'CSV manifest of standards: scan, <GAS>_<unit>, conditions, uncertainty_pct, lot')
    .option('--method <file>', 'method file (JSON): gases, bands or regions, curve forms, recheck policy')
    .option(
      '--responses <file>',
      'CSV table of pre-integrated responses: concentration,response (replicates as repeated rows)',
    )
    .option('--gas <name>', 'gas to calibrate (with --band or --responses)')
    .option('--unit <unit>', 'concentration unit: ppm, ppb or pct', 'ppm')
    .option('--band <low:high>', 'integration window, cm⁻¹')
    .option('--baseline <windows>', 'baseline windows, cm⁻¹, e.g. 2000:2030,2255:2290')
    .option('--baseline-order <n>', 'baseline polynomial order 0–3 (default 1)')
    .option('--response-kind <kind>', 'band response: area or height', 'area')
    .option('--model <form>', 'curve: linear, origin or quadratic', 'linear')
    .option('--weights <scheme>', 'weights: none, 1/x, 1/x2 or replicates', 'none')
    .option('--path-length <m>', 'path length for scans that do not state it, m')
    .option('--temperature <K>', 'gas temperature for scans that do not state it, K')
    .option('--pressure <kPa>', 'gas pressure for scans that do not state it, kPa')
    .option('--y-kind <kind>', `y values of scans that do not declare them: ${Y_KINDS.join(', ')}`)
    .option('--every-days <days>', 'recheck interval, days (with --gas; a method file sets its own)')
    .option('--tolerance-pct <pct>', 'recheck tolerance, % (with --gas)')
    .option('--title <text>', 'title stored in the calibration')
    .option(
      '-o, --output <file>',
      'calibration file to write (default: <manifest>.calibration.json beside it)',
    )
    .option('--force', 'replace an existing calibration file')
    .option('--json', 'print the calibration as JSON on stdout instead of a summary')
    .option(
      '--plot <dir>',
      "also write the calibration curve and the standards' spectra as SVG files into this folder",
    )
    .option(
      '--wavenumber-axis <order>',
      'spectra plots with wavenumbers descending (high on the left, default) or ascending',
    )
    .action((manifestPath: string | undefined, options: CalibrateOptions) => {
      const wavenumberAxis = wavenumberAxisOption(options.wavenumberAxis);
      let standardSpectra: StandardSpectrum[] = [];
      let calibration: Calibration;
      let output: string;
      const createdAt = creationTime();
      if (options.responses !== undefined) {
        if (manifestPath !== undefined)
          throw new BandwrightError('USAGE', 'calibrate: give either a manifest or --responses, not both', {
            parameter: '--responses',
          });
        if (options.gas === undefined)
          throw new BandwrightError('USAGE', 'calibrate --responses needs --gas <name>', {
            parameter: '--gas',
          });
        output = options.output ?? defaultOutput(options.responses);
        const responseMethod = parseResponseMethod(
          {
            name: options.gas,
            unit: options.unit,
            model: options.model,
            weights: options.weights,
            recheck: recheckFromFlags(options),
          },
          'options',
        );
        const rows = readResponseTable(options.responses);
        const inputs: CalibrationInput[] = [
          {
            role: 'responses',
            path: relativeTo(dirname(resolve(output)), options.responses),
            sha256: sha256OfFile(options.responses),
          },
        ];
        calibration = buildResponseCalibration(responseMethod, rows, {
          inputs,
          createdAt,
          ...(options.title === undefined ? {} : { title: options.title }),
        });
      } else {
        if (manifestPath === undefined)
          throw new BandwrightError(
            'USAGE',
            'calibrate: give a manifest of standards (or --responses <table>)',
            { parameter: 'manifest' },
          );
        const method = options.method !== undefined ? readMethod(options.method) : methodFromFlags(options);
        output = options.output ?? defaultOutput(manifestPath);
        const folder = dirname(resolve(output));
        const manifest = readManifest(manifestPath);
        const yKind = yKindOption(options.yKind);
        const loaded = loadStandards(manifest, yKind === undefined ? {} : { yKind });
        standardSpectra = loaded.standards.map((standard, index) => ({ index, spectrum: standard.spectrum }));
        const inputs: CalibrationInput[] = [
          { role: 'manifest', path: relativeTo(folder, manifestPath), sha256: sha256OfFile(manifestPath) },
          ...(options.method === undefined
            ? []
            : [
                {
                  role: 'method' as const,
                  path: relativeTo(folder, options.method),
                  sha256: sha256OfFile(options.method),
                },
              ]),
          ...loaded.inputs.map((input) => ({ ...input, path: relativeTo(folder, input.path) })),
        ];
        const context = {
          inputs,
          createdAt,
          defaultConditions: conditionOptions(options),
          warnings: manifest.warnings,
          ...(options.title === undefined ? {} : { title: options.title }),
        };
        if (method.model === 'cls') {
          // A background spectrum is named relative to the method file.
          const backgroundPath =
            method.background === undefined || options.method === undefined
              ? undefined
              : join(dirname(options.method), method.background);
          const background =
            backgroundPath === undefined
              ? undefined
              : readScan(backgroundPath, yKind === undefined ? {} : { yKind });
          if (backgroundPath !== undefined)
            inputs.push({
              role: 'background',
              path: relativeTo(folder, backgroundPath),
              sha256: sha256OfFile(backgroundPath),
            });
          calibration = buildClsCalibration(method, loaded.standards, {
            ...context,
            ...(background === undefined ? {} : { background }),
          });
        } else if (method.model === 'band') {
          calibration = buildBandCalibration(method, loaded.standards, context);
        } else {
          throw new BandwrightError('USAGE', 'calibrate: a responses method needs --responses <table>', {
            parameter: '--method',
          });
        }
      }
      const plots =
        options.plot === undefined ? [] : calibrationPlots(calibration, standardSpectra, { wavenumberAxis });
      if (options.plot !== undefined) refuseExistingPlots(options.plot, plots, options.force === true);
      writeCalibration(output, calibration, { force: options.force === true });
      if (options.plot !== undefined)
        note(
          context,
          `${writePlotFiles(options.plot, plots, { force: true }).length} plot(s) written to ${options.plot}`,
        );
      if (options.json) context.stdout.write(`${JSON.stringify(calibration, null, 2)}\n`);
      else context.stdout.write(`${formatCalibrationSummary(calibration)}\n`);
      note(context, `calibration written to ${output} (sha256 ${calibration.sha256.slice(0, 16)}…)`);
    });
}
