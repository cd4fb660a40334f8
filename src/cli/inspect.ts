/**
 * `bandwright inspect`: what a scan file holds, before it is used.
 */
import type { Command } from 'commander';
import { expandScanArguments } from '../batch/scan-paths.js';
import { BandwrightError } from '../errors.js';
import { readScan } from '../store/scan-file.js';
import { describeScan, formatScanDescriptions, type ScanDescription } from '../report/inspect.js';
import { yKindOption } from './options.js';
import { note, raiseStatus, type CommandContext } from './context.js';
import { CLI_PARAMETER_NAMES } from './parameter-names.js';

/**
 * Registers `inspect` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 */
export function registerInspect(program: Command, context: CommandContext): void {
  program
    .command('inspect')
    .description('show range, points, spacing, y-kind, peak absorbance and conditions of scans')
    .argument('<scans...>', 'scan files, folders, globs, or - for standard input')
    .option('--y-kind <kind>', 'y values of scans that do not declare them')
    .option('--json', 'print as JSON')
    .action((scanArguments: string[], flags: { yKind?: string; json?: boolean }) => {
      const yKind = yKindOption(flags.yKind);
      const descriptions: ScanDescription[] = [];
      const failures: { scan: string; error: string }[] = [];
      for (const scan of expandScanArguments(scanArguments)) {
        try {
          descriptions.push(describeScan(scan, readScan(scan, yKind === undefined ? {} : { yKind })));
        } catch (error) {
          if (!(error instanceof BandwrightError)) throw error;
          failures.push({ scan, error: error.describe(CLI_PARAMETER_NAMES) });
        }
      }
      if (flags.json) context.stdout.write(`${JSON.stringify({ scans: descriptions, failures }, null, 2)}\n`);
      else if (descriptions.length > 0) context.stdout.write(`${formatScanDescriptions(descriptions)}\n`);
      for (const failure of failures) note(context, `bandwright: ${failure.error}`);
      if (failures.length > 0) raiseStatus(context, 1);
    });
}
