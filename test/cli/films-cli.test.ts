/**
 * Films, measured data and series resistance from the command line (in
 * process; one spawned call proves --help). Expected values: the independent
 * reference test/fixtures/films/films.json (runner.py beside it), docs/PHYSICS.md §3 and §11.
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { evaluateCommand } from '../../src/cli/evaluate-command.js';
import { stackFromArgs } from '../../src/cli/options.js';
import { am15g } from '../../src/light/sources.js';
import { evaluateStack } from '../../src/stack/evaluate.js';
import { couplingIndexBelow } from '../../src/stack/model.js';
import { getFamily } from '../../src/materials/index.js';
import { runCli } from '../helpers/cli.js';

const ref = JSON.parse(readFileSync(new URL('../fixtures/films/films.json', import.meta.url), 'utf8'));
const evalJson = (args: Record<string, unknown>) => JSON.parse(evaluateCommand({ ...args, json: true } as never));
const dir = mkdtempSync(join(tmpdir(), 'gapstack-films-'));

describe('films on any subcell', () => {
  test('--top-optics double above another subcell is refused, naming the option (docs/PHYSICS.md §11)', () => {
    expect(() => evaluateCommand({ gaps: '1.55,1.12', topThickness: '200', topOptics: 'double' } as never)).toThrow(/--top-optics double puts a reflector behind the top film.*--bottom-optics/);
    // a single junction keeps its mirror: it is the bottom subcell
    expect(evalJson({ gaps: '1.55', topThickness: '200', topOptics: 'double' }).efficiency).toBeGreaterThan(0);
  });

  test('--thickness -,5000 --bottom-optics double equals a single pass through 10 µm (docs/PHYSICS.md §3: a = 1 − exp(−2αd))', () => {
    const mirror = evalJson({ gaps: '1.7,1.12', thickness: '-,5000', alpha0: '2e3', bottomOptics: 'double' });
    const single = evalJson({ gaps: '1.7,1.12', thickness: '-,10000', alpha0: '2e3' });
    expect(Math.abs(mirror.efficiency - single.efficiency)).toBeLessThan(1e-12);
    expect(mirror.subcells[1].absorptance).toBe('Beer–Lambert double pass, 5000 nm');
  });

  test('--thickness 300,- with α0 1.5e5 cm⁻¹ and a 15 meV tail reproduces the reference film (films.json film.series, η to 1e-5)', () => {
    const j = evalJson({ gaps: '1.6,1.12', thickness: '300,-', alpha0: '1.5e5', urbach: '0.015' });
    expect(Math.abs(j.efficiency - ref.film.series.efficiency)).toBeLessThan(1e-5);
  });

  test('film options without a thickness, and --bottom-optics without a bottom film, are refused', () => {
    expect(() => evaluateCommand({ gaps: '1.7,1.1', thickness: '300,-', urbach: '-,0.02' } as never)).toThrow(/--urbach for subcell 2 describes a film and needs its --thickness/);
    expect(() => evaluateCommand({ gaps: '1.7,1.1', bottomOptics: 'lambertian' } as never)).toThrow(/--bottom-optics lambertian .* needs its --thickness/);
    expect(() => evaluateCommand({ gaps: '1.7,1.1', bottomOptics: 'mirror' } as never)).toThrow(/--bottom-optics must be single, double \(rear mirror\) or lambertian/);
  });

  test('the Lambertian index of the bottom film is --index (Tiedje et al. 1984: a = 4n²αd/(1 + 4n²αd), more trapping with higher n)', () => {
    const lo = evalJson({ gaps: '1.7,1.12', thickness: '-,2000', alpha0: '2e3', bottomOptics: 'lambertian', index: '-,2.5' });
    const hi = evalJson({ gaps: '1.7,1.12', thickness: '-,2000', alpha0: '2e3', bottomOptics: 'lambertian', index: '-,3.6' });
    expect(lo.subcells[1].absorptance).toBe('Lambertian trapping (n = 2.5), 2000 nm');
    expect(hi.subcells[1].jgen_ma_cm2).toBeGreaterThan(lo.subcells[1].jgen_ma_cm2);
  });
});

describe('series resistance from --rs', () => {
  test('--rs 1.0,0.5 on 1.73/1.12 eV, series and independent (films.json rs_two)', () => {
    const s = evalJson({ gaps: '1.73,1.12', rs: '1.0,0.5' });
    const i = evalJson({ gaps: '1.73,1.12', rs: '1.0,0.5', wiring: 'independent' });
    expect(Math.abs(s.efficiency - ref.rs_two[0].efficiency)).toBeLessThan(1e-7);
    expect(Math.abs(i.efficiency - ref.rs_two[1].efficiency)).toBeLessThan(1e-7);
    expect(s.subcells.map((c: { rs_ohm_cm2: number }) => c.rs_ohm_cm2)).toEqual([1.0, 0.5]);
    // each independent subcell's voltage is its diode voltage less J·R_s (films.json rs_two operation)
    ref.rs_two[1].operation.forEach((o: { v_v: number }, k: number) => expect(Math.abs(i.subcells[k].v_op_v - o.v_v)).toBeLessThan(1e-6));
  });
  test('negative or non-numeric resistance is refused with the unit', () => {
    expect(() => evaluateCommand({ gaps: '1.73,1.12', rs: '-1' } as never)).toThrow(/--rs must be within 0–1000 Ω·cm²/);
    expect(() => evaluateCommand({ gaps: '1.73,1.12', rs: '1,2,3' } as never)).toThrow(/--rs takes one value or 2/);
  });
});

describe('measured files: the table formats and unit headers of spectra, line-numbered errors', () => {
  test('--eqe-file in nm and percent reproduces the reference EQE case (films.json eqe.series, η to 1e-5)', () => {
    const q = ref.eqe;
    const rows = q.energy_ev.map((e: number, k: number) => `${(1239.841984 / e).toPrecision(15)},${(q.eqe[k] * 100).toPrecision(15)}`).reverse();
    const file = join(dir, 'bottom-eqe.csv');
    writeFileSync(file, `# invented EQE for a test\nwavelength_nm,eqe_percent\n${rows.join('\n')}\n`);
    const j = evalJson({ gaps: '1.7,1.12', eqeFile: [`2=${file}`] });
    expect(Math.abs(j.efficiency - q.series.efficiency)).toBeLessThan(1e-5);
    expect(j.subcells[1].absorptance).toMatch(/^EQE measured in the stack \(bottom-eqe\.csv\)/);
  });

  test('--absorptance-file in eV and fractions reproduces the reference (films.json measured_absorptance.series)', () => {
    const m = ref.measured_absorptance;
    const file = join(dir, 'bottom-a.tsv');
    writeFileSync(file, `energy_eV\tabsorptance\n${m.energy_ev.map((e: number, k: number) => `${e}\t${m.absorptance[k]}`).join('\n')}\n`);
    const j = evalJson({ gaps: '1.7,1.12', absorptanceFile: [`2=${file}`] });
    expect(Math.abs(j.efficiency - m.series.efficiency)).toBeLessThan(1e-5);
  });

  test('a percent value in a fraction column names file and line', () => {
    const file = join(dir, 'bad.csv');
    writeFileSync(file, 'wavelength_nm,eqe\n900,0.5\n950,85\n1000,0.1\n');
    expect(() => evaluateCommand({ gaps: '1.7,1.12', eqeFile: [`2=${file}`] } as never)).toThrow(/bad\.csv:3: value 85 is above 1: the column holds fractions/);
  });

  test('a header without units, or a descending row, is refused at its line', () => {
    const noUnit = join(dir, 'nounit.csv');
    writeFileSync(noUnit, 'lambda,eqe\n900,0.5\n950,0.6\n');
    expect(() => evaluateCommand({ gaps: '1.7,1.12', eqeFile: [`2=${noUnit}`] } as never)).toThrow(/nounit\.csv:1: header column "lambda" names no abscissa unit/);
    const desc = join(dir, 'desc.csv');
    writeFileSync(desc, '# comment\nwavelength_nm,absorptance\n900,0.5\n880,0.6\n');
    expect(() => evaluateCommand({ gaps: '1.7,1.12', absorptanceFile: [`2=${desc}`] } as never)).toThrow(/desc\.csv:4: abscissa 880 is below the previous row's 900/);
  });

  test('a measured subcell with a thickness is refused', () => {
    const file = join(dir, 'ok.csv');
    writeFileSync(file, 'wavelength_nm,eqe\n900,0.5\n950,0.6\n');
    expect(() => evaluateCommand({ gaps: '1.7,1.12', eqeFile: [`2=${file}`], thickness: '-,300' } as never)).toThrow(/subcell 2: give either a --thickness or a measured file/);
  });
});

describe('radiative coupling uses the emitting film’s refractive index', () => {
  const spectrum = am15g();
  test("a subcell bound to perovskite-i-br couples with its family's index, not 3.5 (family table: src/materials/families.ts)", () => {
    const n = getFamily('perovskite-i-br').refractiveIndex;
    const bound = stackFromArgs([1.75, 1.12], { lc: 'radiative' }, [n, undefined]);
    expect(couplingIndexBelow(bound, 0)).toBe(n);
    const plain = stackFromArgs([1.75, 1.12], { lc: 'radiative' });
    expect(couplingIndexBelow(plain, 0)).toBe(3.5);
    // A lower index sends a smaller share n²/(1+n²) down and raises the top J0 less (Brown & Green 2002, from memory): η differs.
    expect(evaluateStack(bound, spectrum).efficiency).not.toBeCloseTo(evaluateStack(plain, spectrum).efficiency, 6);
    // --index overrides the family; radiative:<n> overrides both
    expect(couplingIndexBelow(stackFromArgs([1.75, 1.12], { lc: 'radiative', index: '2.8,-' }, [n, undefined]), 0)).toBe(2.8);
    expect(couplingIndexBelow(stackFromArgs([1.75, 1.12], { lc: 'radiative:3.1', index: '2.8,-' }, [n, undefined]), 0)).toBe(3.1);
  });

  test('--help states the defaults of the coupling index, the Lambertian index and the resistance', () => {
    const r = runCli(['evaluate', '--help']);
    expect(r.code).toBe(0);
    const help = r.stdout.replace(/\s+/g, ' ');
    expect(help).toContain("radiative without n uses each upper film's index: --index, else its material's, else 3.5");
    expect(help).toMatch(/--bottom-optics .*lambertian \(index: --index, its material's, else 3\.5\)/);
    expect(help).toMatch(/--rs .*default 0/);
  });
});
