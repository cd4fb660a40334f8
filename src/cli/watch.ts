/**
 * `bandwright watch <calibration> <folder>`: quantify each new complete scan as an instrument
 * writes it into a folder, append its result, and keep going past bad files; stop cleanly on
 * Ctrl-C or SIGTERM. `--once` processes the complete scans already there and exits (for cron).
 * A thin shell over the engine's folder watching (`batch/watch-run.ts`): flags in, events and
 * the outcome worded here.
 */
import type { Command } from 'commander';
import { watchFolder } from '../batch/watch-run.js';
import { isFailure, type BatchEntry } from '../report/results.js';
import { formatNumber } from '../report/table.js';
import { readCalibration } from '../store/calibration-file.js';
import { CLI_PARAMETER_NAMES } from './parameter-names.js';
import { note, raiseStatus, type CommandContext } from './context.js';
import {
  millisecondsOption,
  quantifyOptionsFrom,
  withReportingOptions,
  yKindOption,
  type ReportingFlags,
} from './options.js';
import { installStopHandlers } from './signals.js';

interface WatchFlags extends ReportingFlags {
  csv?: string;
  jsonl?: string;
  state?: string;
  once?: boolean;
  settle: string;
  poll: string;
  quiet?: boolean;
}

const WATCH_HELP = `
How files are taken:
  A scan is read once it is complete: it was renamed into the folder (write it under a hidden
  name such as .scan.tmp, then rename it), or its size and modification time stayed the same
  for --settle ms. Hidden files are never read. Each version of a file (name, size,
  modification time) is quantified once; the record is kept in --state (default
  .<results file>.watch-state beside the first results file) so a later run goes on from there.

Results:
  Rows are appended to --csv and/or --jsonl as each scan is done (a new file is created with
  its header). An existing CSV must have this calibration's header, and a JSON-lines file must
  hold bandwright results; otherwise watch refuses to start. A bad scan gets an error row and a
  message on stderr, and watching goes on. Without a results file each result is printed as a
  line on stdout (--quiet: nothing).

Stopping:
  Ctrl-C or SIGTERM: the scan in hand is finished and written, then watch exits with status 0
  (1 if any scan failed). --once quantifies the complete scans present (waiting --settle ms
  for the others) and exits, for cron.
`;

/** One result as a line for the terminal. */
export function watchLine(entry: BatchEntry): string {
  if (isFailure(entry)) return `${entry.scan}: failed: ${entry.error}`;
  const gases = entry.gases.map((g) => {
    const belowLod = g.flags.includes('below-lod') ? '< LOD ' : '';
    const interval = `[${formatNumber(g.low)}, ${formatNumber(g.high)}]`;
    const flags = g.flags.length > 0 ? ` (${g.flags.join(', ')})` : '';
    return `${g.gas} ${belowLod}${formatNumber(g.value)} ${g.unit} ${interval}${flags}`;
  });
  return `${entry.scan}: ${gases.join('; ')}`;
}

/**
 * Registers `watch` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerWatch(program: Command, context: CommandContext): void {
  const command = program
    .command('watch')
    .description('quantify each new complete scan written into a folder, appending results; --once for cron')
    .argument('<calibration>', 'calibration file (JSON) made by calibrate')
    .argument('<folder>', 'folder the instrument writes scans into')
    .option('--csv <file>', 'append one row per scan to this CSV file (created with its header if missing)')
    .option('--jsonl <file>', 'append one JSON line per scan (with calibrationSha256) to this file')
    .option(
      '--state <file>',
      'record of the files processed (default: .<results file>.watch-state beside it)',
    )
    .option('--once', 'quantify the complete scans present and exit')
    .option('--settle <ms>', 'a file is complete when unchanged this long, ms', '500')
    .option('--poll <ms>', 'look at the folder at least this often, ms (besides file-system events)', '1000')
    .option('--quiet', 'print no result lines on stdout');
  withReportingOptions(command)
    .addHelpText('after', WATCH_HELP)
    .action(async (calibrationPath: string, folder: string, flags: WatchFlags) => {
      const settleMs = millisecondsOption(flags.settle, '--settle', 0);
      const pollMs = millisecondsOption(flags.poll, '--poll', 10);
      const calibration = readCalibration(calibrationPath);
      const options = quantifyOptionsFrom(flags);
      const yKind = yKindOption(flags.yKind);
      const printLines = flags.csv === undefined && flags.jsonl === undefined && !flags.quiet;
      const stop = installStopHandlers();
      let outcome;
      try {
        outcome = await watchFolder({
          job: {
            calibration,
            calibrationPath,
            options,
            yKind,
            outputs: { csv: flags.csv, jsonl: flags.jsonl },
            parameterNames: CLI_PARAMETER_NAMES,
          },
          folder,
          settleMs,
          pollMs,
          state: flags.state,
          once: flags.once === true,
          signal: stop.signal,
          events: {
            onWatching: () =>
              note(context, `watching ${folder} (settle ${settleMs} ms); Ctrl-C or SIGTERM stops`),
            onFolder: (problem) =>
              note(
                context,
                problem === undefined
                  ? `bandwright: ${folder} can be read again`
                  : `bandwright: ${problem}; still watching`,
              ),
            onScan: (file, item) => {
              if (file.previously !== undefined)
                note(
                  context,
                  `bandwright: ${file.path} changed after it was quantified ` +
                    `(size ${file.previously.size} → ${file.stamp.size} bytes); quantified again`,
                );
              const entry = item.entry as BatchEntry;
              if (isFailure(entry)) note(context, `bandwright: ${entry.error}`);
              else if (printLines) context.stdout.write(`${watchLine(entry)}\n`);
            },
          },
        });
      } finally {
        stop.remove();
      }
      const left = outcome.stillWriting;
      if (left.length > 0)
        note(
          context,
          `bandwright: ${left.length} file(s) still being written, left for the next run: ` +
            `${left.slice(0, 5).join(', ')}${left.length > 5 ? ', …' : ''}`,
        );
      const stoppedBy = stop.stoppedBy();
      note(
        context,
        `${outcome.scans} scan(s) quantified, ${outcome.failed} failed, in ${outcome.seconds.toFixed(1)} s` +
          `${stoppedBy === undefined ? '' : `; stopped by ${stoppedBy}`}`,
      );
      if (outcome.failed > 0) raiseStatus(context, 1);
    });
}
