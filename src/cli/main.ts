/**
 * CLI entry: builds the commander program from the command modules, runs it, and turns any
 * error into one line on stderr and a documented exit status (see ./errors.ts).
 */
import { Command, CommanderError } from 'commander';
import { commandModules } from './commands/index.js';
import { EXIT_OK, EXIT_USAGE, exitCodeFor, oneLine } from './errors.js';
import { removeTempFilesOnSignals } from '../io/tempFiles.js';
import { LAMELLA_VERSION } from '../version.js';

/**
 * The program with every command, or only with `only` (a command's name): loading a command's
 * module loads all it needs, and loading all eight cost about 0.1 s of CPU more than loading the
 * one that runs (measured 2026-12-05).
 */
export async function buildProgram(only: string | null = null): Promise<Command> {
  const program = new Command();
  program
    .name('lamella')
    .description(
      'Thickness maps of thin transparent films (soap films, oxide and nitride layers, coatings) from colour photographs of their interference colours.',
    )
    .version(LAMELLA_VERSION, '-V, --version', 'print the Lamella version')
    .option('--debug', 'show stack traces on errors')
    .exitOverride()
    // Parse errors (unknown option, missing argument, bad choice) as one line like every other error.
    .configureOutput({ outputError: (text, write) => write(`lamella: ${oneLine(text.replace(/^error: /, ''))} (run with --help for usage)\n`) });
  for (const { name, load } of commandModules) {
    if (only !== null && name !== only) continue;
    const mod = await load();
    mod.register(program);
  }
  for (const sub of program.commands) sub.exitOverride();
  return program;
}

/**
 * The command a full argv runs, when it names one of ours (the first argument that is not an
 * option; the program's own options take no value); null otherwise (no command, help, or an
 * unknown name, whose error suggests the nearest command from all of them).
 */
function commandNamed(argv: readonly string[]): string | null {
  const first = argv.slice(2).find((a) => !a.startsWith('-'));
  return first !== undefined && commandModules.some((c) => c.name === first) ? first : null;
}

/** Runs the CLI with a full argv (`process.argv`) and returns the exit status. */
export async function run(argv: readonly string[]): Promise<number> {
  const debug = argv.includes('--debug');
  // Ctrl-C / SIGTERM: remove half-written temp files, so no partial output is left behind.
  removeTempFilesOnSignals();
  // `lamella --version` alone needs no command module (loading all eight, the image codec with
  // them, took about 0.3 s of the 0.45 s it cost).
  const args = argv.slice(2);
  if (args.length === 1 && (args[0] === '--version' || args[0] === '-V')) {
    process.stdout.write(`${LAMELLA_VERSION}\n`);
    return EXIT_OK;
  }
  let program: Command;
  try {
    program = await buildProgram(commandNamed(argv));
    await program.parseAsync([...argv]);
    return typeof process.exitCode === 'number' ? process.exitCode : EXIT_OK;
  } catch (error) {
    if (error instanceof CommanderError) {
      // Help and version requests end with code 0; commander has printed the reason otherwise.
      if (error.exitCode === 0 || error.code === 'commander.helpDisplayed' || error.code === 'commander.version') return EXIT_OK;
      return EXIT_USAGE;
    }
    process.stderr.write(`lamella: ${oneLine(error)}\n`);
    if (debug && error instanceof Error && error.stack) process.stderr.write(`${error.stack}\n`);
    return exitCodeFor(error);
  }
}
