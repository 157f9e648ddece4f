/**
 * The command line's contract under faults and hostile input: exit 0 on
 * success, exit 2 with one line on a problem with the user's input or
 * environment, exit 1 on an internal fault, never a stack trace, and no output
 * touched by a failed run. Faults are produced for real: a pipe closed early,
 * /dev/full and a small full tmpfs (or, where mounting is not permitted, the
 * test-only write-failure injection), files unreadable to an unprivileged
 * user, and SIGINT/SIGKILL while a report is being built.
 *
 * (The existing bad-input catalogue, test/cli/bad-input-catalogue.test.ts,
 * covers malformed spectrum tables, options and design fields.)
 */
import { spawn, spawnSync } from 'node:child_process';
import {
  chmodSync,
  closeSync,
  existsSync,
  ftruncateSync,
  mkdirSync,
  mkdtempSync,
  openSync,
  readdirSync,
  readFileSync,
  rmSync,
  statSync,
  writeFileSync,
  writeSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, test } from 'vitest';
import { BIN, ROOT, runCli, runCliHere, type CliResult } from '../helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-contract-'));
chmodSync(dir, 0o755);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const file = (name: string, data: string | Buffer): string => {
  const p = join(dir, name);
  mkdirSync(join(p, '..'), { recursive: true });
  writeFileSync(p, data);
  return p;
};

/** Exit 2, exactly one line on stderr, no stack trace, nothing on stdout. */
function expectUserError(r: CliResult, message: RegExp, what = ''): void {
  expect(r.code, `${what}\n${r.stderr}`).toBe(2);
  expect(r.stderr, what).toMatch(message);
  expect(r.stderr.trim().split('\n'), what).toHaveLength(1);
  expect(r.stderr, what).not.toMatch(/\n\s+at |Error:|node:internal/);
  expect(r.stdout, what).toBe('');
}

const GOOD_TABLE = `wavelength_nm,irradiance_W_m2_nm\n${Array.from({ length: 40 }, (_, i) => `${300 + 100 * i},1`).join('\n')}\n`;
const QUICK_DESIGN = (spectrum = 'am1.5g') =>
  `name: quick\nspectrum: ${spectrum}\nsubcells:\n  - label: top\n    range: [1.5, 2.0]\n  - label: bottom\n    gap: 1.12\nwirings: [series]\nmap:\n  step: 0.05\n  pairs:\n    - axes: [1, 2]\n      x: [1.4, 2.1]\n      y: [0.9, 1.3]\n`;

describe('options', () => {
  const cases: [string, string[], RegExp][] = [
    ['a repeated --gaps (would silently become a 2-cell stack)', ['evaluate', '--gaps', '1.7', '--gaps', '1.1'], /--gaps is given twice/],
    ['a repeated --spectrum, in --name=value form', ['evaluate', '--gaps', '1.3', '--spectrum=am1.5g', '--spectrum', 'am1.5g'], /--spectrum is given twice/],
    ['a repeated boolean', ['evaluate', '--gaps', '1.3', '--json', '--json'], /--json is given twice/],
    ['--suns in hexadecimal', ['evaluate', '--gaps', '1.34', '--suns', '0x10'], /--suns must be a positive number/],
    ['--suns in binary', ['evaluate', '--gaps', '1.34', '--suns', '0b101'], /--suns must be a positive number/],
    ['a blackbody temperature in hexadecimal', ['evaluate', '--gaps', '1.34', '--spectrum', 'blackbody:0x1000'], /blackbody temperature must be a number/],
    // Full concentration: 1/f(1 sun) ≈ 46 240 suns (docs/PHYSICS.md §1); 1e8 W/m² is ≈ 1e5 AM1.5G suns.
    ['--irradiance 1e8 W/m² (beyond full concentration)', ['evaluate', '--gaps', '1.34', '--irradiance', '1e8'], /beyond full concentration/],
    ['--irradiance 1e20', ['evaluate', '--gaps', '1.34', '--irradiance', '1e20'], /beyond full concentration/],
    ['--irradiance 1e300', ['evaluate', '--gaps', '1.34', '--irradiance', '1e300'], /beyond full concentration/],
    ['--irradiance beyond full concentration of a blackbody sun', ['evaluate', '--gaps', '1.34', '--spectrum', 'blackbody:5778', '--irradiance', '1e9'], /beyond full concentration/],
    ['--x -1:2 is read as a value and judged', ['map', '--x', '-1:2', '--y', '0.5:1', '--step', '0.1'], /--x and --y must be positive gaps/],
    ['--fix outside the search span, as in design files', ['optimize', '--cells', '2', '--fix', '1=3'], /--fix 1=3: the gap lies outside the search span 0\.5–2\.6 eV/],
    ['--range outside the search span', ['optimize', '--cells', '2', '--range', '1=2.7:2.9'], /outside the search span/],
  ];
  test.each(cases)('%s', async (what, args, message) => expectUserError(await runCliHere(args), message, what));

  test('report -o twice is refused before any work, and writes nothing', async () => {
    const d = file('twice/d.yaml', QUICK_DESIGN());
    const t0 = Date.now();
    const r = runCli(['report', d, '-o', join(dir, 'twice/a.html'), '-o', join(dir, 'twice/b.html')]); // spawned: the binary itself
    expectUserError(r, /--output is given twice \(-o and -o\)/);
    expect(Date.now() - t0).toBeLessThan(60_000);
    expect(readdirSync(join(dir, 'twice'))).toEqual(['d.yaml']);
  });

  test('--x -1:2 is no longer an unknown argument; --x=-1:2 the same', async () => {
    for (const args of [['--x', '-1:2'], ['--x=-1:2']]) {
      const r = await runCliHere(['map', ...args, '--y', '0.5:1', '--step', '0.1']);
      expect(r.stderr).not.toMatch(/Unknown argument/);
      expect(r.code).toBe(2);
    }
  });
});

