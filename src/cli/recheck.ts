/**
 * `bandwright recheck`: measure a check standard with a calibration, judge it against the
 * tolerance and the control rules on the calibration's history, append it to the history, and say
 * when the next recheck is due. Exit status 0 pass, 3 warning, 4 fail (DESIGN §4).
 */
import type { Command } from 'commander';
import type { RecheckPolicy } from '../calibration/method.js';
import {
  judgeCheck,
  type JudgedCheck,
  type DriftEvaluation,
  type CheckMeasurementRecord,
} from '../drift/evaluate.js';
import { checkRecordOf, measureCheck } from '../drift/recheck.js';
import { scheduleFor } from '../drift/schedule.js';
import { recheckExitCode } from '../drift/status.js';
import { BandwrightError } from '../errors.js';
import { parseConcentrationUnit } from '../gas/units.js';
import { formatRecheckText, recheckDocument } from '../report/drift-text.js';
import { controlChartFromEvaluation } from '../report/svg/control-chart-data.js';
import { controlChartPlot } from '../report/svg/plot-set.js';
import { readCalibration } from '../store/calibration-file.js';
import { sha256OfFile } from '../store/hash.js';
import { historyPathFor, appendHistoryRecord } from '../store/history.js';
import { readScan } from '../store/scan-file.js';
import { note, raiseStatus, type CommandContext } from './context.js';
import {
  conditionOptions,
  levelOption,
  parseTimeOption,
  recheckPolicyOptions,
  yKindOption,
} from './options.js';
import { writePlotFiles } from './output-files.js';
import { parseNumberOption } from './parse.js';

/**
 * Judges a new check against the history and appends it, both while the history's lock is held,
 * so concurrent rechecks each see every record appended before theirs. The store appends; the
 * judging is drift's.
 */
function appendJudgedCheck(
  path: string,
  measurement: CheckMeasurementRecord,
  options: { calibrationSha256: string; calibrationFile: string; policy: RecheckPolicy },
): JudgedCheck & { created: boolean } {
  let judged: JudgedCheck | undefined;
  const appended = appendHistoryRecord(path, {
    calibrationSha256: options.calibrationSha256,
    calibrationFile: options.calibrationFile,
    complete: (records) => {
      judged = judgeCheck(records, measurement, { policy: options.policy });
      return judged.record;
    },
  });
  if (judged === undefined) throw new Error('appendHistoryRecord returned without making the record');
  // The judged check carries the line it was written on.
  judged.record = appended.record;
  judged.check.record = appended.record;
  return { ...judged, created: appended.created };
}

interface RecheckFlags {
  certified: string;
  unit?: string;
  gas?: string;
  at?: string;
  json?: boolean;
  everyDays?: string;
  tolerancePct?: string;
  level: string;
  pathLength?: string;
  temperature?: string;
  pressure?: string;
  yKind?: string;
  plot?: string;
}

/**
 * The recheck policy: the calibration's, with the command's overrides.
 *
 * @param base - the calibration's `method.recheck`
 * @param flags - `everyDays`, `tolerancePct` option texts
 * @throws BandwrightError `USAGE`
 */
function policyFrom(
  base: RecheckPolicy,
  flags: { everyDays?: string; tolerancePct?: string },
): RecheckPolicy {
  return { ...base, ...recheckPolicyOptions(flags) };
}

/**
 * Writes the control chart of a gas's evaluated history for `recheck --plot`: the file
 * `<gas>-control-chart.svg` is regenerated from the history on every recheck, so it is replaced.
 *
 * @param context - where to print the note
 * @param folder - destination folder
 * @param evaluation - the evaluated history after the new check
 * @param nextDue - next due time, ISO, when known
 */
function writeRecheckPlot(
  context: CommandContext,
  folder: string,
  evaluation: DriftEvaluation,
  nextDue?: string,
): void {
  const chart = controlChartFromEvaluation(evaluation, nextDue === undefined ? {} : { nextDue });
  const written = writePlotFiles(
    folder,
    [controlChartPlot(chart, { file: `${evaluation.gas}-control-chart` })],
    { force: true },
  );
  note(context, `control chart written to ${written.join(', ')}`);
}

/** Lateness allowed for `--at` beyond the clock, for clocks that disagree a little, ms. */
const CLOCK_SLACK_MS = 5 * 60_000;

