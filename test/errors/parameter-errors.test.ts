/**
 * The engine speaks in parameters, not flags: library calls throw a
 * ParameterError that names the parameter as the library does and says what
 * it allows; the command line renames parameters to its flags.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ParameterError, UserError, ref, says, withSuffix } from '../../src/errors.js';
import { resolveSpectrum, parseSuns } from '../../src/light/sources.js';
import { parseUnitDeclaration, spectrumFromText } from '../../src/light/table-file.js';
import { idealStack, seriesWiring } from '../../src/stack/model.js';
import { buildObjective } from '../../src/stack/objectives.js';
import { parseWiring } from '../../src/stack/wiring-text.js';
import { searchGaps, subcellBounds, type SearchProblem } from '../../src/search/optimize.js';
import { uniformAxis } from '../../src/search/map.js';
import { am15g } from '../../src/light/sources.js';
import { commandLineMessage, flagForParameter } from '../../src/cli/parameter-flags.js';

/** The ParameterError a call throws (fails the test when it throws anything else or nothing). */
function caught(fn: () => unknown): ParameterError {
  try {
    fn();
  } catch (err) {
    expect(err).toBeInstanceOf(ParameterError);
    expect(err).toBeInstanceOf(UserError);
    return err as ParameterError;
  }
  throw new Error('expected a ParameterError, nothing was thrown');
}

const problem = (over: Partial<SearchProblem>): SearchProblem => ({ cells: 2, spanEv: [0.5, 2.6], ranges: [undefined, undefined], fixed: [undefined, undefined], loss: 0.01, ...over });

describe('library errors name the parameter and what it allows', () => {
  it('search step', () => {
    const obj = buildObjective(idealStack([1.7, 1.1], seriesWiring(2)), [{ spectrum: am15g(), weight: 1, tempK: 300 }]);
    const e = caught(() => searchGaps(obj, problem({ stepEv: 0.5 })));
    expect(e.parameter).toBe('stepEv');
    expect(e.allowed).toBe('0.0001–0.2 [eV]');
    expect(e.message).toBe('stepEv must be within 0.0001–0.2 eV, got 0.5');
    expect(commandLineMessage(e)).toBe('--step must be within 0.0001–0.2 eV, got 0.5');
  });

  it('a fixed gap names its subcell by index in the library and by number on the command line', () => {
    const e = caught(() => subcellBounds(problem({ fixed: [undefined, -1] })));
    expect(e.parameter).toBe('fixedEv[1]');
    expect(e.message).toBe('fixedEv[1]=-1: gap must be positive eV');
    expect(commandLineMessage(e)).toBe('--fix 2=-1: gap must be positive eV');
  });

  it('a search with no power names every bound parameter', () => {
    const obj = buildObjective(idealStack([5, 4.9], seriesWiring(2)), [{ spectrum: am15g(), weight: 1, tempK: 300 }]);
    const e = caught(() => searchGaps(obj, problem({ spanEv: [4.5, 5.0], stepEv: 0.05 })));
    expect(e.message).toBe('no stack in the allowed ranges produces power; check spanEv, rangesEv and fixedEv');
    expect(commandLineMessage(e)).toBe('no stack in the allowed ranges produces power; check --span, --range and --fix');
  });

  it('map axis step', () => {
    const e = caught(() => uniformAxis(1, 2, 0));
    expect(e.parameter).toBe('stepEv');
    expect(e.message).toBe('stepEv must be a positive number of eV, got 0');
  });

  it('light: concentration and irradiance', () => {
    expect(caught(() => resolveSpectrum('am1.5g', { suns: 2, irradianceWm2: 900 })).message).toBe('give either suns or irradianceWm2, not both');
    const e = caught(() => resolveSpectrum('am1.5g', { irradianceWm2: -1 }));
    expect(e.parameter).toBe('irradianceWm2');
    expect(commandLineMessage(e)).toBe('--irradiance must be a positive number of W/m2, got -1');
    expect(caught(() => parseSuns('lots')).allowed).toMatch(/^a number from 1e-6 to 46\d{3} \[suns\], or "max"$/);
  });

  it('spectrum tables: a file error keeps file:line and still names the parameter', () => {
    const rows = '300,1\n400,1\n500,1\n600,1\n700,1\n';
    const e = caught(() => spectrumFromText('sun.csv', `wavelength,irradiance\n${rows}`));
    expect(e.parameter).toBe('units');
    expect(e.message).toMatch(/^sun\.csv:1: header column "wavelength" names no abscissa unit .* or declare units$/);
    expect(commandLineMessage(e)).toMatch(/or declare --units$/);
    expect(caught(() => parseUnitDeclaration('nm')).allowed).toMatch(/^"<abscissa>,<ordinate>" with /);
  });

  it('wiring: the caller chooses the name', () => {
    expect(caught(() => parseWiring('parallel', 2)).message).toMatch(/^wiring must be series \(2t\)/);
    expect(caught(() => parseWiring('3t', 3, 'wirings[0]')).message).toMatch(/^wirings\[0\] 3t needs exactly 2 subcells/);
  });
});

describe('renaming', () => {
  it('maps engine parameters to flags, indexed ones to 1-based subcells, and leaves unknown ones alone', () => {
    expect(flagForParameter('spanEv')).toBe('--span');
    expect(flagForParameter('rangesEv[0]')).toBe('--range 1');
    expect(flagForParameter('irradianceWm2')).toBe('--irradiance');
    expect(flagForParameter('xCell')).toBeUndefined();
  });

  it('can drop a leading parameter for contexts that already name the field', () => {
    const e = new ParameterError('suns', 'positive', says`${ref('suns')} 0 is too few`);
    expect(e.messageWith(() => 'spectrum.suns', { omitLeading: () => true })).toBe('0 is too few');
    expect(e.messageWith(() => 'spectrum.suns', { omitLeading: () => false })).toBe('spectrum.suns 0 is too few');
  });

  it('keeps parameter references when context is appended (an ensemble names where a file was listed)', () => {
    const e = withSuffix(new ParameterError('units', 'u', says`no header; declare ${ref('units')}`), ' (listed at m.csv:3)');
    expect(e).toBeInstanceOf(ParameterError);
    expect(commandLineMessage(e)).toBe('no header; declare --units (listed at m.csv:3)');
    expect(withSuffix(new UserError('plain'), '!').message).toBe('plain!');
  });

  it('keeps interpolated text literal, even when it looks like a reference', () => {
    const e = new ParameterError('units', 'u', says`${ref('units')} "${'{x}'}" is not understood`);
    expect(e.messageWith(() => '--units')).toBe('--units "{x}" is not understood');
  });
});

describe('engine sources', () => {
  // The rule of issue 17: no command-line flag in the code of the engine layers (comments may explain the shells).
  it('name no command-line flag outside comments', () => {
    const root = join(import.meta.dirname, '..', '..', 'src');
    const offending: string[] = [];
    for (const layer of ['physics', 'numerics', 'light', 'junction', 'stack', 'search', 'materials']) {
      for (const f of readdirSync(join(root, layer), { recursive: true }) as string[]) {
        if (!f.endsWith('.ts')) continue;
        readFileSync(join(root, layer, f), 'utf8')
          .split('\n')
          .forEach((line, i) => {
            const code = line.trim();
            if (code.startsWith('*') || code.startsWith('/*') || code.startsWith('//')) return;
            if (/--[a-z]/.test(code)) offending.push(`${layer}/${f}:${i + 1}: ${code}`);
          });
      }
    }
    expect(offending).toEqual([]);
  });
});
