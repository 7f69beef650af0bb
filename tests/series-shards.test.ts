// Shards as schedulers hand them out: `--shard auto` from a Slurm job array's variables (task ids
// MIN, MIN+STEP, …; Slurm's sbatch documentation, "OUTPUT ENVIRONMENT VARIABLES": SLURM_ARRAY_TASK_ID,
// _MIN, _STEP, _COUNT — from memory) or a Kubernetes indexed Job (JOB_COMPLETION_INDEX from 0;
// Kubernetes documentation, "Indexed Job for Parallel Processing" — from memory); the frame
// counts and names below are of our own rules (shard and aggregation contract, common practice); more shards than chunks is a usage error;
// `--aggregate-only` with frames lacking a result exits 3 naming them. Frames: the first 4 of the
// bundled demo (invented data).
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { shardFromEnvironment } from '../src/cli/commands/series.js';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-shards-'));
mkdirSync(join(dir, 'frames'));
for (let k = 1; k <= 4; k++) copyFileSync(join(root, 'fixtures', 'demo', `film_00${k}.jpg`), join(dir, 'frames', `film_00${k}.jpg`));

function lamella(args: string[], env: Record<string, string> = {}): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'lamella.js'), ...args], { encoding: 'utf8', cwd: dir, env: { ...process.env, ...env } });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}
const common = ['series', 'frames', '--stack', 'soap-film', '--fps', '2', '--chunk-frames', '2', '--workers', '1', '--quiet', '--no-report'];

describe('--shard auto', () => {
  it('reads a Slurm array (1-based, 0-based, with a step) and a Kubernetes indexed Job', () => {
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '3', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_COUNT: '4' }, null)).toEqual({ index: 3, count: 4 });
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '0', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_COUNT: '2' }, null)).toEqual({ index: 1, count: 2 });
    expect(shardFromEnvironment({ SLURM_ARRAY_TASK_ID: '8', SLURM_ARRAY_TASK_MIN: '0', SLURM_ARRAY_TASK_STEP: '4', SLURM_ARRAY_TASK_COUNT: '4' }, null)).toEqual({ index: 3, count: 4 });
    expect(shardFromEnvironment({ JOB_COMPLETION_INDEX: '0' }, 3)).toEqual({ index: 1, count: 3 });
    expect(() => shardFromEnvironment({ JOB_COMPLETION_INDEX: '1' }, null)).toThrow(/--shard-count/);
    expect(() => shardFromEnvironment({}, null)).toThrow(/SLURM_ARRAY_TASK_ID and SLURM_ARRAY_TASK_COUNT/);
  });

  it('on the command line: auto from the environment maps its part; outside a scheduler it is exit 2', () => {
    const r = lamella([...common, '--shard', 'auto', '--out', 'auto'], { SLURM_ARRAY_TASK_ID: '2', SLURM_ARRAY_TASK_MIN: '1', SLURM_ARRAY_TASK_COUNT: '2' });
    expect(r.status, r.stderr).toBe(0);
    // Task 2 of 2 mapped the second chunk only.
    expect(spawnSync('ls', [join(dir, 'auto', 'frames')], { encoding: 'utf8' }).stdout).toMatch(/film_003\.json[\s\S]*film_004\.json/);
    expect(spawnSync('ls', [join(dir, 'auto', 'frames')], { encoding: 'utf8' }).stdout).not.toContain('film_001.json');
    const bare = lamella([...common, '--shard', 'auto', '--out', 'bare'], { SLURM_ARRAY_TASK_ID: '', SLURM_ARRAY_TASK_COUNT: '' });
    expect(bare.status).toBe(2);
    expect(bare.stderr).toContain('--shard auto needs');
  }, 120_000);
});

describe('shards and aggregation', () => {
  it('more shards than chunks is exit 2 naming the numbers', () => {
    const r = lamella([...common, '--shard', '1/3', '--out', 'many']);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('--shard 1/3: the series has only 2 chunk(s) of up to 2 frames; use at most 2 shards');
  });

  it('--aggregate-only with frames lacking a result: exit 3 naming them and how to map them; complete: exit 0', () => {
    expect(lamella([...common, '--shard', '1/2', '--out', 'agg']).status).toBe(0);
    const partial = lamella([...common, '--aggregate-only', '--out', 'agg']);
    expect(partial.status).toBe(3);
    expect(partial.stderr).toContain('2 of 4 frame(s) have no current result: film_003.jpg, film_004.jpg; rerun the shards that map them');
    expect(lamella([...common, '--shard', '2/2', '--out', 'agg']).status).toBe(0);
    expect(lamella([...common, '--aggregate-only', '--out', 'agg']).status).toBe(0);
  }, 180_000);
});
