/**
 * The catalogue of bad input across the command line: every case ends with
 * exit code 2 and one clear line, never a stack trace; an internal fault ends
 * with exit code 1 and a hint to rerun with --debug.
 */
import { closeSync, mkdtempSync, openSync, writeFileSync, ftruncateSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { spawnSync } from 'node:child_process';
import { describe, expect, test } from 'vitest';
import { BIN, ROOT, runCli, runCliHere } from '../helpers/cli.js';

const dir = mkdtempSync(join(tmpdir(), 'gapstack-bad-'));
const file = (name: string, text: string | Buffer) => {
  const p = join(dir, name);
  writeFileSync(p, text);
  return p;
};
const header = 'wavelength_nm,irradiance_W_m2_nm\n';
const good = '300,1\n500,1\n700,1\n900,1\n1100,1\n1300,1\n';

const huge = join(dir, 'huge.csv');
{
  // A sparse 1 GiB file: refused by size before a byte is read.
  const fd = openSync(huge, 'w');
  ftruncateSync(fd, 2 ** 30);
  closeSync(fd);
}

const spectrumFiles: [string, string, RegExp][] = [
  ['empty file', file('empty.csv', ''), /holds no data rows/],
  ['only comments', file('comments.csv', '# nothing\n# here\n'), /holds no data rows/],
  ['text in numbers', file('text.csv', `${header}300,1\n500,abc\n700,1\n900,1\n1100,1\n`), /text\.csv:3: "abc" is not a finite number/],
  ['negative value', file('neg.csv', `${header}300,1\n500,-1\n700,1\n900,1\n1100,1\n`), /neg\.csv:3: negative spectral value/],
  ['NaN', file('nan.csv', `${header}300,1\n500,NaN\n700,1\n900,1\n1100,1\n`), /nan\.csv:3: "NaN"/],
  ['Inf', file('inf.csv', `${header}300,1\n500,Inf\n700,1\n900,1\n1100,1\n`), /inf\.csv:3: "Inf"/],
  ['duplicate wavelength', file('dup.csv', `${header}300,1\n500,1\n500,1\n900,1\n1100,1\n`), /dup\.csv:4: duplicated abscissa/],
  ['descending wavelength', file('desc.csv', `${header}300,1\n700,1\n500,1\n900,1\n1100,1\n`), /desc\.csv:4: .*strictly ascending/],
  ['a single point', file('one.csv', `${header}500,1\n`), /has 1 data rows; at least 5/],
  ['no units in header', file('nounits.csv', `wavelength,irradiance\n${good}`), /nounits\.csv:1: header column "wavelength" names no abscissa unit/],
  ['ambiguous ordinate unit', file('ambig.csv', `wavelength_nm,irradiance_W_m2\n${good}`), /ambig\.csv:1: .*names no clear unit/],
  ['binary garbage', file('garbage.bin', Buffer.from([0x7f, 0x45, 0x4c, 0x46, 0, 0, 1, 2, 3, 255])), /binary data/],
  ['a 1 GiB file', huge, /1024 MiB; a spectrum file above 64 MiB is refused/],
  ['a folder', dir, /is a folder, not a spectrum file/],
  ['per cm² irradiance', file('cm2.csv', `wavelength_nm,irradiance_W_cm2_nm\n${good}`), /cm2\.csv:1: .*names no clear unit/],
  ['mW irradiance', file('mw.csv', `wavelength_nm,irradiance_mW_m2_nm\n${good}`), /mw\.csv:1: .*names no clear unit/],
  ['a spectrum with no power', file('dark.csv', `${header}300,0\n500,0\n700,0\n900,0\n1100,0\n`), /carries no power/],
];

describe('spectrum files (spectrum, evaluate, optimize, map)', () => {
  test.each(spectrumFiles)('%s', async (_name, path, message) => {
    for (const args of [
      ['spectrum', path],
      ['evaluate', '--gaps', '1.34', '--spectrum', path],
      ['optimize', '--cells', '1', '--spectrum', path],
      ['map', '--x', '1.5:1.9', '--y', '0.9:1.2', '--step', '0.05', '--spectrum', path],
    ]) {
      const r = await runCliHere(args);
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stderr).toMatch(message);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).not.toMatch(/\n\s+at /);
    }
  });
  test('--units that contradict the header are refused', async () => {
    const r = await runCliHere(['spectrum', 'spectra/am1.5g.tsv', '--units', 'um,W/m2/um']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/header names nm, W\/m2\/nm but --units declares um, W\/m2\/um/);
  });
  test('a wrongly declared unit is refused', async () => {
    const bare = file('bare.txt', good);
    const r = await runCliHere(['spectrum', bare, '--units', 'nm,W/m2']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--units "nm,W\/m2" is not understood/);
  });
});

