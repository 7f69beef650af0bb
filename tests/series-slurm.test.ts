// The README's Slurm recipe, run as written on a one-node Slurm cluster brought up on this machine
// by scripts/slurm-local.sh (Debian's slurmctld, slurmd, slurm-client and munge packages; no
// systemd, no cgroups). A 4-task job array with `--shard auto` and an `afterany` aggregation must
// give the series.csv of one run on one machine, byte for byte. Frames: the first 8 of the bundled
// demo (invented data, fixtures/demo/README.md). Skipped, with the reason printed, only where the
// cluster cannot be brought up (no root, no apt-get, daemons refused).
import { spawnSync } from 'node:child_process';
import { chmodSync, copyFileSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

const root = new URL('..', import.meta.url).pathname;
const up = spawnSync('sh', [join(root, 'scripts', 'slurm-local.sh'), 'up'], { encoding: 'utf8', timeout: 300_000 });
const reason = up.status === 0 ? null : (up.stderr.trim() || up.error?.message || `slurm-local.sh exited ${up.status}`);
if (reason) console.warn(`series-slurm test skipped: ${reason}`);

/** The fenced code blocks of the README's cluster paragraph, in order. */
function readmeRecipe(): { arrayScript: string; submit: string } {
  const readme = readFileSync(join(root, 'README.md'), 'utf8');
  const from = readme.indexOf('**On a cluster (Slurm job array).**');
  const blocks = [...readme.slice(from).matchAll(/```bash\n([\s\S]*?)```/g)].map((m) => m[1]);
  return { arrayScript: blocks[0], submit: blocks[1] };
}

describe.skipIf(reason !== null)('the README\'s Slurm job-array recipe on a one-node cluster', () => {
  it('four array tasks with --shard auto and the afterany aggregation give one machine\'s series.csv byte for byte', () => {
    const dir = mkdtempSync(join(tmpdir(), 'lamella-slurm-'));
    mkdirSync(join(dir, 'frames'));
    for (let k = 1; k <= 8; k++) copyFileSync(join(root, 'fixtures', 'demo', `film_00${k}.jpg`), join(dir, 'frames', `film_00${k}.jpg`));
    // `lamella` as a user has it on the PATH (npm link / npm install -g).
    mkdirSync(join(dir, 'bin'));
    writeFileSync(join(dir, 'bin', 'lamella'), `#!/bin/sh\nexec "${process.execPath}" "${join(root, 'bin', 'lamella.js')}" "$@"\n`);
    chmodSync(join(dir, 'bin', 'lamella'), 0o755);
    const env = { ...process.env, PATH: `${join(dir, 'bin')}:${process.env.PATH}` };
    const { arrayScript, submit } = readmeRecipe();
    expect(arrayScript).toContain('--shard auto');
    writeFileSync(join(dir, 'series-array.sh'), arrayScript);
    const submitted = spawnSync('bash', ['-euo', 'pipefail', '-c', `${submit}\necho "array $jid"`], { cwd: dir, env, encoding: 'utf8' });
    expect(submitted.status, submitted.stderr).toBe(0);
    const ids = submitted.stdout.trim().split(/\s+/).filter((w) => /^\d+$/.test(w));
    expect(ids.length).toBeGreaterThanOrEqual(2);
    // Wait for the array and the aggregation to leave the queue.
    const deadline = Date.now() + 600_000;
    for (;;) {
      const queue = spawnSync('squeue', ['-h', '-o', '%i %T', '-j', ids.join(',')], { encoding: 'utf8' });
      if (queue.stdout.trim() === '' || Date.now() > deadline) break;
      spawnSync('sleep', ['1']);
    }
    const aggregateId = ids[0];
    const job = spawnSync('scontrol', ['show', 'job', aggregateId], { encoding: 'utf8' }).stdout;
    expect(job).toContain('JobState=COMPLETED');
    expect(job).toMatch(/ExitCode=0:0/);
    const single = spawnSync('lamella', ['series', 'frames/', '--stack', 'soap-film', '--fps', '50', '--thin-below', '30', '--chunk-frames', '2', '--workers', '2', '--quiet', '--no-report', '--out', 'single/'], { cwd: dir, env, encoding: 'utf8' });
    expect(single.status, single.stderr).toBe(0);
    expect(readFileSync(join(dir, 'results', 'series.csv'), 'utf8')).toBe(readFileSync(join(dir, 'single', 'series.csv'), 'utf8'));
  }, 900_000);
});
