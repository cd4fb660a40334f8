/**
 * `bandwright quantify`: concentrations with prediction intervals for sample scans, or for
 * responses given on the command line.
 */
import type { Command } from 'commander';
import {
  BandwrightError,
  expandScanArguments,
  formatResultsText,
  quantifyScan,
  quantifyResponses,
  readCalibration,
  reportedGases,
  readLimits,
  readScan,
  resultsCsv,
  resultsDocument,
  writeFileAtomic,
  parseConcentrationUnit,
  correctToReferenceOxygen,
  isFailure,
  type BatchEntry,
  type Calibration,
  type QuantifyOptions,
  type SampleSpectrum,
  readScanList,
} from '../index.js';
import { QUANTIFY_BATCH_HELP, runQuantifyBatch } from './batch-command.js';
import { resultsJsonLine } from '../batch/scan-quantifier.js';
import { workersOption } from '../batch/engine.js';
import { conditionOptions, yKindOption } from './calibrate.js';
import { note, raiseStatus, type CommandContext } from './context.js';
import { collect, parseNumberOption, parsePositiveOption } from './parse.js';
import { refuseExisting, wavenumberAxisOption, writeQuantifyOutputs } from './report.js';

/** The flags {@link withReportingOptions} adds, as commander parses them. */
export interface ReportingFlags {
  level: string;
  pathLength?: string;
  temperature?: string;
  pressure?: string;
  mgM3?: boolean;
  refTemperature: string;
  refPressure: string;
  dry?: boolean;
  h2o?: string;
  o2?: string;
  o2Ref?: string;
  o2Air: string;
  limits?: string;
  unit?: string;
  yKind?: string;
}

interface QuantifyFlags extends ReportingFlags {
  report?: string;
  plot?: string;
  wavenumberAxis?: string;
  json?: boolean;
  csv?: string;
  jsonl?: string;
  from?: string;
  quiet?: boolean;
  workers?: string;
  force?: boolean;
  response?: string[];
}

/**
 * Turns quantify flags into core options.
 *
 * @param flags - parsed flags
 * @returns options for the quantify functions
 * @throws BandwrightError `USAGE` for bad values or incomplete combinations
 */
export function quantifyOptionsFrom(flags: ReportingFlags): QuantifyOptions {
  const percent = (text: string, option: string): number =>
    parseNumberOption(text, option, [(n) => n >= 0 && n <= 100, 'must be a percentage from 0 to 100']);
  const options: QuantifyOptions = {
    level: parseNumberOption(flags.level, '--level', [
      (n) => n > 0 && n < 1,
      'must be between 0 and 1, e.g. 0.95',
    ]),
    defaultConditions: conditionOptions(flags),
  };
  if (flags.mgM3)
    options.massConcentration = {
      temperature_K: parsePositiveOption(flags.refTemperature, '--ref-temperature'),
      pressure_kPa: parsePositiveOption(flags.refPressure, '--ref-pressure'),
    };
  if (flags.h2o !== undefined && !flags.dry)
    throw new BandwrightError('USAGE', '--h2o gives the water vapour for --dry; add --dry', {
      parameter: '--h2o',
    });
  if (flags.dry)
    options.dryBasis = flags.h2o === undefined ? {} : { waterFraction: percent(flags.h2o, '--h2o') / 100 };
  if ((flags.o2 === undefined) !== (flags.o2Ref === undefined))
    throw new BandwrightError(
      'USAGE',
      'the O2 correction needs both --o2 <measured %> and --o2-ref <reference %>',
      { parameter: flags.o2 === undefined ? '--o2' : '--o2-ref' },
    );
  if (flags.o2 !== undefined && flags.o2Ref !== undefined) {
    options.oxygen = {
      measured_pct: percent(flags.o2, '--o2'),
      reference_pct: percent(flags.o2Ref, '--o2-ref'),
      air_pct: percent(flags.o2Air, '--o2-air'),
    };
    // The O2 values do not depend on the scan: refuse an impossible correction before reading any.
    correctToReferenceOxygen(1, options.oxygen);
  }
  if (flags.limits !== undefined) options.limits = readLimits(flags.limits);
  if (flags.unit !== undefined) options.unit = parseConcentrationUnit(flags.unit, '--unit');
  return options;
}

