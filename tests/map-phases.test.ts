// `lamella map` shows the stage each photo is in on a terminal, and nothing on a pipe or with
// --quiet (our own rule, README "map"). The terminal is a pseudo-terminal from util-linux's
// `script` (common practice for testing terminal output); the photo is the bench's invented
// draining soap film in its frame (bench/field-scenes.js).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { soapFilmInFrame } from '../bench/field-scenes.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-phases-'));
const hasScript = spawnSync('script', ['--version'], { encoding: 'utf8' }).status === 0;
const args = ['map', 'film.jpg', '--stack', 'soap-film', '--light', 'D65', '--no-report'];

beforeAll(async () => {
  writeFileSync(join(dir, 'film.jpg'), (await soapFilmInFrame()).photo);
}, 60_000);

function shellQuote(s: string): string {
  return `'${s.replace(/'/g, "'\\''")}'`;
}

describe('map: the stages on a terminal', () => {
  it.skipIf(!hasScript)('a terminal sees each stage on one line rewritten in place, cleared before the summary', () => {
    const command = [process.execPath, join(root, 'bin', 'lamella.js'), ...args, '--out', 'tty'].map(shellQuote).join(' ');
    const r = spawnSync('script', ['-qec', command, '/dev/null'], { encoding: 'utf8', cwd: dir });
    expect(r.status, r.stderr).toBe(0);
    for (const words of ['reading the photo', 'fitting exposure, white balance and flare', 'resolving the interference orders', 'matching every pixel', 'writing the outputs']) {
      expect(r.stdout).toContain(`lamella: film.jpg: ${words}…`);
    }
    // The last stage is erased (carriage return, erase to end of line) before the summary line.
    expect(r.stdout).toMatch(/\r\x1b\[Kfilm\.jpg: median \d/);
  }, 120_000);

  it('a pipe, or --quiet, sees no stages', () => {
    const piped = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args, '--out', 'pipe'], { encoding: 'utf8', cwd: dir });
    expect(piped.status, piped.stderr).toBe(0);
    expect(piped.stderr).not.toContain('matching every pixel');
    expect(piped.stdout).toMatch(/^film\.jpg: median \d/);
  }, 120_000);

  it.skipIf(!hasScript)('--quiet on a terminal sees nothing', () => {
    const command = [process.execPath, join(root, 'bin', 'lamella.js'), ...args, '--quiet', '--out', 'quiet'].map(shellQuote).join(' ');
    const r = spawnSync('script', ['-qec', command, '/dev/null'], { encoding: 'utf8', cwd: dir });
    expect(r.status).toBe(0);
    expect(r.stdout).not.toContain('matching every pixel');
  }, 120_000);
});
