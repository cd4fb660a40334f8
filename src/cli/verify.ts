/**
 * `bandwright verify`: is this calibration what was built, and are the files it was built from
 * still the same? Exit status 0 when everything matches, 1 when an input changed, is missing or
 * cannot be read, or when the calibration itself fails its hash.
 */
import type { Command } from 'commander';
import { formatTextTable } from '../report/table.js';
import { verifyInputs, type IntegrityReport, type RecordedInputCheck } from '../store/verify.js';
import { note, raiseStatus, type CommandContext } from './context.js';

const STATUS_WORDS: Record<RecordedInputCheck['status'], string> = {
  unchanged: 'unchanged',
  changed: 'CHANGED',
  missing: 'MISSING',
  unreadable: 'UNREADABLE',
};

/**
 * The report as text: the calibration's hash, then one line per input.
 *
 * @param report - from {@link verifyInputs}
 */
export function formatIntegrityText(report: IntegrityReport): string {
  const rows = report.inputs.map((input) => [
    input.role,
    input.path,
    STATUS_WORDS[input.status],
    input.status === 'changed'
      ? `recorded ${input.sha256.slice(0, 12)}…, now ${(input.currentSha256 ?? '').slice(0, 12)}…`
      : input.status === 'unreadable'
        ? (input.message ?? '')
        : '',
  ]);
  const table = formatTextTable(
    [{ header: 'role' }, { header: 'file' }, { header: 'state' }, { header: 'detail' }],
    rows,
  );
  return [`${report.calibration}: content matches its sha256 ${report.sha256}`, '', table].join('\n');
}

/**
 * Registers `verify` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerVerify(program: Command, context: CommandContext): void {
  program
    .command('verify')
    .description('re-hash a calibration and every input file it lists; exit 1 when any changed or is missing')
    .argument('<calibration>', 'calibration file (JSON) made by calibrate')
    .option('--json', 'print the checks as JSON on stdout')
    .action((calibrationPath: string, flags: { json?: boolean }) => {
      const report = verifyInputs(calibrationPath);
      if (flags.json) context.stdout.write(`${JSON.stringify(report, null, 2)}\n`);
      else context.stdout.write(`${formatIntegrityText(report)}\n`);
      const bad = report.inputs.filter((input) => input.status !== 'unchanged');
      if (bad.length > 0) {
        const list = bad
          .map((input) => `${input.path} (${STATUS_WORDS[input.status].toLowerCase()})`)
          .join(', ');
        note(
          context,
          `bandwright: ${bad.length} of ${report.inputs.length} input file(s) of ${calibrationPath} ` +
            `changed or missing since it was built: ${list}; rebuild the calibration or restore the files`,
        );
        raiseStatus(context, 1);
      } else {
        note(context, `all ${report.inputs.length} input file(s) unchanged`);
      }
    });
}