describe('files that are not what they claim', () => {
  const sparse = join(dir, 'sparse.yaml');
  {
    const fd = openSync(sparse, 'w');
    ftruncateSync(fd, 5_000_000);
    closeSync(fd);
  }
  const fifo = join(dir, 'design.fifo');
  spawnSync('mkfifo', [fifo]);
  const utf16 = file('utf16.yaml', Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from('name: x\n', 'utf16le')]));
  const utf16NoMark = file('utf16-nomark.json', Buffer.from('{"name": "x"}\n', 'utf16le'));
  // Billion-laughs: nine levels of nine aliases each.
  const levels = ['a: &a ["x","x","x","x","x","x","x","x","x"]'];
  for (let k = 1; k < 9; k++) {
    const prev = String.fromCharCode(96 + k);
    const cur = String.fromCharCode(97 + k);
    levels.push(`${cur}: &${cur} [${Array(9).fill(`*${prev}`).join(',')}]`);
  }
  const bomb = file('bomb.yaml', `${levels.join('\n')}\n`);
  const deep = file('deep.json', `${'['.repeat(200_000)}${']'.repeat(200_000)}`);
  const deepYaml = file('deep.yaml', `name: ${'['.repeat(100_000)}${']'.repeat(100_000)}\n`);
  const hugeValues = file('huge-values.csv', `wavelength_nm,irradiance_W_m2_nm\n${[300, 500, 700, 900, 1100, 1300].map((w) => `${w},1e300`).join('\n')}\n`);

  const cases: [string, string[], RegExp][] = [
    ['/dev/zero as a design (would grow without bound)', ['report', '/dev/zero', '-o', join(dir, 'z.html')], /\/dev\/zero: is not a regular file \(a FIFO, socket or device\)/],
    ['a FIFO as a design (would wait forever)', ['report', fifo, '-o', join(dir, 'f.html')], /design\.fifo: is not a regular file/],
    ['a FIFO as a spectrum', ['evaluate', '--gaps', '1.3', '--spectrum', fifo], /design\.fifo: is not a regular file/],
    ['a 5 MB design, refused by size before reading', ['report', sparse, '-o', join(dir, 's.html')], /sparse\.yaml: is 5 MiB; a design file above 1000000 bytes is refused/],
    ['a UTF-16 design with a byte-order mark', ['report', utf16, '-o', join(dir, 'u.html')], /utf16\.yaml:1: is UTF-16 encoded; save the design file as UTF-8/],
    ['a UTF-16 design without a mark', ['report', utf16NoMark, '-o', join(dir, 'u.html')], /utf16-nomark\.json:1: looks UTF-16 or UTF-32 encoded/],
    ['a YAML alias bomb', ['report', bomb, '-o', join(dir, 'b.html')], /bomb\.yaml: refused: Excessive alias count/],
    ['a 200 000-deep JSON design', ['report', deep, '-o', join(dir, 'd.html')], /deep\.json:1: nested more than 64 levels deep/],
    ['a 100 000-deep flow sequence in YAML', ['report', deepYaml, '-o', join(dir, 'd.html')], /deep\.yaml:1: nested more than 64 levels deep/],
    ['a folder as a design', ['report', dir, '-o', join(dir, 'x.html')], /is a folder, not a design file/],
    ['a spectrum of 1e300 values (its integral overflows)', ['evaluate', '--gaps', '1.34', '--spectrum', hugeValues], /too large to integrate/],
  ];
  test.each(cases)('%s', async (what, args, message) => expectUserError(await runCliHere(args), message, what));

  test('a JSON design with a byte-order mark is read (the mark is dropped; lines still count)', async () => {
    const p = file('bom.json', `\ufeff{\n  "name": "bom",\n  "subcells": [{"gap": 1.7}, {"gap": 9}],\n  "wirings": ["series"]\n}\n`);
    const r = await runCliHere(['report', p, '-o', join(dir, 'bom.html')]);
    expectUserError(r, /bom\.json:3: subcells\[1\]\.gap/);
  });

  test('a design with five problems lists the other four below the first line', async () => {
    const p = file('five.yaml', 'name: five\ntemperature: 900\nsubcells:\n  - gap: -1\n    ere: 2\n  - gap: 1.1\n    ere: 0\nwirings: [sideways]\n');
    const r = await runCliHere(['report', p, '-o', join(dir, 'five.html')]);
    expect(r.code).toBe(2);
    const lines = r.stderr.trim().split('\n');
    const more = /\(and (\d+) more problems?, listed below\)/.exec(lines[0]);
    expect(more, r.stderr).not.toBeNull();
    expect(lines).toHaveLength(1 + Number(more![1]));
    for (const l of lines.slice(1)) expect(l).toMatch(/^ {2}.*five\.yaml:\d+: /);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });
});

