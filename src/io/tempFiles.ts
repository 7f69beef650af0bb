/**
 * Registry of temporary files (and staging folders) that are being written. An interrupt handler (installed by the
 * CLI, see `removeTempFilesOnSignals`) calls `cleanupTempFiles()` so that Ctrl-C leaves no partial
 * output behind. The library itself installs no handler unless asked.
 */
import { rmSync } from 'node:fs';

const inFlight = new Set<string>();

export function registerTempFile(path: string): void {
  inFlight.add(path);
}

export function unregisterTempFile(path: string): void {
  inFlight.delete(path);
}

/** Paths of temp files currently being written (a copy). */
export function pendingTempFiles(): string[] {
  return [...inFlight];
}

/** Removes every registered temp file (synchronously, safe inside a signal handler). Returns how many were removed. */
export function cleanupTempFiles(): number {
  let removed = 0;
  for (const path of inFlight) {
    // A file, or a staging folder of a set being written (./writeOutputSet.ts). An image encoder
    // running on a libuv thread may create a file in the folder while it is being emptied (the
    // folder's removal then fails with ENOTEMPTY): try again until it is gone.
    for (let attempt = 0; attempt < 20; attempt++) {
      try {
        rmSync(path, { recursive: true, maxRetries: 3, retryDelay: 5 });
        removed++;
        break;
      } catch (error) {
        // Already gone (renamed into place or removed): nothing to do.
        if ((error as NodeJS.ErrnoException).code === 'ENOENT') break;
      }
    }
    inFlight.delete(path);
  }
  return removed;
}

let installed = false;

/**
 * Installs SIGINT/SIGTERM handlers that remove in-flight temp files and then exit with the
 * conventional status 128 + signal number (130 for SIGINT, 143 for SIGTERM; common practice),
 * unless another handler for the signal is installed (it then decides). Idempotent.
 */
export function removeTempFilesOnSignals(): void {
  if (installed) return;
  installed = true;
  const handler = (signal: NodeJS.Signals): void => {
    cleanupTempFiles();
    // A command with its own handler (e.g. series, which stops its workers first) exits itself.
    if (process.listeners(signal).some((listener) => listener !== handler)) return;
    process.exit(signal === 'SIGINT' ? 130 : 143);
  };
  process.once('SIGINT', handler);
  process.once('SIGTERM', handler);
}