/**
 * Registers `recheck` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerRecheck(program: Command, context: CommandContext): void {
  program
    .command('recheck')
    .description(
      'measure a check standard, judge it (tolerance and control rules), ' +
        "append it to the calibration's history, and give the next due date (exit 0 pass, 3 warning, 4 fail)",
    )
    .argument('<calibration>', 'calibration file (JSON) made by calibrate')
    .argument('<scan>', 'scan of the check standard (a file: its path and SHA-256 go into the history)')
    .requiredOption('--certified <value>', 'certified concentration of the check standard (0 for zero gas)')
    .option('--unit <unit>', "unit of --certified: ppm, ppb or pct (default: the gas's calibration unit)")
    .option('--gas <name>', 'gas of the check standard (needed when the calibration has several)')
    .option('--at <time>', 'when the check was measured, ISO 8601 with a zone (default: now)')
    .option('--every-days <days>', "recheck interval, days (default: the calibration's)")
    .option('--tolerance-pct <pct>', "tolerance, ± % recovery (default: the calibration's)")
    .option('--level <p>', 'prediction-interval level', '0.95')
    .option('--path-length <m>', 'path length if the scan does not state it, m')
    .option('--temperature <K>', 'gas temperature if the scan does not state it, K')
    .option('--pressure <kPa>', 'gas pressure if the scan does not state it, kPa')
    .option('--y-kind <kind>', 'y values if the scan does not declare them')
    .option('--json', 'print the result as JSON on stdout')
    .option(
      '--plot <dir>',
      'also write the control chart as <gas>-control-chart.svg into this folder ' +
        '(regenerated from the history, so replaced each time)',
    )
    .action((calibrationPath: string, scan: string, flags: RecheckFlags) => {
      // Options first, so that a mistyped value fails before any file is read.
      const certified = parseNumberOption(flags.certified, '--certified', [
        (n) => n >= 0,
        'must be a concentration >= 0 (0 for zero gas)',
      ]);
      const unit = flags.unit === undefined ? undefined : parseConcentrationUnit(flags.unit, '--unit');
      const level = levelOption(flags.level);
      const nowMs = Date.now();
      const recordedAt = new Date(nowMs).toISOString();
      const time = flags.at === undefined ? recordedAt : parseTimeOption(flags.at, '--at');
      if (Date.parse(time) > nowMs + CLOCK_SLACK_MS) {
        throw new BandwrightError(
          'USAGE',
          `--at = ${flags.at} is in the future (now ${recordedAt}); give the time the check standard was measured`,
          { parameter: '--at' },
        );
      }
      if (scan === '-')
        throw new BandwrightError(
          'USAGE',
          'recheck needs the check scan as a file (its path and SHA-256 go into the history), not standard input',
          { parameter: 'scan' },
        );
      const defaultConditions = conditionOptions(flags);
      const yKind = yKindOption(flags.yKind);

      const calibration = readCalibration(calibrationPath);
      const policy = policyFrom(calibration.method.recheck, flags);
      const spectrum = readScan(scan, yKind === undefined ? {} : { yKind });
      const scanSha256 = sha256OfFile(scan);
      const measurement = measureCheck(calibration, spectrum, {
        certified,
        level,
        defaultConditions,
        ...(unit === undefined ? {} : { unit }),
        ...(flags.gas === undefined ? {} : { gas: flags.gas }),
      });
      const history = historyPathFor(calibrationPath);
      const judged = appendJudgedCheck(
        history,
        checkRecordOf(measurement, { time, recordedAt, scan, scanSha256 }),
        {
          calibrationSha256: calibration.sha256,
          calibrationFile: calibrationPath,
          policy,
        },
      );
      const schedule = scheduleFor(
        judged.evaluation.checks.map((c) => ({ time: c.record.time, verdict: c.verdict })),
        { everyDays: policy.everyDays, calibrationCreatedAt: calibration.createdAt, now: recordedAt },
      );
      const outcome = {
        calibration: { file: calibrationPath, sha256: calibration.sha256 },
        history,
        created: judged.created,
        measurement,
        judged,
        schedule,
        level,
      };
      if (flags.json) context.stdout.write(`${JSON.stringify(recheckDocument(outcome), null, 2)}\n`);
      else context.stdout.write(`${formatRecheckText(outcome)}\n`);
      if (flags.plot !== undefined)
        writeRecheckPlot(context, flags.plot, judged.evaluation, schedule.nextDue);
      raiseStatus(context, recheckExitCode(judged.check.verdict));
    });
}
