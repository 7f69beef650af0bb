/**
 * Error classes that carry Lamella's documented exit statuses, and the pure function that maps
 * any thrown value to a status; a small core module every layer may import. Exit statuses (README, "Exit statuses"):
 *   0 ok · 1 a finding the user asked to be told about (e.g. a thin region under a spec)
 *   2 usage error (bad option, unknown name) · 3 a failed input (unreadable or invalid file).
 */

export const EXIT_OK = 0;
export const EXIT_FINDING = 1;
export const EXIT_USAGE = 2;
export const EXIT_INPUT = 3;

/** A bad option value or unknown name: exit status 2. */
export class UsageError extends Error {
  override readonly name = 'UsageError';
}

/** A file that cannot be read, parsed or used: exit status 3. The message names the file. */
export class InputError extends Error {
  override readonly name = 'InputError';
  constructor(
    readonly file: string,
    message: string,
  ) {
    super(`${file}: ${message}`);
  }
}

/** Exit status for an error thrown out of a command. */
export function exitCodeFor(error: unknown): number {
  if (error instanceof UsageError) return EXIT_USAGE;
  if (error instanceof InputError) return EXIT_INPUT;
  // Library validation throws RangeError / TypeError for option values the user gave.
  if (error instanceof RangeError || error instanceof TypeError) return EXIT_USAGE;
  return EXIT_INPUT;
}

/** One-line message for an error (no stack trace). */
export function oneLine(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  return text.replace(/\s*\n\s*/g, ' ').trim();
}
