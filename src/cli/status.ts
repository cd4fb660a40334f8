/**
 * `bandwright status`: which calibrations are current, due, overdue or failed, for people and for
 * schedulers (cron, CI). Exit status 0 all current, 3 due within a day, 4 overdue or failed; 1 when
 * a calibration or history could not be read (DESIGN §4).
 */
import type { Command } from 'commander';
import { calibrationStatus, statusExitCode, type GasStatus } from '../drift/status.js';
import { BandwrightError } from '../errors.js';
import {
  formatStatusText,
  statusDocument,
  type StatusProblem,
  type StatusReport,
} from '../report/drift-text.js';
import { readCalibration } from '../store/calibration-file.js';
import { collectCalibrationFiles, findCalibrationFiles } from '../store/calibration-files.js';
import { historyPathFor, readHistoryIfExists } from '../store/history.js';
import { raiseStatus, type CommandContext } from './context.js';
import { CLI_PARAMETER_NAMES } from './parameter-names.js';
import { parseTimeOption, recheckPolicyOptions } from './options.js';

interface StatusFlags {
  json?: boolean;
  now?: string;
  everyDays?: string;
  tolerancePct?: string;
}

/** The folder `status` looks in when given nothing. */
export const DEFAULT_CALIBRATION_FOLDER = 'calibrations';

/**
 * Registers `status` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerStatus(program: Command, context: CommandContext): void {
  program
    .command('status')
    .description(
      'table of calibrations: last check, verdict, next due, days overdue, trend ' +
        '(exit 0 all current, 3 due within a day, 4 overdue or failed)',
    )
    .argument(
      '[targets...]',
      `calibration files or folders of them (default: ./${DEFAULT_CALIBRATION_FOLDER})`,
    )
    .option('--now <time>', 'judge as at this ISO 8601 time (default: now)')
    .option(
      '--every-days <days>',
      "recheck interval for every calibration, days (default: each calibration's)",
    )
    .option(
      '--tolerance-pct <pct>',
      "tolerance for every calibration, ± % recovery (default: each calibration's)",
    )
    .option('--json', 'print the status as JSON on stdout')
    .action((targets: string[], flags: StatusFlags) => {
      const now = flags.now === undefined ? new Date().toISOString() : parseTimeOption(flags.now, '--now');
      const policy = recheckPolicyOptions(flags);
      if (targets.length === 0) {
        try {
          findCalibrationFiles(DEFAULT_CALIBRATION_FOLDER);
        } catch (error) {
          if (error instanceof BandwrightError && error.code === 'FILE_NOT_FOUND') {
            throw new BandwrightError(
              'FILE_NOT_FOUND',
              `status: no ./${DEFAULT_CALIBRATION_FOLDER} folder here; give calibration files or folders`,
              { parameter: 'targets' },
            );
          }
          throw error;
        }
      }
      const collected = collectCalibrationFiles(targets.length > 0 ? targets : [DEFAULT_CALIBRATION_FOLDER]);
      const skipped: StatusProblem[] = collected.skipped.map((s) => ({ file: s.path, message: s.reason }));
      const errors: StatusProblem[] = collected.emptyFolders.map((folder) => ({
        file: folder,
        message: 'no calibration files in this folder',
      }));
      const rows: GasStatus[] = [];
      for (const file of collected.calibrations) {
        try {
          const calibration = readCalibration(file);
          const history = readHistoryIfExists(historyPathFor(file), {
            calibrationSha256: calibration.sha256,
            calibrationFile: file,
          });
          rows.push(...calibrationStatus(calibration, file, history?.records ?? [], { policy, now }));
        } catch (error) {
          if (!(error instanceof BandwrightError)) throw error;
          errors.push({ file, message: error.describe(CLI_PARAMETER_NAMES) });
        }
      }
      const exitStatus = Math.max(
        statusExitCode(rows.map((r) => r.schedule.state)),
        errors.length > 0 ? 1 : 0,
      );
      const report: StatusReport = { now, rows, skipped, errors, exitStatus };
      if (flags.json) context.stdout.write(`${JSON.stringify(statusDocument(report), null, 2)}\n`);
      else context.stdout.write(`${formatStatusText(report)}\n`);
      for (const problem of errors) {
        const message = problem.message.startsWith(problem.file)
          ? problem.message
          : `${problem.file}: ${problem.message}`;
        context.stderr.write(`bandwright: ${message}\n`);
      }
      raiseStatus(context, exitStatus);
    });
}
