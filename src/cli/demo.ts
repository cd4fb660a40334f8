/**
 * `bandwright demo`: the whole job on the bundled example data (examples/README.md), written
 * under one folder, with a short account of what was done and where it is.
 *
 * Each step runs the real command through the same program, so the demo shows exactly what a
 * user would get from typing the commands it lists.
 */
import { join, relative } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Command } from 'commander';
import { BandwrightError } from '../errors.js';
import { writeFileAtomic } from '../store/atomic-write.js';
import { isOccupied } from '../store/folders.js';
import { readCheckList } from '../store/check-list.js';
import { historyPathFor, moveHistoryAside } from '../store/history.js';
import { note, raiseStatus, type CommandContext } from './context.js';

/** The bundled examples folder, found from this file (works from src/ under tsx and from dist/). */
export function examplesFolder(): string {
  return fileURLToPath(new URL('../../examples/', import.meta.url));
}

interface DemoStep {
  /** What the step does, in words. */
  title: string;
  /** The command line, after `bandwright`. */
  args: string[];
  /** Write the command's standard output to this file (relative to the output folder). */
  stdoutFile?: string;
  /** Exit statuses that count as the step working as intended. */
  expected?: number[];
  /**
   * Print one line made from the command's standard output instead of the step's block (the title,
   * when not empty, is shown once).
   */
  line?: (stdout: string) => string;
  /** Creation time for a calibrate step, seconds since 1970 (as SOURCE_DATE_EPOCH). */
  createdAt?: string;
}

/** When the demo's lab calibration is dated: 2026-08-31T08:00:00Z, the day before its first weekly check. */
const LAB_CALIBRATION_DATE = String(Date.UTC(2026, 7, 31, 8) / 1000);

/** Runs `action` with SOURCE_DATE_EPOCH set (seconds), restoring the previous value after. */
async function withCreationTime<T>(epochSeconds: string | undefined, action: () => Promise<T>): Promise<T> {
  if (epochSeconds === undefined) return action();
  const previous = process.env.SOURCE_DATE_EPOCH;
  process.env.SOURCE_DATE_EPOCH = epochSeconds;
  try {
    return await action();
  } finally {
    if (previous === undefined) delete process.env.SOURCE_DATE_EPOCH;
    else process.env.SOURCE_DATE_EPOCH = previous;
  }
}

/** One line for a recheck from its `--json` output: date, recovery, verdict, rules fired. */
function recheckLine(stdout: string): string {
  const result = JSON.parse(stdout) as {
    time: string;
    recoveryPct: number | null;
    verdict: string;
    rules: { rule: string }[];
  };
  const recovery = result.recoveryPct === null ? 'zero gas' : `recovery ${result.recoveryPct.toFixed(2)} %`;
  const rules = result.rules.length > 0 ? ` (${result.rules.map((r) => r.rule).join(', ')})` : '';
  return `${result.time.slice(0, 10)}  ${recovery}  ${result.verdict}${rules}`;
}

/**
 * Registers `demo` on the program.
 *
 * @param program - the commander program
 * @param context - output and status
 * @param run - runs one command line in a fresh context and returns its status and output
 */
