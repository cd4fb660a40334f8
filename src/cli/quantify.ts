/**
 * `bandwright quantify`: concentrations with prediction intervals for sample scans, or for
 * responses given on the command line. A thin shell over the quantify engine
 * (`batch/quantify-run.ts`): flags in, the engine streams every scan to the outputs, and this file
 * words the outcome — a progress bar on an interactive terminal, failures as they happen, a
 * summary, the report and plots, and the exit status (1 when a scan failed, 130/143 when stopped
 * by SIGINT/SIGTERM).
 */
import type { Command } from 'commander';
import { MIN_SCANS_FOR_WORKERS } from '../batch/engine.js';
import {
  quantifyGivenResponses,
  quantifyScans,
  type QuantifyJob,
  type QuantifyOutputs,
  type QuantifyRunOutcome,
} from '../batch/quantify-run.js';
import { readScanList } from '../batch/scan-list.js';
import { expandScanArguments } from '../batch/scan-paths.js';
import { TABLE_PAGE_SCANS } from '../batch/sinks.js';
import { BandwrightError } from '../errors.js';
import { readCalibration } from '../store/calibration-file.js';
import { CLI_PARAMETER_NAMES } from './parameter-names.js';
import { note, raiseStatus, type CommandContext } from './context.js';
import {
  quantifyOptionsFrom,
  wavenumberAxisOption,
  withReportingOptions,
  workersOption,
  yKindOption,
  type ReportingFlags,
} from './options.js';
import { refuseExisting, writeQuantifyReport } from './output-files.js';
import { collect, parseNumberOption } from './parse.js';
import { createProgress } from './progress.js';
import { installStopHandlers, SIGNAL_EXIT_STATUS } from './signals.js';

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

/** Help text of `quantify` about long batches and how result files are written. */
export const QUANTIFY_BATCH_HELP = `
Batches:
  Scans come from the arguments (files, folders, globs, - for stdin) and from --from <list>
  (one path per line; relative paths are relative to the current folder; # comments).
  A scan that cannot be read or quantified gets an error row (scan, reason) and the batch
  goes on; the exit status is then 1. Results go to --csv and/or --jsonl as they come; the
  table on stdout is printed in pages of ${TABLE_PAGE_SCANS} scans, the --json document streamed whole;
  --quiet prints nothing on stdout. With --report or --plot the whole batch is kept in memory
  for the report and quantified in this thread.
  On an interactive terminal a progress bar is drawn on stderr; a summary (scans, failures,
  time, scans/s) ends every batch. Worker threads (--workers auto: one per idle core when two
  or more are idle, for batches of ${MIN_SCANS_FOR_WORKERS} scans or more) read and quantify while the
  main thread writes; the results are the same, in the same order, as with --workers 0.

Result files (--csv, --jsonl):
  Rows stream into .<name>.partial-<pid> beside the file, which is renamed into place when the
  batch ends, so the file is either the complete new one or the previous one. An existing file
  is replaced only with --force. Ctrl-C or SIGTERM: the scans in hand are finished, the file is
  renamed into place with every finished row, and the exit status is 130 (SIGINT) or 143
  (SIGTERM). A second signal or SIGKILL stops at once: an earlier file is left as it was and
  the .partial file holds the rows written so far.
`;

/**
 * Runs a batch of scans through the engine for the command line: progress, failures as they
 * come, the stop handlers, the summary and the exit status.
 */
