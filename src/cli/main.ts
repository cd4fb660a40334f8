/**
 * The bandwright command-line program: commander wiring, error reporting and exit statuses
 * (DESIGN §4: 0 success; 1 bad input or failed computation; 2 usage error; recheck and status
 * use 3 and 4).
 */
import { Command, CommanderError } from 'commander';
import { BandwrightError } from '../errors.js';
import { resourceLimits, resourceLimitsHelp } from '../resource-limits.js';
import { TOOL } from '../version.js';
import type { CommandContext, TextSink } from './context.js';
import { CLI_PARAMETER_NAMES } from './parameter-names.js';

/** Adds one command to the program. */
type Registration = (program: Command, context: CommandContext) => void;

/**
 * The commands in the order help lists them, each loaded only when needed: a run of one command
 * loads that command's modules and not the others' (plots, reports, the simulator …), which keeps
 * the start of every run short — it matters for batches of one scan started by a scheduler.
 */
const COMMANDS: Readonly<Record<string, () => Promise<Registration>>> = {
  calibrate: async () => (await import('./calibrate.js')).registerCalibrate,
  quantify: async () => (await import('./quantify.js')).registerQuantify,
  watch: async () => (await import('./watch.js')).registerWatch,
  inspect: async () => (await import('./inspect.js')).registerInspect,
  simulate: async () => (await import('./simulate.js')).registerSimulate,
  recheck: async () => (await import('./recheck.js')).registerRecheck,
  status: async () => (await import('./status.js')).registerStatus,
  verify: async () => (await import('./verify.js')).registerVerify,
  report: async () => (await import('./report.js')).registerReport,
  demo: async () => {
    const { registerDemo } = await import('./demo.js');
    return (program, context) => registerDemo(program, context, runCaptured);
  },
};

/**
 * Builds the program. Each command's action stores its exit status in the context.
 *
 * @param context - output streams and status
 * @param commandName - register only this command (the one the arguments name); all when omitted
 * @returns the program, ready to parse
 */
export async function buildProgram(context: CommandContext, commandName?: string): Promise<Command> {
  const program = new Command();
  program
    .name('bandwright')
    .description(
      'Gas-cell infrared quantification: calibrate from certified standards, ' +
        'quantify samples with prediction intervals, recheck drift.',
    )
    .version(TOOL.version, '-V, --version')
    .showHelpAfterError('(run with --help for usage)')
    .addHelpText('after', `\n${resourceLimitsHelp()}\n`)
    .configureOutput({ writeOut: (s) => context.stdout.write(s), writeErr: (s) => context.stderr.write(s) })
    .exitOverride();
  const names =
    commandName !== undefined && Object.hasOwn(COMMANDS, commandName) ? [commandName] : Object.keys(COMMANDS);
  const registrations = await Promise.all(
    names.map((name) => (COMMANDS[name] as () => Promise<Registration>)()),
  );
  for (const register of registrations) register(program, context);
  for (const command of program.commands)
    command.exitOverride().configureOutput({
      writeOut: (s) => context.stdout.write(s),
      writeErr: (s) => context.stderr.write(s),
    });
  return program;
}

/**
 * Runs one command line in a fresh program whose output is captured (used by `demo`).
 *
 * @param args - arguments after `bandwright`
 * @returns the exit status and what was printed
 */
export async function runCaptured(
  args: readonly string[],
): Promise<{ status: number; stdout: string; stderr: string }> {
  let stdout = '';
  let stderr = '';
  const status = await main(['node', 'bandwright', ...args], {
    stdout: { write: (text: string) => (stdout += text) },
    stderr: { write: (text: string) => (stderr += text) },
    interactive: false,
  });
  return { status, stdout, stderr };
}

/**
 * Runs the program on an argument vector.
 *
 * @param argv - full `process.argv` (node, script, arguments…)
 * @param streams - where to print (default: the process's stdout and stderr)
 * @returns the exit status
 */
export async function main(
  argv: readonly string[],
  streams: { stdout?: TextSink; stderr?: TextSink; interactive?: boolean } = {},
): Promise<number> {
  const context: CommandContext = {
    stdout: streams.stdout ?? process.stdout,
    stderr: streams.stderr ?? process.stderr,
    interactive: streams.interactive ?? process.stderr.isTTY === true,
    status: 0,
  };
  // argv[2] is the command when the line names one (`bandwright quantify …`); otherwise (help,
  // version, a mistyped command) every command is registered so commander can list or refuse them.
  const program = await buildProgram(context, argv[2]);
  try {
    // A mistyped limit variable is a usage error of every command, found before any file is read.
    resourceLimits();
    await program.parseAsync([...argv]);
    return context.status;
  } catch (error) {
    if (error instanceof CommanderError) {
      // Help and version end with exit code 0; everything else commander refuses is a usage error.
      return error.exitCode === 0 ? 0 : 2;
    }
    if (error instanceof BandwrightError) {
      context.stderr.write(`bandwright: ${error.describe(CLI_PARAMETER_NAMES)}\n`);
      return error.code === 'USAGE' ? 2 : 1;
    }
    context.stderr.write(
      `bandwright: internal error: ${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`,
    );
    return 1;
  }
}

/**
 * Runs the program as the process's command: exit status from {@link main}, and a reader that
 * closes the pipe early (`bandwright quantify … | head`) ends the program quietly instead of
 * with a stack trace.
 *
 * @param argv - `process.argv`
 */
export function runAsProcess(argv: readonly string[]): void {
  process.stdout.on('error', (error: NodeJS.ErrnoException) => {
    if (error.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw error;
  });
  void main(argv).then((status) => {
    process.exitCode = status;
  });
}

const invokedDirectly =
  process.argv[1] !== undefined && import.meta.url === new URL(`file://${process.argv[1]}`).href;
if (invokedDirectly) runAsProcess(process.argv);