export function registerDemo(
  program: Command,
  context: CommandContext,
  run: (args: string[]) => Promise<{ status: number; stdout: string; stderr: string }>,
): void {
  program
    .command('demo')
    .description(
      'run the whole job on the bundled example data: calibrate, quantify, and more as it is built',
    )
    .option('--out <dir>', 'folder for everything the demo writes', 'bandwright-demo')
    .option('--force', 'use the folder even if it is not empty (files the demo writes are replaced)')
    .action(async (flags: { out: string; force?: boolean }) => {
      const out = flags.out;
      if (isOccupied(out) && !flags.force) {
        throw new BandwrightError(
          'FILE_EXISTS',
          `${out} exists and is not empty; choose another --out or add --force`,
          { parameter: '--out' },
        );
      }
      const examples = relative(process.cwd(), examplesFolder()) || '.';
      const lab = join(examples, 'lab-co');
      const at = (name: string): string => join(out, name);
      const force = flags.force ? ['--force'] : [];
      const steps: DemoStep[] = [
        {
          title:
            'Calibrate CO from 14 standards (zero gas and six levels in duplicate), second-order band-area curve',
          args: [
            'calibrate',
            join(lab, 'standards.csv'),
            '--method',
            join(lab, 'method.json'),
            '-o',
            at('lab-co.calibration.json'),
            ...force,
          ],
          stdoutFile: 'lab-co.calibration.txt',
          // Dated the day before the first weekly check, as it would have been built.
          createdAt: LAB_CALIBRATION_DATE,
        },
        {
          title: 'Quantify five samples with 95 % prediction intervals (table, CSV and JSON)',
          args: [
            'quantify',
            at('lab-co.calibration.json'),
            join(lab, 'samples'),
            '--csv',
            at('lab-co.results.csv'),
            ...force,
          ],
          stdoutFile: 'lab-co.results.txt',
        },
        {
          title: 'The same results as JSON for scripts',
          args: ['quantify', at('lab-co.calibration.json'), join(lab, 'samples'), '--json', '--mg-m3'],
          stdoutFile: 'lab-co.results.json',
        },
      ];
      // Twelve weekly checks of the 100 ppm standard, recorded in order with the time each was measured.
      const checks = readCheckList(join(lab, 'checks.csv'));
      checks.forEach((check, k) => {
        steps.push({
          title:
            k === 0
              ? `Recheck the ${checks.length} weekly check-standard scans in order ` +
                '(--at the time each was measured): recovery, control rules, trend'
              : '',
          args: [
            'recheck',
            at('lab-co.calibration.json'),
            check.scan,
            '--certified',
            String(check.certified),
            '--unit',
            check.unit,
            '--at',
            check.measuredAt,
            '--json',
          ],
          expected: [0, 3, 4],
          line: recheckLine,
        });
      });
      steps.push({
        title: 'Status of the calibrations three days after the last check (exit status 4: failed)',
        args: ['status', out, '--now', '2026-11-20T12:00:00Z'],
        stdoutFile: 'status.txt',
        expected: [0, 3, 4],
      });
      steps.push({
        title:
          'Write the calibration report: one self-contained HTML page with statistics, limits, plots, ' +
          'the recheck history, provenance and cautions',
        args: ['report', at('lab-co.calibration.json'), '-o', at('lab-co.report.html'), ...force],
      });
      const stack = join(examples, 'stack-mixture');
      steps.push(
        {
          title:
            'Calibrate the stack method by classical least squares: CO and N2O under CO2 and water vapour, ' +
            '26 standards, second-order terms for the saturating CO, N2O and water lines',
          args: [
            'calibrate',
            join(stack, 'standards.csv'),
            '--method',
            join(stack, 'method.json'),
            '-o',
            at('stack-k2.calibration.json'),
            ...force,
          ],
          stdoutFile: 'stack-k2.calibration.txt',
        },
        {
          title:
            'Quantify the six stack samples on a dry basis (water from the same scan) and in mg/m³ ' +
            'at 273.15 K and 101.325 kPa; the sample taken during a water-spray upset is flagged poor-fit',
          args: [
            'quantify',
            at('stack-k2.calibration.json'),
            join(stack, 'samples'),
            '--dry',
            '--mg-m3',
            '--csv',
            at('stack-k2.results.csv'),
            ...force,
          ],
          stdoutFile: 'stack-k2.results.txt',
        },
      );
      // A rebuilt calibration starts a new history; keep the old one beside it.
      if (flags.force) moveHistoryAside(historyPathFor(at('lab-co.calibration.json')));
      note(context, `bandwright demo: the example scenario is described in ${join(examples, 'README.md')}`);
      let number = 0;
      for (const step of steps) {
        const result = await withCreationTime(step.createdAt, () => run(step.args));
        const ok = (step.expected ?? [0]).includes(result.status);
        if (step.stdoutFile !== undefined)
          writeFileAtomic(at(step.stdoutFile), result.stdout, { overwrite: true, createFolder: true });
        if (ok && step.line !== undefined) {
          if (step.title !== '')
            note(context, `\n${++number}. ${step.title}\n   $ bandwright ${step.args.join(' ')}`);
          note(context, `   ${step.line(result.stdout)}`);
          continue;
        }
        note(
          context,
          `\n${step.title === '' ? number : ++number}. ${step.title || step.args.slice(0, 3).join(' ')}` +
            `\n   $ bandwright ${step.args.join(' ')}` +
            `${step.stdoutFile === undefined ? '' : `\n   → ${at(step.stdoutFile)}`}` +
            `${ok ? '' : `\n   ! exit status ${result.status}:\n${result.stderr}`}`,
        );
        if (!ok) {
          raiseStatus(context, 1);
          note(context, 'the demo stops here; the message above says why');
          return;
        }
        if ((step.args[0] === 'quantify' || step.args[0] === 'status') && step.stdoutFile?.endsWith('.txt'))
          context.stdout.write(`${result.stdout}\n`);
      }
      note(
        context,
        `\nEverything is in ${out}/. Each step above is an ordinary bandwright command you can run yourself.`,
      );
    });
}
