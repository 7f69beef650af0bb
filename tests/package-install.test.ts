/**
 * The package as a user gets it: `npm pack` (dist/ must be built; `npm test` builds first), then
 * the tarball installed into a fresh folder and used from there, as by someone who never saw the
 * repository.
 *
 * Offline install: `npm install <tarball> --offline` cannot work from the npm cache alone, because
 * resolving the dependencies needs each package's registry metadata, which `npm ci` never caches
 * (it installs from the lock file's tarball URLs). So the fresh folder gets a lock file made from
 * ours: the tarball, plus every non-development package of our package-lock.json with its exact
 * version, URL and integrity. `npm ci --offline` then installs exactly what a user's `npm install`
 * would resolve today, from the cache the project's own `npm ci` filled, with no network.
 * Install scripts are skipped (`--ignore-scripts`): only the optional ffmpeg helper has one.
 *
 * The library check is the quarter-wave film: a film of index n = 1.4 in air, n·d = λ/4 at
 * λ = 550 nm, reflects R = 4r²/(1 + r²)² with r = (n − 1)/(n + 1), i.e. 144/1369 = 0.10519 at
 * normal incidence (Born & Wolf, Principles of Optics, 7th ed. 1999, §7.6.1, the maximum of the
 * single-film reflectivity; from memory). Air in the preset is the dispersive Ciddor air
 * (n ≈ 1.0003), hence the tolerance of 1e-3.
 */
import { spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';

const root = new URL('..', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-pack-'));
const app = join(dir, 'app');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function run(command: string, args: string[], cwd: string): { status: number | null; stdout: string; stderr: string } {
  const result = spawnSync(command, args, { cwd, encoding: 'utf8', env: { ...process.env, npm_config_update_notifier: 'false' } });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

interface LockEntry {
  readonly version?: string;
  readonly dev?: boolean;
  readonly link?: boolean;
  readonly [key: string]: unknown;
}

let files: string[] = [];
let tarball = '';

beforeAll(() => {
  const packed = run('npm', ['pack', '--json', '--pack-destination', dir], root);
  if (packed.status !== 0) throw new Error(`npm pack failed: ${packed.stderr}`);
  const [info] = JSON.parse(packed.stdout) as Array<{ filename: string; files: Array<{ path: string }> }>;
  files = info.files.map((f) => f.path);
  tarball = join(dir, info.filename);
  const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as Record<string, unknown>;
  const lock = JSON.parse(readFileSync(join(root, 'package-lock.json'), 'utf8')) as { packages: Record<string, LockEntry> };
  const spec = `file:../${info.filename}`;
  const self = lock.packages[''];
  const packages: Record<string, unknown> = {
    '': { name: 'lamella-install-check', version: '1.0.0', dependencies: { lamella: spec } },
    'node_modules/lamella': {
      version: pkg.version, resolved: spec, license: pkg.license,
      integrity: `sha512-${createHash('sha512').update(readFileSync(tarball)).digest('base64')}`,
      ...Object.fromEntries(['dependencies', 'optionalDependencies', 'bin', 'engines'].filter((k) => k in self).map((k) => [k, self[k]])),
    },
  };
  for (const [path, entry] of Object.entries(lock.packages)) if (path !== '' && !entry.dev && !entry.link) packages[path] = entry;
  mkdirSync(app);
  writeFileSync(join(app, 'package.json'), JSON.stringify({ name: 'lamella-install-check', version: '1.0.0', private: true, type: 'module', dependencies: { lamella: spec } }));
  writeFileSync(join(app, 'package-lock.json'), JSON.stringify({ name: 'lamella-install-check', version: '1.0.0', lockfileVersion: 3, requires: true, packages }));
  const installed = run('npm', ['ci', '--offline', '--ignore-scripts', '--no-audit', '--no-fund'], app);
  if (installed.status !== 0) throw new Error(`npm ci --offline failed (is the npm cache filled by the project's own npm ci?): ${installed.stderr}`);
}, 120_000);

describe('npm pack: what the tarball holds', () => {
  it('dist (code and type declarations, no source maps), schemas, the data read at run time, LICENSE and README; no sources, tests or test tables', () => {
    expect(files).toContain('LICENSE');
    expect(files).toContain('README.md');
    expect(files).toContain('bin/lamella.js');
    expect(files).toContain('dist/index.js');
    expect(files).toContain('dist/index.d.ts');
    for (const schema of ['map-record', 'series-frame', 'series', 'calibration', 'spectrum', 'chart', 'flow', 'flow-pair']) expect(files).toContain(`schemas/${schema}.schema.json`);
    // Read at run time (src/colour/observers.ts, lights.ts, src/optics/materialLibrary.ts) with their licence notes.
    for (const data of ['shared/cie/cmf_cie1931_2deg.csv', 'shared/cie/illuminant_D65.csv', 'shared/cie/SOURCES.md', 'shared/materials/water_daimon2007_20C.json', 'shared/materials/SOURCES.md', 'shared/README.md']) {
      expect(files).toContain(data);
    }
    expect(files.filter((f) => f.endsWith('.map'))).toEqual([]);
    expect(files.filter((f) => /^(src|tests|bench|fixtures|scripts|shared\/refdata)\//.test(f))).toEqual([]);
    expect(files).not.toContain('shared/cie/ciede2000_sharma2005.csv');
    // Every file the material library names is shipped.
    const shipped = new Set(files);
    const library = readFileSync(join(root, 'src', 'optics', 'materialLibrary.ts'), 'utf8');
    const named = [...library.matchAll(/'([\w.-]+\.(?:json|csv))'/g)].map((m) => m[1]);
    expect(named.length).toBeGreaterThanOrEqual(10);
    for (const name of named) expect(shipped.has(`shared/materials/${name}`), name).toBe(true);
  });

  it('LICENSE is MIT with the project copyright; color-convert is a development dependency only', () => {
    expect(readFileSync(join(root, 'LICENSE'), 'utf8')).toMatch(/^MIT License\n\nCopyright \(c\) 2026 the Lamella authors\n/);
    const pkg = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { dependencies: Record<string, string>; devDependencies: Record<string, string>; scripts: Record<string, string> };
    expect(pkg.dependencies['color-convert']).toBeUndefined();
    expect(pkg.devDependencies['color-convert']).toBeDefined();
    expect(pkg.scripts.prepare).toBeUndefined();
  });
});

describe('the tarball installed into a fresh folder', () => {
  it('`npx lamella --version` prints the package version', () => {
    const version = (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { version: string }).version;
    const r = run('npx', ['--offline', '--no-install', 'lamella', '--version'], app);
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout.trim()).toBe(version);
    expect(existsSync(join(app, 'node_modules', 'lamella', 'src'))).toBe(false);
  });

  it('the CLI reads its shipped data: a chart from the CIE tables', () => {
    const r = run('npx', ['--offline', '--no-install', 'lamella', 'chart', '--stack', 'soap-film', '--light', 'D65', '--to', '4', '--format', 'json'], app);
    expect(r.status, r.stderr).toBe(0);
    expect((JSON.parse(r.stdout) as { rows: unknown[] }).rows).toHaveLength(5);
  });

  // The examples read the demo frames by a path relative to themselves (../fixtures/demo), so
  // they run unchanged from an examples/ folder beside a copy of those frames.
  it("the README's library examples (examples/*.mjs, word for word) run against the installed package", () => {
    const readme = readFileSync(join(root, 'README.md'), 'utf8');
    mkdirSync(join(app, 'examples'), { recursive: true });
    mkdirSync(join(app, 'fixtures', 'demo'), { recursive: true });
    for (const k of [1, 2, 3, 4, 5, 6, 8]) copyFileSync(join(root, 'fixtures', 'demo', `film_00${k}.jpg`), join(app, 'fixtures', 'demo', `film_00${k}.jpg`));
    for (const name of ['map-in-memory.mjs', 'oxide-chart.mjs', 'series-with-progress.mjs']) {
      const example = readFileSync(join(root, 'examples', name), 'utf8');
      expect(readme).toContain(example);
      writeFileSync(join(app, 'examples', name), example);
    }
    // The chart and the in-memory map print exactly what they print in the repository.
    for (const name of ['oxide-chart.mjs', 'map-in-memory.mjs']) {
      const installed = run(process.execPath, [join('examples', name)], app);
      expect(installed.status, installed.stderr).toBe(0);
      const inRepo = run(process.execPath, [join(root, 'examples', name)], root);
      expect(inRepo.status, inRepo.stderr).toBe(0);
      expect(installed.stdout).toBe(inRepo.stdout);
    }
    const series = run(process.execPath, [join('examples', 'series-with-progress.mjs')], app);
    expect(series.status, series.stderr).toBe(0);
    expect(series.stdout).toMatch(/frame 6\/6 \(0 failed\)/);
    expect(series.stdout).toMatch(/interrupted: false; outputs: .*series\.json/);
  }, 120_000);

  it('a library example imported from the package root: the quarter-wave film reflects 4r²/(1 + r²)² (Born & Wolf 1999, §7.6.1; from memory)', () => {
    writeFileSync(join(app, 'example.mjs'), [
      "import { resolveStack, stackSpectrum } from 'lamella';",
      "const stack = resolveStack('soap-film', { filmMaterial: 1.4 });",
      'const wavelengthNm = 550;',
      'const { reflectance } = stackSpectrum(stack, wavelengthNm / (4 * 1.4), Float64Array.of(wavelengthNm), 0, "mixed");',
      'console.log(JSON.stringify({ reflectance: reflectance[0] }));',
    ].join('\n'));
    const r = run(process.execPath, ['example.mjs'], app);
    expect(r.status, r.stderr).toBe(0);
    const r1 = (1.4 - 1) / (1.4 + 1);
    expect((JSON.parse(r.stdout) as { reflectance: number }).reflectance).toBeCloseTo((4 * r1 * r1) / (1 + r1 * r1) ** 2, 3);
    expect(readdirSync(join(app, 'node_modules', 'lamella')).sort()).toEqual(['LICENSE', 'README.md', 'bin', 'dist', 'package.json', 'schemas', 'shared']);
  });
});
