/**
 * `lamella --version` (and `-V`) print the package's version and exit 0, with no command module
 * loaded, another program option beside it or not.
 * The version is our own (package.json); common practice for CLIs.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';

const CLI = fileURLToPath(new URL('../bin/lamella.js', import.meta.url));
const VERSION = (JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { version: string }).version;

describe('lamella --version', () => {
  for (const args of [['--version'], ['-V'], ['--debug', '--version']]) {
    it(`${args.join(' ')} prints ${VERSION} and exits 0`, () => {
      const r = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8' });
      expect(r.status).toBe(0);
      expect(r.stdout).toBe(`${VERSION}\n`);
      expect(r.stderr).toBe('');
    });
  }
});