async function runBatch(
  context: CommandContext,
  job: QuantifyJob,
  paths: readonly string[],
  workers: 'auto' | number,
): Promise<QuantifyRunOutcome> {
  const progress = createProgress(context, { total: paths.length });
  // Reading standard input blocks this thread, so a handler could not run: Ctrl-C keeps its
  // usual meaning there.
  const stop = paths.includes('-')
    ? undefined
    : installStopHandlers((name) =>
        progress.note(
          `bandwright: ${name}: finishing the scans in hand, then writing the results ` +
            `(a second ${name} stops at once)`,
        ),
      );
  let outcome: QuantifyRunOutcome;
  try {
    outcome = await quantifyScans(job, paths, {
      workers,
      ...(stop === undefined ? {} : { signal: stop.signal }),
      onItem: (item, counts) => {
        if (item.error !== undefined) progress.note(`bandwright: ${item.error}`);
        progress.update(counts.done, counts.failed);
      },
      // The bar goes before the end of the --json document is printed.
      beforeFinish: () => progress.finish(),
    });
  } finally {
    progress.finish();
    stop?.remove();
  }
  const { scans, failed, seconds } = outcome;
  if (outcome.workersOutOfMemory > 0)
    note(
      context,
      `bandwright: ${outcome.workersOutOfMemory} worker thread(s) ran out of heap; ` +
        'their scans were quantified in the main thread',
    );
  for (const file of outcome.files) note(context, `results written to ${file}`);
  if (failed > 0) {
    note(context, `${failed} of ${scans} scan(s) could not be quantified`);
    raiseStatus(context, 1);
  }
  const rate = seconds > 0 ? scans / seconds : Number.POSITIVE_INFINITY;
  const threads = outcome.workers > 0 ? `, ${outcome.workers} worker threads` : '';
  note(
    context,
    `${scans} scan(s), ${failed} failed, in ${seconds.toFixed(2)} s ` +
      `(${Number.isFinite(rate) ? rate.toFixed(0) : '—'} scans/s${threads})`,
  );
  const stoppedBy = stop?.stoppedBy();
  if (stoppedBy !== undefined) {
    note(
      context,
      `bandwright: interrupted by ${stoppedBy} after ${scans} of ${outcome.total} scans; ` +
        `the results of those ${scans} are complete`,
    );
    raiseStatus(context, SIGNAL_EXIT_STATUS[stoppedBy]);
  }
  return outcome;
}

/** The scan paths of the arguments and of `--from`, in that order. */
function scanPaths(scanArguments: readonly string[], from: string | undefined): string[] {
  if (scanArguments.length === 0 && from === undefined)
    throw new BandwrightError(
      'USAGE',
      'quantify: give at least one scan (file, folder, glob or -), --from <list>, or --response',
      { parameter: 'scans' },
    );
  const paths = [
    ...(scanArguments.length === 0 ? [] : expandScanArguments(scanArguments)),
    ...(from === undefined ? [] : readScanList(from)),
  ];
  if (paths.length === 0)
    throw new BandwrightError('USAGE', `quantify: ${from} lists no scans`, { parameter: '--from' });
  return paths;
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
      const force = flags.force === true;
      if (flags.report !== undefined) refuseExisting(flags.report, force, '--report');
      const calibration = readCalibration(calibrationPath);
      const options = quantifyOptionsFrom(flags);
      const reporting = flags.report !== undefined || flags.plot !== undefined;
      const outputs: QuantifyOutputs = {
        csv: flags.csv,
        jsonl: flags.jsonl,
        mode: 'replace',
        overwrite: force,
        ...(flags.json
          ? { stdout: { sink: context.stdout, form: 'json' as const } }
          : flags.quiet
            ? {}
            : { stdout: { sink: context.stdout, form: 'table' as const } }),
        // A report needs the whole batch: the entries and the spectra read.
        collectEntries: reporting,
        collectSpectra: reporting,
      };
      const job: QuantifyJob = {
        calibration,
        calibrationPath,
        options,
        outputs,
        parameterNames: CLI_PARAMETER_NAMES,
      };
      let outcome: QuantifyRunOutcome;
      if (flags.response !== undefined) {
        if (scanArguments.length > 0 || flags.from !== undefined)
          throw new BandwrightError('USAGE', 'quantify: give scans or --response values, not both', {
            parameter: '--response',
          });
        const responses = flags.response.map((text, i) => parseNumberOption(text, `--response ${i + 1}`));
        outcome = quantifyGivenResponses(job, responses);
        for (const file of outcome.files) note(context, `results written to ${file}`);
      } else {
        if (flags.json && flags.quiet)
          throw new BandwrightError(
            'USAGE',
            'quantify: --json prints results on stdout and --quiet prints none; give one',
            { parameter: '--quiet' },
          );
        const workers = workersOption(flags.workers ?? 'auto');
        const paths = scanPaths(scanArguments, flags.from);
        job.yKind = yKindOption(flags.yKind);
        outcome = await runBatch(context, job, paths, workers);
      }
      if (reporting)
        writeQuantifyReport(context, {
          calibration,
          calibrationPath,
          entries: outcome.entries,
          spectra: outcome.spectra,
          options,
          report: flags.report,
          plot: flags.plot,
          force,
          wavenumberAxis,
        });
    });
}
