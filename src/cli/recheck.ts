/**
 * `bandwright recheck`: measure a check standard with a calibration, judge it against the
 * tolerance and the control rules on the calibration's history, append it to the history, and say
 * when the next recheck is due. Exit status 0 pass, 3 warning, 4 fail (DESIGN §4).
 */
import type { Command } from 'commander';
import {
  BandwrightError,
  checkRecordOf,
  formatRecheckText,
  historyPathFor,
  measureCheck,
  parseConcentrationUnit,
  readCalibration,
  readScan,
  recheckDocument,
  recheckExitCode,
  appendHistoryRecord,
  judgeCheck,
  type JudgedCheck,
  scheduleFor,
  sha256OfFile,
  type CheckMeasurementRecord,
  type RecheckPolicy,
} from '../index.js';
import { conditionOptions, yKindOption } from './calibrate.js';
import { raiseStatus, type CommandContext } from './context.js';
import { parseNumberOption, parsePositiveOption } from './parse.js';
import { writeRecheckPlot } from './report.js';

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

const ISO_TIME = /^\d{4}-\d{2}-\d{2}(?:T\d{2}:\d{2}(?::\d{2}(?:\.\d{1,9})?)?(Z|[+-]\d{2}:\d{2}))?$/;

/**
 * Parses an ISO 8601 time option: a date (`2026-09-01`, taken as 00:00 UTC) or a date and time with
 * its zone (`2026-09-01T09:30Z`, `2026-09-01T11:30+02:00`). A time without a zone is refused, so a
 * record never depends on the computer's time zone.
 *
 * @param text - the option's text
 * @param option - option name for messages
 * @returns the time as ISO 8601 UTC (`toISOString`)
 * @throws BandwrightError `USAGE`
 */
export function parseTimeOption(text: string, option: string): string {
  const trimmed = text.trim();
  if (/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(?::\d{2}(?:\.\d+)?)?$/.test(trimmed)) {
    throw new BandwrightError(
      'USAGE',
      `${option} = ${JSON.stringify(text)} has no time zone; add Z (UTC) or an offset such as +02:00`,
      { parameter: option },
    );
  }
  const ms = ISO_TIME.test(trimmed)
    ? Date.parse(trimmed.length === 10 ? `${trimmed}T00:00:00Z` : trimmed)
    : Number.NaN;
  if (!Number.isFinite(ms)) {
    throw new BandwrightError(
      'USAGE',
      `${option} = ${JSON.stringify(text)}, must be an ISO 8601 date or time such as 2026-09-01 or 2026-09-01T09:30:00Z`,
      { parameter: option },
    );
  }
  const iso = new Date(ms).toISOString();
  // Date.parse rolls 2026-02-30 over to March: refuse dates that do not exist.
  if (iso.slice(0, 10) !== trimmed.slice(0, 10) && !/[+-]\d{2}:\d{2}$/.test(trimmed)) {
    throw new BandwrightError('USAGE', `${option} = ${JSON.stringify(text)} is not a calendar date`, {
      parameter: option,
    });
  }
  return iso;
}

/**
 * The recheck policy: the calibration's, with the command's overrides.
 *
 * @param base - the calibration's `method.recheck`
 * @param flags - `everyDays`, `tolerancePct` option texts
 * @throws BandwrightError `USAGE`
 */
export function policyFrom(
  base: RecheckPolicy,
  flags: { everyDays?: string; tolerancePct?: string },
): RecheckPolicy {
  const policy = { ...base };
  if (flags.everyDays !== undefined) policy.everyDays = parsePositiveOption(flags.everyDays, '--every-days');
  if (flags.tolerancePct !== undefined)
    policy.tolerancePct = parseNumberOption(flags.tolerancePct, '--tolerance-pct', [
      (n) => n > 0 && n < 100,
      'must be a percentage > 0 and < 100',
    ]);
  return policy;
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
      "measure a check standard, judge it (tolerance and control rules), append it to the calibration's history, and give the next due date (exit 0 pass, 3 warning, 4 fail)",
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
      'also write the control chart as <gas>-control-chart.svg into this folder (regenerated from the history, so replaced each time)',
    )
    .action((calibrationPath: string, scan: string, flags: RecheckFlags) => {
      // Options first, so that a mistyped value fails before any file is read.
      const certified = parseNumberOption(flags.certified, '--certified', [
        (n) => n >= 0,
        'must be a concentration >= 0 (0 for zero gas)',
      ]);
      const unit = flags.unit === undefined ? undefined : parseConcentrationUnit(flags.unit, '--unit');
      const level = parseNumberOption(flags.level, '--level', [
        (n) => n > 0 && n < 1,
        'must be between 0 and 1, e.g. 0.95',
      ]);
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