describe('terminal control codes from users\' files are shown, not obeyed', () => {
  test('a label with ESC in an ensemble manifest, in yield text output', async () => {
    const table = readFileSync(join(ROOT, 'examples/ensemble-demo/spectra/01-winter-clear-midday.tsv'));
    file('esc/a.tsv', table);
    file('esc/b.tsv', table);
    const m = file('esc/m.csv', '# weight_unit: hours\nfile,label,weight,temp_k\na.tsv,red\x1b[31mlabel\x07,10,299\nb.tsv,plain,20,300\n');
    const r = await runCliHere(['yield', '--gaps', '1.73,1.12', '--ensemble', m]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).not.toMatch(/[\x1b\x07]/);
    expect(r.stdout).toContain('red\\x1b[31mlabel\\x07');
  });

  test('a spectrum cell with ESC, quoted in the error line', async () => {
    const p = file('esc-cell.csv', `wavelength_nm,irradiance_W_m2_nm\n300,1\n500,\x1b[2Jx\n700,1\n900,1\n1100,1\n`);
    const r = await runCliHere(['spectrum', p]);
    expectUserError(r, /esc-cell\.csv:3: /);
    expect(r.stderr).not.toMatch(/\x1b/);
  });
});

describe('results that are not numbers are internal faults, never printed', () => {
  test('an ensemble weight of 1e308 overflows the weighted sums: exit 1, nothing on stdout, in text and JSON', async () => {
    const table = readFileSync(join(ROOT, 'examples/ensemble-demo/spectra/01-winter-clear-midday.tsv'));
    file('big-w/a.tsv', table);
    file('big-w/b.tsv', table);
    const m = file('big-w/m.csv', '# weight_unit: hours\nfile,weight\na.tsv,1e308\nb.tsv,1e308\n');
    for (const json of [[], ['--json']]) {
      const r = await runCliHere(['yield', '--gaps', '1.73,1.12', '--ensemble', m, ...json]);
      expect(r.code, r.stderr).toBe(1);
      expect(r.stdout).toBe('');
      expect(r.stderr).toMatch(/internal error: a computed value is not finite/);
      expect(r.stderr).not.toMatch(/NaN %|Infinity kWh/);
    }
  });
});