const argumentCases: [string, string[], RegExp][] = [
  ['evaluate without gaps', ['evaluate'], /Missing required argument: gaps/],
  ['evaluate with 7 gaps', ['evaluate', '--gaps', '2.6,2.2,1.9,1.6,1.3,1.0,0.7'], /at most 6 subcells/],
  ['ERE list of the wrong length', ['evaluate', '--gaps', '1.7,1.1', '--ere', '1,1,1'], /--ere takes one value or 2/],
  ['LC above 1', ['evaluate', '--gaps', '1.7,1.1', '--lc', '1.5'], /--lc efficiencies must be within \[0, 1\]/],
  ['LC radiative index', ['evaluate', '--gaps', '1.7,1.1', '--lc', 'radiative:40'], /refractive index within 1–10/],
  ['top absorptance of 0', ['evaluate', '--gaps', '1.7,1.1', '--top-absorptance', '0'], /--top-absorptance must be within \(0, 1\]/],
  ['both absorptance and thickness', ['evaluate', '--gaps', '1.7,1.1', '--top-absorptance', '0.9', '--top-thickness', '300'], /either --top-absorptance or --top-thickness/],
  ['reflectance of 1', ['evaluate', '--gaps', '1.7,1.1', '--reflectance', '1'], /--reflectance must be within \[0, 1\)/],
  ['suns and irradiance', ['evaluate', '--gaps', '1.34', '--suns', '2', '--irradiance', '900'], /either --suns or --irradiance/],
  ['3t with three cells', ['evaluate', '--gaps', '1.9,1.4,0.9', '--wiring', '3t'], /--wiring 3t needs exactly 2 subcells/],
  ['vm ratio of zero', ['evaluate', '--gaps', '1.9,1.1', '--wiring', 'vm:0:2'], /voltage-matched ratio must be whole numbers 1–100/],
  ['voc loss and ere', ['evaluate', '--gaps', '1.34', '--ere', '0.1', '--voc-loss', '0.1'], /either --ere or --voc-loss/],
  ['free top absorptance in 4T', ['optimize', '--cells', '2', '--wiring', 'independent', '--free-top-absorptance'], /series \(2T\) stacks/],
  ['map without ranges', ['map', '--step', '0.01'], /Missing required arguments?: x, y/],
  ['map axes reversed', ['map', '--cells', '3', '--axes', '2,1', '--x', '1.5:1.9', '--y', '0.9:1.2', '--step', '0.05'], /--axes takes two subcells/],
  ['map with a fixed mapped cell', ['map', '--x', '1.5:1.9', '--y', '0.9:1.2', '--step', '0.05', '--fix', '1=1.7'], /subcell 1 is mapped/],
  ['materials unknown family', ['materials', 'unobtainium'], /unobtainium/],
  ['materials gap and composition', ['materials', 'cigs', '--gap', '1.2', '--composition', '0.3'], /gap|composition/],
  ['yield without ensemble', ['yield', '--gaps', '1.7,1.1'], /Missing required argument: ensemble/],
  ['yield with a missing ensemble', ['yield', '--gaps', '1.7,1.1', '--ensemble', join(dir, 'nowhere')], /nowhere/],
  ['unknown command', ['frobnicate'], /Unknown argument: frobnicate/],
  ['a hexadecimal gap', ['evaluate', '--gaps', '0x10'], /--gaps must be a number/],
  ['suns below 1e-6', ['evaluate', '--gaps', '1.34', '--suns', '1e-300'], /below 1e-6 suns/],
  ['radiative coupling with junk', ['evaluate', '--gaps', '1.7,1.1', '--lc', 'radiativeX'], /--lc radiative takes an optional index/],
  ['film options without a thickness', ['evaluate', '--gaps', '1.7,1.1', '--top-optics', 'double'], /--top-optics describes a top-cell film and needs --top-thickness/],
  ['an interlayer under one cell', ['evaluate', '--gaps', '1.34', '--interlayer-t', '0.9'], /--interlayer-t needs at least 2 subcells/],
  ['an Urbach tail wider than kT', ['evaluate', '--gaps', '1.55,1.12', '--top-thickness', '400', '--top-urbach', '0.03'], /Urbach energy 0.03 eV is not below kT/],
  ['an ensemble with --suns', ['optimize', '--cells', '2', '--ensemble', 'examples/ensemble-demo/manifest.yaml', '--suns', '2'], /an ensemble carries its own irradiance/],
  ['an ensemble with --spectrum', ['optimize', '--cells', '2', '--ensemble', 'examples/ensemble-demo/manifest.yaml', '--spectrum', 'am1.5g'], /either --spectrum or --ensemble/],
  ['a search too large to enumerate', ['optimize', '--cells', '4', '--step', '0.0005'], /gap combinations .* use a coarser --step/],
];

describe('command-line arguments', () => {
  test.each(argumentCases)('%s', async (_name, args, message) => {
    const r = await runCliHere(args);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });
});

// The cases above run the built command line in-process; one case per command family runs the binary itself.
describe('the binary, one spawned process per command family', () => {
  test.each([
    ['spectrum', ['spectrum', spectrumFiles[0][1]], spectrumFiles[0][2]],
    ['evaluate', ['evaluate'], /Missing required argument: gaps/],
    ['optimize', ['optimize', '--cells', '2', '--wiring', 'independent', '--free-top-absorptance'], /series \(2T\) stacks/],
    ['map', ['map', '--step', '0.01'], /Missing required arguments?: x, y/],
    ['yield', ['yield', '--gaps', '1.7,1.1'], /Missing required argument: ensemble/],
    ['materials', ['materials', 'unobtainium'], /unobtainium/],
    ['no command', ['frobnicate'], /Unknown argument: frobnicate/],
  ] as [string, string[], RegExp][])('%s', (_family, args, message) => {
    const r = runCli(args);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(message);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });
});

describe('internal faults', () => {
  test('exit 1 with a short message and a hint to rerun with --debug; --debug shows the details', () => {
    const env = { ...process.env, GAPSTACK_FAULT_INJECTION: 'internal' };
    const r = spawnSync(process.execPath, [BIN, 'evaluate', '--gaps', '1.34'], { cwd: ROOT, encoding: 'utf8', env });
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/^gapstack: internal error: injected fault \(rerun with --debug for details\)\n$/);
    const d = spawnSync(process.execPath, [BIN, 'evaluate', '--gaps', '1.34', '--debug'], { cwd: ROOT, encoding: 'utf8', env });
    expect(d.status).toBe(1);
    expect(d.stderr).toMatch(/at /);
  });
});
