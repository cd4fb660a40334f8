/**
 * `bandwright watch <calibration> <folder>`: quantify each new complete scan as an instrument
 * writes it into a folder, append its result, and keep going past bad files; stop cleanly on
 * Ctrl-C or SIGTERM. `--once` processes the complete scans already there and exits (for cron).
 */
import { basename, dirname, join } from 'node:path';
import type { Command } from 'commander';
import {
  BandwrightError,
  createFolderWatcher,
  formatNumber,
  isFailure,
  openProcessedRecord,
  readCalibration,
  readProcessedRecord,
  reportedGases,
  type BatchEntry,
  type FileStamp,
  type ProcessedRecordFile,
} from '../index.js';
import { openResultFiles, resultFiles } from '../batch/sinks.js';
import { createScanQuantifier } from '../batch/scan-quantifier.js';
import { yKindOption } from './calibrate.js';
import { note, raiseStatus, type CommandContext } from './context.js';
import { parseNumberOption } from './parse.js';
import { quantifyOptionsFrom, withReportingOptions, type ReportingFlags } from './quantify.js';

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
  const gases = entry.gases.map(
    (g) =>
      `${g.gas} ${g.flags.includes('below-lod') ? '< LOD ' : ''}${formatNumber(g.value)} ${g.unit} [${formatNumber(g.low)}, ${formatNumber(g.high)}]${g.flags.length > 0 ? ` (${g.flags.join(', ')})` : ''}`,
  );
  return `${entry.scan}: ${gases.join('; ')}`;
}

function millisecondsOption(text: string, option: string, minimum: number): number {
  return parseNumberOption(text, option, [
    (n) => Number.isInteger(n) && n >= minimum,
    `must be a whole number of milliseconds >= ${minimum}`,
  ]);
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
      const gases = reportedGases(calibration).map((g) => ({ gas: g.gas, unit: options.unit ?? g.unit }));
      const resultsFile = flags.csv ?? flags.jsonl;
      const statePath =
        flags.state ??
        (resultsFile === undefined
          ? undefined
          : join(dirname(resultsFile), `.${basename(resultsFile)}.watch-state`));
      const processed =
        statePath === undefined ? new Map<string, FileStamp>() : readProcessedRecord(statePath);
      const watcher = createFolderWatcher(folder, {
        settleMs,
        pollMs,
        processed,
        ignore: [flags.csv, flags.jsonl, statePath].filter((p): p is string => p !== undefined),
      });
      const { sinks, lineFormats } = openResultFiles(resultFiles(flags, gases, calibration.sha256), {
        mode: 'append',
      });
      let record: ProcessedRecordFile | undefined;
      try {
        if (statePath !== undefined) record = openProcessedRecord(statePath);
      } catch (error) {
        for (const sink of sinks) sink.abort();
        throw error;
      }
      const quantify = createScanQuantifier({
        calibration,
        options,
        lineFormats,
        keepEntries: true,
        ...(yKind === undefined ? {} : { yKind }),
      });

      let stopping: string | undefined;
      let wake: (() => void) | undefined;
      const onSignal = (signal: string): void => {
        if (stopping !== undefined) {
          removeHandlers();
          process.kill(process.pid, signal);
          return;
        }
        stopping = signal;
        wake?.();
      };
      const onInterrupt = (): void => onSignal('SIGINT');
      const onTerminate = (): void => onSignal('SIGTERM');
      const removeHandlers = (): void => {
        process.off('SIGINT', onInterrupt);
        process.off('SIGTERM', onTerminate);
      };
      process.on('SIGINT', onInterrupt);
      process.on('SIGTERM', onTerminate);
      const sleep = (ms: number): Promise<void> =>
        new Promise((resolve) => {
          const done = (): void => {
            clearTimeout(timer);
            wake = undefined;
            resolve();
          };
          const timer = setTimeout(done, ms);
          wake = done;
        });

      let done = 0;
      let failed = 0;
      let folderProblem: string | undefined;
      const look = (): void => {
        let ready;
        try {
          ready = watcher.poll();
          if (folderProblem !== undefined) note(context, `bandwright: ${folder} can be read again`);
          folderProblem = undefined;
        } catch (error) {
          if (!(error instanceof BandwrightError)) throw error;
          // Log once and keep looking: a network folder may come back.
          if (folderProblem !== error.message) note(context, `bandwright: ${error.message}; still watching`);
          folderProblem = error.message;
          return;
        }
        for (const file of ready) {
          if (stopping !== undefined) return;
          if (file.previously !== undefined)
            note(
              context,
              `bandwright: ${file.path} changed after it was quantified (size ${file.previously.size} → ${file.stamp.size} bytes); quantified again`,
            );
          const item = quantify(file.path);
          for (const sink of sinks) sink.add(item);
          record?.add(file.name, file.stamp);
          watcher.markProcessed(file);
          done++;
          const entry = item.entry as BatchEntry;
          if (isFailure(entry)) {
            failed++;
            note(context, `bandwright: ${entry.error}`);
          } else if (sinks.length === 0 && !flags.quiet) context.stdout.write(`${watchLine(entry)}\n`);
        }
      };

      const started = performance.now();
      try {
        // The first look fails loudly when the folder cannot be read at all.
        watcher.poll();
        watcher.onChange(() => wake?.());
        look();
        if (flags.once) {
          if (watcher.pending().length > 0 && stopping === undefined) {
            await sleep(settleMs + 1);
            look();
          }
          const left = watcher.pending();
          if (left.length > 0)
            note(
              context,
              `bandwright: ${left.length} file(s) still being written, left for the next run: ${left.slice(0, 5).join(', ')}${left.length > 5 ? ', …' : ''}`,
            );
        } else {
          note(context, `watching ${folder} (settle ${settleMs} ms); Ctrl-C or SIGTERM stops`);
          while (stopping === undefined) {
            await sleep(watcher.nextDelayMs());
            if (stopping === undefined) look();
          }
        }
        for (const sink of sinks) sink.finish();
      } catch (error) {
        for (const sink of sinks) sink.abort();
        throw error;
      } finally {
        watcher.close();
        record?.close();
        removeHandlers();
      }
      const seconds = (performance.now() - started) / 1000;
      note(
        context,
        `${done} scan(s) quantified, ${failed} failed, in ${seconds.toFixed(1)} s${stopping === undefined ? '' : `; stopped by ${stopping}`}`,
      );
      if (failed > 0) raiseStatus(context, 1);
    });
}