/**
 * Quantifies scans one by one; a scan that fails becomes a failure entry and the batch goes on.
 *
 * @param calibration - verified calibration
 * @param scans - scan paths (or `-`)
 * @param options - quantify options
 * @param yKind - y-kind for scans that do not declare one
 * @param spectra - when given, every scan read is added to it (for plots and reports)
 */
export function quantifyScans(
  calibration: Calibration,
  scans: readonly string[],
  options: QuantifyOptions,
  yKind?: string,
  spectra?: SampleSpectrum[],
): BatchEntry[] {
  const kind = yKindOption(yKind);
  return scans.map((scan): BatchEntry => {
    try {
      const spectrum = readScan(scan, kind === undefined ? {} : { yKind: kind });
      spectra?.push({ scan, spectrum });
      return quantifyScan(calibration, spectrum, options);
    } catch (error) {
      if (error instanceof BandwrightError) return { scan, error: error.message };
      throw error;
    }
  });
}

/**
 * Adds the options every quantifying command shares (quantify, watch): interval level, default
 * conditions, reporting unit and conversions, exposure limits, y-kind.
 *
 * @param command - the command to extend
 * @returns the same command
 */
export function withReportingOptions(command: Command): Command {
  return command
    .option('--level <p>', 'prediction-interval level', '0.95')
    .option('--path-length <m>', 'path length for scans that do not state it, m')
    .option('--temperature <K>', 'gas temperature for scans that do not state it, K')
    .option('--pressure <kPa>', 'gas pressure for scans that do not state it, kPa')
    .option('--unit <unit>', "report in ppm, ppb or pct (default: the calibration's unit)")
    .option('--mg-m3', 'also report mg/m³ at the reference temperature and pressure')
    .option('--ref-temperature <K>', 'reference temperature for --mg-m3, K', '273.15')
    .option('--ref-pressure <kPa>', 'reference pressure for --mg-m3, kPa', '101.325')
    .option('--dry', 'also report on a dry basis (H2O from the same scan, or --h2o)')
    .option('--h2o <pct>', 'water vapour in the sample, % by volume, for --dry')
    .option('--o2 <pct>', 'measured O2, %, for the oxygen reference correction')
    .option('--o2-ref <pct>', 'reference O2, %, to correct to')
    .option('--o2-air <pct>', 'O2 of air, %, in the correction', '20.9')
    .option('--limits <file>', 'CSV of exposure limits (gas,limit,unit,basis,source) for the over-limit flag')
    .option('--y-kind <kind>', 'y values of scans that do not declare them');
}

