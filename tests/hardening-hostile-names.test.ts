/**
 * Hostile names and files: links on the multi-photo index page are relative, percent-encoded
 * paths that no file name can turn into a script or a fragment; CSV text cells a spreadsheet
 * would run as formulas are neutralised with a leading apostrophe (common practice: OWASP, "CSV
 * Injection"); a FIFO given as any file option is refused at once instead of hanging the run;
 * errors name the file and the problem but never echo the file's text.
 *
 * Photos: the bundled demo frames (`fixtures/demo`, INVENTED, rendered by our own forward model).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { csvText } from '../src/io/csvCell.js';
import { formatSeriesCsv } from '../src/series/seriesCsv.js';
import { folderIndexPage, readFolderRecords } from '../src/inspect/folderSummary.js';

const bin = new URL('../bin/lamella.js', import.meta.url).pathname;
const demo = new URL('../fixtures/demo/', import.meta.url).pathname;
const dir = mkdtempSync(join(tmpdir(), 'lamella-hostile-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const cli = (cwd: string, ...args: string[]) => spawnSync(process.execPath, [bin, ...args], { cwd, encoding: 'utf8', timeout: 60_000 });

describe('index page links', () => {
  it('are ./-relative and percent-encoded: no scheme, fragment or query can come from a name', () => {
    // The index is rebuilt from the map records in the folder (src/inspect/folderSummary.ts).
    const folder = join(dir, 'index-links');
    mkdirSync(folder, { recursive: true });
    for (const stem of ['javascript:alert(5)', 'run#3', 'a?b c"<x>']) {
      writeFileSync(join(folder, `${stem}.json`), JSON.stringify({ lamella_map_record: 1, photo: `${stem}.jpg`, statistics: {}, film_area: { found: true }, warnings: [] }));
      writeFileSync(join(folder, `${stem}.report.html`), '<!doctype html>');
    }
    const html = folderIndexPage(folder, readFolderRecords(folder));
    const hrefs = [...html.matchAll(/href="([^"]*)"/g)].map((m) => m[1]).filter((h) => h.endsWith('.report.html'));
    expect(hrefs).toEqual(['./a%3Fb%20c%22%3Cx%3E.report.html', './javascript%3Aalert(5).report.html', './run%233.report.html']);
    // Resolved against the page, each link stays the file it names (WHATWG URL parser).
    const page = 'file:///out/report.html';
    expect(decodeURIComponent(new URL(hrefs[1], page).pathname)).toBe('/out/javascript:alert(5).report.html');
    expect(new URL(hrefs[2], page).hash).toBe('');
    expect(new URL(hrefs[0], page).search).toBe('');
  });

  it('a real multi-photo run with such names writes working links', () => {
    const cwd = join(dir, 'names');
    mkdirSync(cwd, { recursive: true });
    copyFileSync(join(demo, 'film_001.jpg'), join(cwd, 'javascript:alert(5).jpg'));
    copyFileSync(join(demo, 'film_002.jpg'), join(cwd, 'run#3.jpg'));
    const r = cli(cwd, 'map', 'javascript:alert(5).jpg', 'run#3.jpg', '--stack', 'soap-film', '--quiet', '--out', 'out');
    expect(r.status, r.stderr).toBe(0);
    const html = readFileSync(join(cwd, 'out', 'report.html'), 'utf8');
    expect(html).toContain('href="./javascript%3Aalert(5).report.html"');
    expect(html).toContain('href="./run%233.report.html"');
    expect(html).not.toMatch(/href="javascript:/);
  }, 60_000);
});

describe('CSV text cells', () => {
  it.each([
    ['=HYPERLINK("x")', `"'=HYPERLINK(""x"")"`],
    ['+1.jpg', "'+1.jpg"],
    ['-2.jpg', "'-2.jpg"],
    ['@SUM(A1).jpg', "'@SUM(A1).jpg"],
    ['\tfoo.jpg', "'\tfoo.jpg"],
    ['plain,name.jpg', '"plain,name.jpg"'],
    ['film_001.jpg', 'film_001.jpg'],
  ])('%j is written as %j', (text, cell) => {
    expect(csvText(text)).toBe(cell);
  });

  it('series.csv neutralises a frame named like a formula, and keeps numbers (which may start with -) as they are', () => {
    const row = { frame: '=cmd|x.jpg', timeS: 0, meanNm: -1.5, medianNm: null, minNm: null, maxNm: null, stdNm: null, thinFraction: null, thinRegions: 0, coverage: 0, exposure: null, darkLimitNm: null };
    const text = formatSeriesCsv([row as Parameters<typeof formatSeriesCsv>[0][number]]);
    expect(text.split('\n')[1]).toMatch(/^'=cmd\|x\.jpg,0\.000,-1\.50,/);
  });
});

describe('a FIFO as any file option is refused at once (no hang), naming the option\'s file', () => {
  const cwd = join(dir, 'fifo');
  mkdirSync(cwd, { recursive: true });
  copyFileSync(join(demo, 'film_001.jpg'), join(cwd, 'p.jpg'));
  const made = spawnSync('mkfifo', [join(cwd, 'pipe.json'), join(cwd, 'pipe.csv')]).status === 0;
  writeFileSync(join(cwd, 'uses-pipe.json'), JSON.stringify({ name: 'lab film', ambient: 'air', layers: [{ material: 'pipe.csv', thicknessNm: 'film' }], substrate: 'air' }));

  it.skipIf(!made).each([
    ['--stack', ['map', 'p.jpg', '--stack', 'pipe.json', '--out', 'o'], 'lamella: pipe.json: is a named pipe (FIFO), expected a regular file'],
    ['--calibration', ['map', 'p.jpg', '--stack', 'soap-film', '--calibration', 'pipe.json', '--out', 'o'], 'lamella: pipe.json: cannot read calibration file: it is a named pipe (FIFO), expected a regular file'],
    ['--light', ['map', 'p.jpg', '--stack', 'soap-film', '--light', 'pipe.csv', '--out', 'o'], 'lamella: pipe.csv: is a named pipe (FIFO), expected a regular file'],
    ['--film-index', ['map', 'p.jpg', '--stack', 'soap-film', '--film-index', 'pipe.csv', '--out', 'o'], 'lamella: pipe.csv: is a named pipe (FIFO), expected a regular file'],
    ['a material file of the stack', ['map', 'p.jpg', '--stack', 'uses-pipe.json', '--out', 'o'], `lamella: ${join(cwd, 'pipe.csv')}: is a named pipe (FIFO), expected a regular file (referred to by uses-pipe.json, layers[0].material)`],
    ['--mask', ['map', 'p.jpg', '--stack', 'soap-film', '--mask', 'pipe.csv', '--out', 'o'], /pipe\.csv: is not a regular file/],
    ['series --stack', ['series', 'p.jpg', '--stack', 'pipe.json', '--fps', '1', '--out', 'o'], 'lamella: pipe.json: is a named pipe (FIFO), expected a regular file'],
  ] as const)('%s', (_what, args, message) => {
    const r = cli(cwd, ...args);
    expect(r.error).toBeUndefined(); // no timeout: the run did not block on the FIFO
    expect(r.status).toBe(3);
    if (typeof message === 'string') expect(r.stderr.trim()).toBe(message);
    else expect(r.stderr).toMatch(message);
  }, 60_000);

  it.skipIf(!made)('render --camera', () => {
    const header = "{'descr': '<f4', 'fortran_order': False, 'shape': (2, 2), }";
    const total = Math.ceil((10 + header.length + 1) / 64) * 64;
    const padded = header + ' '.repeat(total - 10 - header.length - 1) + '\n';
    const body = Buffer.alloc(16);
    for (let k = 0; k < 4; k++) body.writeFloatLE(300, 4 * k);
    writeFileSync(join(cwd, 'flat.npy'), Buffer.concat([Buffer.from([0x93]), Buffer.from('NUMPY'), Buffer.from([1, 0, padded.length, 0]), Buffer.from(padded, 'latin1'), body]));
    const r = cli(cwd, 'render', 'flat.npy', '--stack', 'soap-film', '--light', 'D65', '--camera', 'pipe.csv', '--out', 'r.png');
    expect(r.error).toBeUndefined();
    expect(r.status).toBe(3);
    expect(r.stderr.trim()).toBe('lamella: pipe.csv: is a named pipe (FIFO), expected a regular file');
  }, 60_000);
});

describe('errors never echo a data file\'s text', () => {
  const cwd = join(dir, 'echo');
  mkdirSync(cwd, { recursive: true });
  copyFileSync(join(demo, 'film_001.jpg'), join(cwd, 'p.jpg'));
  // An invented "private" file a stack file points at as a material.
  const SECRET = 'alice:s3cret-token:1000';
  writeFileSync(join(cwd, 'private.csv'), `${SECRET}\n${SECRET},1,2\n`);
  writeFileSync(join(cwd, 'private.json'), `${SECRET}\n`);
  writeFileSync(join(cwd, 'stack.json'), JSON.stringify({ name: 'x', ambient: 'air', layers: [{ material: 'private.csv', thicknessNm: 'film' }], substrate: 'air' }));
  writeFileSync(join(cwd, 'spd.csv'), `wavelength_nm,relative_spd\n${SECRET},1\n`);

  it.each([
    ['a material CSV named by a stack file', ['map', 'p.jpg', '--stack', 'stack.json', '--out', 'o'], /private\.csv: line 1: expected the header "wavelength_nm,n,k", received a first line of 23 characters/],
    ['a stack file that is not JSON', ['map', 'p.jpg', '--stack', 'private.json', '--out', 'o'], /private\.json: not valid JSON \(syntax error( at character \d+)?\)/],
    ['a calibration that is not JSON', ['map', 'p.jpg', '--stack', 'soap-film', '--calibration', 'private.json', '--out', 'o'], /private\.json: calibration file is not valid JSON/],
    ['an SPD file with a text cell', ['map', 'p.jpg', '--stack', 'soap-film', '--light', 'spd.csv', '--out', 'o'], /spd\.csv: line 2: column "wavelength_nm" must be a finite number, found text of 23 characters/],
  ] as const)('%s', (_what, args, message) => {
    const r = cli(cwd, ...args);
    expect(r.status).toBe(3);
    expect(r.stderr).toMatch(message);
    expect(r.stderr).not.toContain('s3cret');
    expect(r.stderr).not.toContain('alice');
  }, 60_000);
});