describe('warnings where the model leaves its range', () => {
  test('Voc above the gap at full concentration on a 0.3 eV gap is warned about (text and JSON)', async () => {
    const r = await runCliHere(['evaluate', '--gaps', '0.3', '--suns', 'max']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Warning: subcell 1: Voc [\d.]+ V reaches its 0\.300 eV gap; the diode form breaks down/);
    const j = JSON.parse((await runCliHere(['evaluate', '--gaps', '0.3', '--suns', 'max', '--json'])).stdout);
    expect(j.warnings.some((w: string) => /reaches its 0\.300 eV gap/.test(w))).toBe(true);
  });

  test('no such warning at one sun on 1.34 eV', async () => {
    const j = JSON.parse((await runCliHere(['evaluate', '--gaps', '1.34', '--json'])).stdout);
    expect(j.warnings).toEqual([]);
  });

  test('a spectrum that stops at 1050 nm is warned about for a 1.12 eV bottom cell, in text, JSON and map CSV; --extend-spectrum states the extension', async () => {
    const p = file('short.csv', `wavelength_nm,irradiance_W_m2_nm\n${Array.from({ length: 71 }, (_, i) => `${350 + 10 * i},1.2`).join('\n')}\n`);
    const text = await runCliHere(['evaluate', '--gaps', '1.73,1.12', '--spectrum', p]);
    expect(text.stdout).toMatch(/Warning: the spectrum "short\.csv" stops at 1050 nm, short of the 1\.120 eV gap's absorption edge at 1107 nm/);
    const json = JSON.parse((await runCliHere(['evaluate', '--gaps', '1.73,1.12', '--spectrum', p, '--json'])).stdout);
    expect(json.warnings.join('\n')).toMatch(/stops at 1050 nm/);
    const csv = await runCliHere(['map', '--x', '1.6:1.8', '--y', '1.0:1.2', '--step', '0.1', '--spectrum', p]);
    expect(csv.stdout.split('\n')[1]).toMatch(/^# Warning: the spectrum "short\.csv" stops at 1050 nm/);
    const ext = await runCliHere(['evaluate', '--gaps', '1.73,1.12', '--spectrum', p, '--extend-spectrum', '--json']);
    const e = JSON.parse(ext.stdout);
    expect(e.warnings).toEqual([]);
    expect(JSON.stringify(e)).toMatch(/extended past 1050 nm with the AM1\.5G \(ASTM G173-03\) shape/);
    // The missing infrared goes back into P_in, so the efficiency falls.
    expect(e.efficiency).toBeLessThan(json.efficiency);
  });
});

describe('a short spectrum in a design: the report says so in its text, JSON and page', () => {
  test('report of a quick design under a table ending at 1050 nm', async () => {
    file('short-design/short.csv', `wavelength_nm,irradiance_W_m2_nm\n${Array.from({ length: 71 }, (_, i) => `${350 + 10 * i},1.2`).join('\n')}\n`);
    const d = file('short-design/d.yaml', QUICK_DESIGN('short.csv'));
    const out = join(dir, 'short-design', 'r.html');
    const text = await runCliHere(['report', d, '-o', out]);
    expect(text.code, text.stderr).toBe(0);
    expect(text.stdout).toMatch(/Warning: the spectrum "short\.csv" stops at 1050 nm, short of the 1\.120 eV gap's absorption edge at 1107 nm/);
    expect(readFileSync(out, 'utf8')).toMatch(/stops at 1050 nm, short of the 1\.120 eV gap(&#x27;|')s absorption edge at 1107 nm/);
    const json = JSON.parse((await runCliHere(['report', d, '-o', out, '--json'])).stdout);
    expect(json.light_warnings.join('\n')).toMatch(/stops at 1050 nm/);
  }, 180_000);
});

describe('standard output that cannot take more', () => {
  test('a reader that goes away (| head -1): exit 0, nothing on stderr', async () => {
    const child = spawn(process.execPath, [BIN, 'map', '--x', '0.5:2.6', '--y', '0.5:2.6', '--step', '0.01'], { cwd: ROOT, stdio: ['ignore', 'pipe', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    await new Promise<void>((resolve) => child.stdout.once('data', () => resolve()));
    child.stdout.destroy();
    const code = await new Promise<number | null>((resolve) => child.on('close', (c) => resolve(c)));
    expect(stderr).toBe('');
    expect(code).toBe(0);
  });

  test('a real shell pipe into head -1 (pipefail): exit 0', () => {
    const r = spawnSync('bash', ['-c', `set -o pipefail; "${process.execPath}" "${BIN}" map --x 0.5:2.6 --y 0.5:2.6 --step 0.01 | head -1 >/dev/null; echo "rc=$?"`], { encoding: 'utf8', cwd: ROOT, timeout: 120_000 });
    expect(r.stdout.trim()).toBe('rc=0');
    expect(r.stderr).toBe('');
  });

  test.each([[['evaluate', '--gaps', '1.34']], [['evaluate', '--gaps', '1.34', '--json']], [['materials']]])('%j > /dev/full: exit 2, one line', (args) => {
    const fd = openSync('/dev/full', 'w');
    try {
      const r = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, stdio: ['ignore', fd, 'pipe'], encoding: 'utf8', timeout: 120_000 });
      expect(r.status).toBe(2);
      expect(r.stderr.trim().split('\n')).toEqual(['gapstack: cannot write the output (no space left on the device)']);
    } finally {
      closeSync(fd);
    }
  });
});

/** A small tmpfs to fill, when this user may mount one; otherwise undefined. */
function smallTmpfs(): string | undefined {
  const mnt = mkdtempSync(join(tmpdir(), 'gapstack-full-'));
  const r = spawnSync('mount', ['-t', 'tmpfs', '-o', 'size=256k', 'tmpfs', mnt], { encoding: 'utf8' });
  if (r.status === 0) return mnt;
  rmSync(mnt, { recursive: true, force: true });
  return undefined;
}

describe('a full disk while writing a report', () => {
  const mnt = smallTmpfs();
  afterAll(() => {
    if (mnt) {
      spawnSync('umount', [mnt]);
      rmSync(mnt, { recursive: true, force: true });
    }
  });

  test('exit 2, one line; the previous page and figures stay byte for byte; no temporaries', () => {
    const root = mnt ?? join(dir, 'full');
    mkdirSync(root, { recursive: true });
    const design = file('full-design/d.yaml', QUICK_DESIGN());
    const out = join(root, 'report.html');
    const figs = join(root, 'figures');
    mkdirSync(figs, { recursive: true });
    writeFileSync(out, 'previous page\n');
    writeFileSync(join(figs, 'map-series-1-2.svg'), 'previous figure\n');
    if (mnt) {
      // Fill the tmpfs, leaving too little room for the new figure set (a few hundred kB of PNGs).
      const filler = join(root, 'filler');
      const fd = openSync(filler, 'w');
      try {
        const chunk = Buffer.alloc(4096, 1);
        // writeSync throws ENOSPC once the tmpfs is full.
        for (;;) writeSync(fd, chunk);
      } catch {
        // full
      } finally {
        closeSync(fd);
      }
      rmSync(filler);
      writeFileSync(join(root, 'filler'), Buffer.alloc(200 * 1024, 1));
    }
    const env = mnt ? {} : { GAPSTACK_FAULT_INJECTION: 'enospc:4' };
    const r = spawnSync(process.execPath, [BIN, 'report', design, '-o', out, '--figures', figs], { cwd: ROOT, encoding: 'utf8', env: { ...process.env, ...env }, timeout: 180_000 });
    expectUserError({ code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr }, /cannot write the report \(ENOSPC/, mnt ? 'tmpfs' : 'injected');
    expect(readFileSync(out, 'utf8')).toBe('previous page\n');
    expect(readdirSync(figs)).toEqual(['map-series-1-2.svg']);
    expect(readFileSync(join(figs, 'map-series-1-2.svg'), 'utf8')).toBe('previous figure\n');
    expect(readdirSync(root).filter((n) => n.startsWith('.'))).toEqual([]);
  }, 180_000);
});

describe('the write-failure injection (for machines that cannot mount a full tmpfs)', () => {
  test('the 3rd write fails as a full disk would: exit 2, the previous outputs stay, no temporaries', () => {
    const root = join(dir, 'injected');
    const design = file('injected/d.yaml', QUICK_DESIGN());
    const out = join(root, 'out', 'report.html');
    const figs = join(root, 'out', 'figures');
    mkdirSync(figs, { recursive: true });
    writeFileSync(out, 'previous page\n');
    const r = spawnSync(process.execPath, [BIN, 'report', design, '-o', out, '--figures', figs], {
      cwd: ROOT,
      encoding: 'utf8',
      env: { ...process.env, GAPSTACK_FAULT_INJECTION: 'enospc:3' },
      timeout: 180_000,
    });
    expectUserError({ code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr }, /cannot write the report \(ENOSPC: no space left on the device\); nothing was replaced/);
    expect(readFileSync(out, 'utf8')).toBe('previous page\n');
    expect(readdirSync(figs)).toEqual([]);
    expect(readdirSync(join(root, 'out')).sort()).toEqual(['figures', 'report.html']);
  }, 180_000);
});

const IS_ROOT = process.getuid?.() === 0;
const AS_NOBODY = ['--reuid=65534', '--regid=65534', '--clear-groups'];
/** Root can run the CLI as nobody only where nobody can reach the checkout (a clone in a private temp folder cannot). */
const NOBODY_RUNS_CLI = IS_ROOT && spawnSync('setpriv', [...AS_NOBODY, process.execPath, BIN, '--version'], { cwd: ROOT, timeout: 60_000 }).status === 0;

/**
 * Run the CLI where `path` cannot be read: as an unprivileged user (chmod 000
 * does not stop root), or, where that is impossible, through the test-only
 * injection that fails opening that path with EACCES.
 */
function runUnreadable(args: string[], path: string): CliResult {
  const opts = { cwd: ROOT, encoding: 'utf8' as const, timeout: 120_000 };
  const r = !IS_ROOT
    ? spawnSync(process.execPath, [BIN, ...args], opts)
    : NOBODY_RUNS_CLI
      ? spawnSync('setpriv', [...AS_NOBODY, process.execPath, BIN, ...args], opts)
      : spawnSync(process.execPath, [BIN, ...args], { ...opts, env: { ...process.env, GAPSTACK_FAULT_INJECTION: `eacces:${path}` } });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}

describe('files the user cannot read: exit 2 naming the file (as an unprivileged user where possible)', () => {
  const base = join(dir, 'eacces');
  mkdirSync(base, { recursive: true });
  chmodSync(base, 0o755);
  const locked = (name: string, text: string | Buffer) => {
    const p = join(base, name);
    mkdirSync(join(p, '..'), { recursive: true, mode: 0o755 });
    chmodSync(join(p, '..'), 0o755);
    writeFileSync(p, text);
    chmodSync(p, 0o000);
    return p;
  };
  const open = (name: string, text: string | Buffer) => {
    const p = join(base, name);
    mkdirSync(join(p, '..'), { recursive: true, mode: 0o755 });
    chmodSync(join(p, '..'), 0o755);
    writeFileSync(p, text);
    chmodSync(p, 0o644);
    return p;
  };
  const table = readFileSync(join(ROOT, 'examples/ensemble-demo/spectra/01-winter-clear-midday.tsv'));
  const spectrum = locked('spectrum.csv', GOOD_TABLE);
  const manifest = locked('m1/manifest.csv', '# weight_unit: hours\nfile,weight\na.tsv,1\n');
  open('m1/a.tsv', table);
  const memberManifest = open('m2/manifest.csv', '# weight_unit: hours\nfile,weight\na.tsv,1\nb.tsv,2\n');
  open('m2/a.tsv', table);
  const member = locked('m2/b.tsv', table);
  const wide = locked('w1/year.csv', `wavelength_nm,A,B\n${Array.from({ length: 40 }, (_, i) => `${300 + 100 * i},1,2`).join('\n')}\n`);
  const design = locked('d1/design.yaml', QUICK_DESIGN());
  const referencing = open('d2/design.yaml', QUICK_DESIGN('light.csv'));
  const referenced = locked('d2/light.csv', GOOD_TABLE);
  const filmDesign = open('d3/design.yaml', 'name: film\nsubcells:\n  - gap: 1.7\n    absorptance_file: abs.csv\n  - gap: 1.12\nwirings: [series]\n');
  const filmCurve = locked('d3/abs.csv', 'wavelength_nm,absorptance\n400,0.9\n700,0.8\n');

  const cases: [string, string[], string][] = [
    ['a spectrum (spectrum)', ['spectrum', spectrum], spectrum],
    ['a spectrum (evaluate)', ['evaluate', '--gaps', '1.3', '--spectrum', spectrum], spectrum],
    ['a manifest', ['yield', '--gaps', '1.73,1.12', '--ensemble', manifest], manifest],
    ['an ensemble member', ['yield', '--gaps', '1.73,1.12', '--ensemble', memberManifest], member],
    ['a wide table (the streaming reader)', ['yield', '--gaps', '1.73,1.12', '--ensemble', wide], wide],
    ['a design', ['report', design, '-o', join(tmpdir(), `gapstack-never-${process.pid}.html`)], design],
    ['a file a design names', ['report', referencing, '-o', join(tmpdir(), `gapstack-never-${process.pid}.html`)], referenced],
    ['a measured curve a design names', ['report', filmDesign, '-o', join(tmpdir(), `gapstack-never-${process.pid}.html`)], filmCurve],
  ];
  test.each(cases)(`%s (${!IS_ROOT ? 'chmod 000' : NOBODY_RUNS_CLI ? 'run as nobody' : 'injected'})`, (what, args, path) => {
    const r = runUnreadable(args, path);
    expectUserError(r, /EACCES: permission denied/, what);
    expect(r.stderr).toContain(path);
  });
});

describe('outputs never replace inputs', () => {
  test('map --out onto its own --spectrum: exit 2 before the work; the spectrum is untouched', async () => {
    const p = file('own/light.csv', GOOD_TABLE);
    const r = await runCliHere(['map', '--x', '1.5:1.9', '--y', '0.9:1.2', '--step', '0.05', '--spectrum', p, '--out', p]);
    expectUserError(r, /--out .*light\.csv is an input of this run/);
    expect(readFileSync(p, 'utf8')).toBe(GOOD_TABLE);
  });

  test('report --figures . next to the design and its spectrum: refused, nothing written', () => {
    const d = file('dot/d.yaml', QUICK_DESIGN('light.csv'));
    file('dot/light.csv', GOOD_TABLE);
    const r = runCli(['report', 'd.yaml', '-o', 'r.html', '--figures', '.'], { cwd: join(dir, 'dot') });
    expectUserError(r, /--figures \. holds an input of this run/);
    expect(readdirSync(join(dir, 'dot')).sort()).toEqual(['d.yaml', 'light.csv']);
    expect(readFileSync(join(dir, 'dot/light.csv'), 'utf8')).toBe(GOOD_TABLE);
    expect(existsSync(d)).toBe(true);
  });

  test('report -o onto an input through another name (a hard link): refused', async () => {
    const d = file('link/d.html', QUICK_DESIGN());
    // A design file with an .html name is still YAML to the reader; the point is the same inode.
    const r = await runCliHere(['report', d, '-o', d]);
    expectUserError(r, /is an input of this run/);
    expect(readFileSync(d, 'utf8')).toBe(QUICK_DESIGN());
  });

  test('a figures folder holding files the report does not write is refused, not replaced', async () => {
    const d = file('foreign/d.yaml', QUICK_DESIGN());
    const figs = join(dir, 'foreign-figs');
    mkdirSync(figs, { recursive: true });
    writeFileSync(join(figs, 'notes.txt'), 'mine\n');
    const r = await runCliHere(['report', d, '-o', join(dir, 'foreign/r.html'), '--figures', figs]);
    expectUserError(r, /holds files this report does not write \(notes\.txt\)/);
    expect(readdirSync(figs)).toEqual(['notes.txt']);
    expect(existsSync(join(dir, 'foreign/r.html'))).toBe(false);
  });
});

describe('interrupted reports: the page and its figures are published together or not at all', () => {
  const design = file('kill/d.yaml', readFileSync(join(ROOT, 'examples/perovskite-silicon.yaml'), 'utf8'));

  /** Old outputs, a run killed after `ms`, and what is left. */
  async function killDuring(signal: 'SIGINT' | 'SIGKILL' | 'SIGTERM' | 'SIGHUP', ms: number, tag: string) {
    const root = join(dir, `kill-${tag}`);
    const out = join(root, 'report.html');
    const figs = join(root, 'figures');
    mkdirSync(figs, { recursive: true });
    writeFileSync(out, 'previous page\n');
    writeFileSync(join(figs, 'map-series-1-2.svg'), 'previous figure\n');
    const child = spawn(process.execPath, [BIN, 'report', design, '-o', out, '--figures', figs], { cwd: ROOT, stdio: 'ignore' });
    // Listen from the start: on an idle machine the report may finish before the signal is sent.
    const closed = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.on('close', (code, sig) => resolve({ code, signal: sig })));
    await new Promise((r) => setTimeout(r, ms));
    if (child.exitCode === null && child.signalCode === null) child.kill(signal);
    const status = await closed;
    const page = readFileSync(out, 'utf8');
    const names = readdirSync(figs).sort();
    const hidden = readdirSync(root).filter((n) => n.startsWith('.'));
    return { status, page, names, hidden, root, out, figs };
  }

  function consistent(r: Awaited<ReturnType<typeof killDuring>>): void {
    if (r.page === 'previous page\n') {
      // Nothing published: the previous figure set is whole.
      expect(r.names).toEqual(['map-series-1-2.svg']);
      expect(readFileSync(join(r.figs, 'map-series-1-2.svg'), 'utf8')).toBe('previous figure\n');
    } else {
      // Published: the new page with the whole new figure set.
      expect(r.page).toMatch(/<\/html>\s*$/);
      expect(r.names).toContain('summary.json');
      expect(r.names).toContain('.gapstack-figures');
      expect(r.names.length).toBeGreaterThan(20);
      expect(readFileSync(join(r.figs, 'map-series-1-2.svg'), 'utf8')).not.toBe('previous figure\n');
    }
  }

  test.each([
    ['SIGINT', 700],
    ['SIGINT', 2500],
    ['SIGTERM', 1500],
    ['SIGHUP', 1500],
  ] as const)('%s after %i ms: old or new set whole, no temporaries left, exit by the signal or 128+n', async (signal, ms) => {
    const r = await killDuring(signal, ms, `${signal}-${ms}`);
    consistent(r);
    expect(r.hidden).toEqual([]);
    const n = { SIGINT: 2, SIGTERM: 15, SIGHUP: 1 }[signal];
    if (r.status.code !== 0) expect(r.status.signal === signal || r.status.code === 128 + n).toBe(true);
  }, 180_000);

  test.each([[1200], [4000]])('SIGKILL after %i ms: old or new set whole; a later run sweeps what it left', async (ms) => {
    const r = await killDuring('SIGKILL', ms, `KILL-${ms}`);
    consistent(r);
    // Anything left behind is hidden and named for the dead process; the next publish removes it.
    const { removeStaleTemporaries } = await import('../../src/io/publish.js');
    removeStaleTemporaries(r.figs);
    removeStaleTemporaries(r.out);
    expect(readdirSync(r.root).filter((n) => n.startsWith('.'))).toEqual([]);
  }, 180_000);

  test('a stale staging folder and page temp of a dead process are swept; a live one is kept', async () => {
    const { removeStaleTemporaries } = await import('../../src/io/publish.js');
    const root = join(dir, 'stale');
    mkdirSync(root, { recursive: true });
    // Process ids above the kernel's pid_max cannot be alive.
    mkdirSync(join(root, '.figures.gapstack-staging-4999999.1700000000000'));
    writeFileSync(join(root, '.report.html.4999999.1700000000000.tmp'), 'x');
    mkdirSync(join(root, `.figures.gapstack-staging-${process.pid}.1700000000000`));
    removeStaleTemporaries(join(root, 'figures'));
    removeStaleTemporaries(join(root, 'report.html'));
    expect(readdirSync(root)).toEqual([`.figures.gapstack-staging-${process.pid}.1700000000000`]);
    expect(statSync(join(root, readdirSync(root)[0])).isDirectory()).toBe(true);
  });
});

describe('long work: a size check that counts spectra, and progress on a terminal', () => {
  test('optimize --cells 4 over 10 000 spectra is refused with an estimate before any work; --accept-large is the way through', async () => {
    const table = readFileSync(join(ROOT, 'examples/ensemble-demo/spectra/01-winter-clear-midday.tsv'));
    file('big/a.tsv', table);
    const m = file('big/m.csv', `# weight_unit: hours\nfile,weight\n${'a.tsv,1\n'.repeat(10_000)}`);
    const r = await runCliHere(['optimize', '--cells', '4', '--ensemble', m]);
    expectUserError(r, /this search would evaluate about [\d.]+e\d+ stack–spectrum pairs \([\d.]+e\d+ stacks × 10001 spectra\).*--accept-large/);
  });

  test('the estimate: ordered free gaps count once; ranges and fixed gaps shrink it; profile points cost a local search', async () => {
    const { searchStacks, mapStacks, checkWorkSize } = await import('../../src/cli/work-size.js');
    // 2 free gaps over 0.5–2.6 eV at 10 meV: 211 points each, C-like count 211²/2! (common practice: the ordered pairs of a grid).
    expect(searchStacks([{ kind: 'free' }, { kind: 'free' }], [0.5, 2.6], 0.01)).toBeCloseTo((211 * 211) / 2, 6);
    expect(searchStacks([{ kind: 'free' }, { kind: 'fixed', gapEv: 1.12 }], [0.5, 2.6], 0.01)).toBe(211);
    expect(searchStacks([{ kind: 'range', loEv: 1.5, hiEv: 2.0 }, { kind: 'fixed', gapEv: 1.12 }], [0.5, 2.6], 0.01)).toBe(51);
    expect(mapStacks(10, 20, false)).toBe(200);
    expect(mapStacks(10, 20, true)).toBeGreaterThan(200);
    expect(() => checkWorkSize('search', 1e7, 1000, false)).toThrow(/about 1\.0e10 stack–spectrum pairs \(1\.0e7 stacks × 1000 spectra\)/);
    expect(() => checkWorkSize('search', 1e7, 1000, true)).not.toThrow();
    expect(() => checkWorkSize('search', 1e5, 1000, false)).not.toThrow();
  });

  test('ordinary runs pass the check untouched', async () => {
    expect((await runCliHere(['optimize', '--cells', '2', '--fix', '2=1.12', '--json'])).code).toBe(0);
  });

  const script = spawnSync('script', ['--version'], { encoding: 'utf8' }).status === 0;
  test.skipIf(!script)('a report in a terminal names its stages and the time left (under script(1), a pseudo-terminal)', () => {
    // A bar shows once a run has taken half a second: the three-scenario example runs for
    // several seconds (the one-scenario example now ends near that half second).
    const out = join(dir, 'progress', 'r.html');
    const cmd = `"${process.execPath}" "${BIN}" report "${join(ROOT, 'examples/three-tandems.yaml')}" -o "${out}" --figures "${join(dir, 'progress', 'f')}"`;
    const r = spawnSync('script', ['-qec', cmd, '/dev/null'], { cwd: ROOT, encoding: 'utf8', timeout: 180_000 });
    expect(r.status, r.stdout).toBe(0);
    const shown = r.stdout.replace(/\x1b\[[0-9;?]*[A-Za-z]/g, '');
    expect(shown).toMatch(/report: stage \d+\/\d+ (search|map|figures)[^[]*\[[░█]+\] \d+% \| about \S+ left/);
  }, 180_000);
});