/**
 * Registers `quantify` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerQuantify(program: Command, context: CommandContext): void {
  const command = program
    .command('quantify')
    .description(
      'quantify sample scans (files, folders, globs, - for stdin) or given responses with a calibration',
    )
    .argument('<calibration>', 'calibration file (JSON) made by calibrate')
    .argument('[scans...]', 'sample scans: files, folders, globs, or - for standard input')
    .option(
      '--response <y>',
      'a response at reference conditions instead of scans (repeat for replicates)',
      collect,
    )
    .option('--json', 'print results as JSON on stdout')
    .option('--csv <file>', 'write one row per scan to a CSV file')
    .option(
      '--jsonl <file>',
      'write one JSON line per scan (a results element with calibrationSha256) to a file',
    )
    .option('--from <list>', 'also quantify the scans listed in a file, one path per line (- for stdin)')
    .option('--quiet', 'print no results on stdout (with --csv or --jsonl)')
    .option(
      '--workers <n>',
      'worker threads reading and quantifying scans: auto, or a count (0: none)',
      'auto',
    )
    .option('--force', 'replace an existing --csv or --jsonl file, --report file or --plot files');
  withReportingOptions(command)
    .option(
      '--report <file>',
      'write a self-contained HTML report: results table and one spectrum plot per sample',
    )
    .option('--plot <dir>', "write each sample's plots as SVG files into this folder")
    .option(
      '--wavenumber-axis <order>',
      'plots with wavenumbers descending (high on the left, default) or ascending',
    )
    .addHelpText('after', QUANTIFY_BATCH_HELP)
    .action(async (calibrationPath: string, scanArguments: string[], flags: QuantifyFlags) => {
      const wavenumberAxis = wavenumberAxisOption(flags.wavenumberAxis);
      if (flags.report !== undefined) refuseExisting(flags.report, flags.force === true, '--report');
      const spectra: SampleSpectrum[] = [];
      const calibration = readCalibration(calibrationPath);
      const options = quantifyOptionsFrom(flags);
      const level = options.level ?? 0.95;
      let entries: BatchEntry[];
      if (flags.response !== undefined) {
        if (scanArguments.length > 0 || flags.from !== undefined)
          throw new BandwrightError('USAGE', 'quantify: give scans or --response values, not both', {
            parameter: '--response',
          });
        const responses = flags.response.map((text, i) => parseNumberOption(text, `--response ${i + 1}`));
        entries = [quantifyResponses(calibration, responses, options)];
      } else {
        if (scanArguments.length === 0 && flags.from === undefined)
          throw new BandwrightError(
            'USAGE',
            'quantify: give at least one scan (file, folder, glob or -), --from <list>, or --response',
            { parameter: 'scans' },
          );
        if (flags.json && flags.quiet)
          throw new BandwrightError(
            'USAGE',
            'quantify: --json prints results on stdout and --quiet prints none; give one',
            { parameter: '--quiet' },
          );
        const workers = workersOption(flags.workers ?? 'auto');
        const paths = [
          ...(scanArguments.length === 0 ? [] : expandScanArguments(scanArguments)),
          ...(flags.from === undefined ? [] : readScanList(flags.from)),
        ];
        if (paths.length === 0)
          throw new BandwrightError('USAGE', `quantify: ${flags.from} lists no scans`, {
            parameter: '--from',
          });
        if (flags.report === undefined && flags.plot === undefined) {
          // Streaming batch: entries go to the outputs as they come (batch-command.ts).
          await runQuantifyBatch(context, {
            calibration,
            calibrationPath,
            options,
            ...(flags.yKind === undefined ? {} : { yKind: yKindOption(flags.yKind) }),
            paths,
            json: flags.json === true,
            quiet: flags.quiet === true,
            ...(flags.csv === undefined ? {} : { csv: flags.csv }),
            ...(flags.jsonl === undefined ? {} : { jsonl: flags.jsonl }),
            force: flags.force === true,
            workers,
          });
          return;
        }
        entries = quantifyScans(calibration, paths, options, flags.yKind, spectra);
      }
      const gases = reportedGases(calibration).map((g) => ({ gas: g.gas, unit: options.unit ?? g.unit }));
      if (flags.csv !== undefined) {
        writeFileAtomic(flags.csv, resultsCsv(entries, gases, calibration.sha256), {
          overwrite: flags.force === true,
          createFolder: true,
        });
        note(context, `results written to ${flags.csv}`);
      }
      if (flags.jsonl !== undefined) {
        writeFileAtomic(
          flags.jsonl,
          entries.map((entry) => resultsJsonLine(entry, calibration.sha256)).join(''),
          { overwrite: flags.force === true, createFolder: true },
        );
        note(context, `results written to ${flags.jsonl}`);
      }
      if (flags.report !== undefined || flags.plot !== undefined) {
        writeQuantifyOutputs(context, {
          calibration,
          calibrationPath,
          entries,
          spectra,
          options,
          report: flags.report,
          plot: flags.plot,
          force: flags.force === true,
          wavenumberAxis,
        });
      }
      if (flags.json)
        context.stdout.write(
          `${JSON.stringify(resultsDocument(entries, { file: calibrationPath, sha256: calibration.sha256 }, level), null, 2)}\n`,
        );
      else context.stdout.write(`${formatResultsText(entries, level)}\n`);
      const failures = entries.filter(isFailure);
      for (const failure of failures) note(context, `bandwright: ${failure.error}`);
      const failed = failures.length;
      if (failed > 0) {
        note(context, `${failed} of ${entries.length} scan(s) could not be quantified`);
        raiseStatus(context, 1);
      }
    });
}
