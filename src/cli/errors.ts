/** The error classes and exit statuses live in the core (../errors.ts); the CLI uses them from here too. */
export { EXIT_OK, EXIT_FINDING, EXIT_USAGE, EXIT_INPUT, UsageError, InputError, exitCodeFor, oneLine } from '../errors.js';
