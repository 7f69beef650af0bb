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
 * The program with every command (`only` null), or only with the commands `only` names (a name
 * or a list; an empty list: none, for `--version`): loading a command's module loads all it
 * needs, and loading all eight cost about 0.1 s of CPU more than loading the one that runs, and
 * about 0.3 s more than loading none (measured 2026-12-05).
 */
export async function buildProgram(only: string | readonly string[] | null = null): Promise<Command> {
  const wanted = only === null ? null : typeof only === 'string' ? [only] : only;
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
    if (wanted !== null && !wanted.includes(name)) continue;
    const mod = await load();
    mod.register(program);
  }
  for (const sub of program.commands) sub.exitOverride();
  return program;
}

/**
 * The commands a full argv needs loaded: the one it runs, when it names one of ours (the first
 * argument that is not an option; the program's own options take no value); none for a version
 * request without a command or help; null (all) otherwise (no command, help, or an unknown name,
 * whose error suggests the nearest command from all of them).
 */
function commandsNeeded(argv: readonly string[]): readonly string[] | null {
  const args = argv.slice(2);
  const first = args.find((a) => !a.startsWith('-'));
  if (first !== undefined) return commandModules.some((c) => c.name === first) ? [first] : null;
  const asks = (...flags: string[]): boolean => args.some((a) => flags.includes(a));
  return asks('--version', '-V') && !asks('--help', '-h') ? [] : null;
}

/** Runs the CLI with a full argv (`process.argv`) and returns the exit status. */
export async function run(argv: readonly string[]): Promise<number> {
  const debug = argv.includes('--debug');
  // Ctrl-C / SIGTERM: remove half-written temp files, so no partial output is left behind.
  removeTempFilesOnSignals();
  let program: Command;
  try {
    program = await buildProgram(commandsNeeded(argv));
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
