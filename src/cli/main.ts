/**
 * The gapstack command line: a thin shell over the library. Each command's
 * module loads only when it runs, so a quick call stays quick.
 */
import yargs, { type Argv } from 'yargs';
import { hideBin } from 'yargs/helpers';
import { isUserError, UserError } from '../errors.js';
import { assertFiniteText, checkRepeatedOptions, EXIT_INTERNAL, EXIT_USER, guardStandardStreams, joinNegativeValues, sanitiseForTerminal } from './guards.js';
import { commandLineMessage } from './parameter-flags.js';
import { commandModules } from './commands.js';
import { toolVersion } from '../io/version.js';

function lightOptions<T>(y: Argv<T>) {
  return y
    .option('spectrum', { type: 'string', describe: 'light: am1.5g (built-in ASTM G173-03 global tilt, the default), am1.5d (direct + circumsolar), am0 (extraterrestrial), clearsky:zenith=Z,… (SPECTRL2 clear sky; keys as gapstack sky), blackbody:<K>, or a table file' })
    .option('suns', { type: 'string', describe: 'concentration [suns], a number or "max" (full concentration ≈ 46 240)' })
    .option('irradiance', { type: 'string', describe: 'rescale the spectrum to this irradiance [W/m²]' })
    .option('units', { type: 'string', describe: 'units of a headerless file: "<nm|um|eV>,<W/m2/nm|W/m2/um|W/m2/eV|photons/m2/s/nm|…>"' })
    .option('extend-spectrum', { type: 'boolean', describe: 'continue a table that ends before 4000 nm with the AM1.5G shape, scaled to join its last point (stated in the output)' });
}

function stackOptions<T>(y: Argv<T>) {
  return y
    .option('wiring', { type: 'string', describe: 'series (2T) | independent (4T) | 3t | vm:M:N (voltage-matched strings) | groups:1+2/3 (series groups, 1 = top) | vm:M:N:1+2/3', default: 'series' })
    .option('temp', { type: 'string', describe: 'cell temperature [K] (default 300 K, the detailed-balance convention)' })
    .option('ere', { type: 'string', describe: 'external radiative efficiency (0, 1], one value or one per subcell' })
    .option('voc-loss', { type: 'string', describe: 'non-radiative Voc loss [V] instead of --ere, one value or one per subcell' })
    .option('lc', { type: 'string', describe: "luminescent coupling: η (one or one per interface), or radiative[:n] (default: isolated; radiative without n uses each upper film's index: --index, else its material's, else 3.5)" })
    .option('top-absorptance', { type: 'string', describe: 'constant absorptance of the top cell above its gap (0, 1], or "best" to thin it optimally' })
    .option('top-thickness', { type: 'string', describe: 'top-cell thickness [nm] with a direct-gap absorption edge' })
    .option('top-alpha0', { type: 'string', describe: 'top-cell α at 1 eV above the gap [cm⁻¹] (default 1.5e5, a typical direct-gap order of magnitude; set your film’s value)' })
    .option('top-urbach', { type: 'string', describe: 'top-cell Urbach energy [eV] (default 0.015)' })
    .option('top-optics', { type: 'string', describe: 'top-cell light path: single (default); double or lambertian only for a single junction (a reflector behind an upper film would pass nothing down)' })
    .option('thickness', { type: 'string', describe: 'film thickness [nm] per subcell, top first, "-" for an ideal step (e.g. 500,-): direct-gap edge α0·√(E−E_g) with an Urbach tail' })
    .option('alpha0', { type: 'string', describe: 'α at 1 eV above the gap [cm⁻¹] per film (default 1.5e5; "-" keeps the default)' })
    .option('urbach', { type: 'string', describe: 'Urbach energy [eV] per film (default 0.015; "-" keeps the default)' })
    .option('alpha-file', { type: 'string', array: true, describe: 'absorption coefficient table of a film: i=FILE (header e.g. "energy_eV,alpha_cm-1"; repeatable)' })
    .option('bottom-optics', { type: 'string', describe: 'light path of the bottom film: single (default) | double (rear mirror) | lambertian (index: --index, its material\'s, else 3.5)' })
    .option('index', { type: 'string', describe: 'refractive index of each subcell\'s film, one or one per subcell, "-" for its material\'s (else 3.5)' })
    .option('absorptance-file', { type: 'string', array: true, describe: 'measured absorptance of the isolated film: i=FILE (header e.g. "wavelength_nm,absorptance" or "…,absorptance_percent"; repeatable)' })
    .option('eqe-file', { type: 'string', array: true, describe: 'EQE measured in the stack: i=FILE (header e.g. "wavelength_nm,eqe_percent"); J0 by reciprocity (repeatable)' })
    .option('rs', { type: 'string', describe: 'series resistance [Ω·cm²], one or one per subcell, top first (default 0): V = V_diode − J·R_s' })
    .option('reflectance', { type: 'string', describe: 'front reflectance [0, 1) (default 0)' })
    .option('interlayer-t', { type: 'string', describe: 'transmittance of each interlayer (0, 1], one value or one per interface (default 1)' })
    .option('dgap-dt', { type: 'string', describe: 'dE_g/dT [eV/K], one value or one per subcell: gaps are stated at 300 K and move with each spectrum\'s cell temperature' });
}

/* Weather options (their parsing lives in weather-options.ts, loaded with the command). */
/** Register the weather options on a command. */
function weatherOptions<T>(y: Argv<T>) {
  return y
    .option('weather', { type: 'string', describe: 'weather file (EPW or NSRDB TMY3 CSV): its hourly year becomes the ensemble (needs --tilt and --azimuth)' })
    .option('tilt', { type: 'string', describe: 'with --weather: module tilt [°] from horizontal' })
    .option('azimuth', { type: 'string', describe: 'with --weather: azimuth the module faces [°] east of north (180 = south); with a tracker, its axis azimuth' })
    .option('albedo', { type: 'string', describe: 'with --weather: ground albedo (default: the file\'s, else 0.2)' })
    .option('tracking', { type: 'string', describe: 'with --weather: none (fixed plane, default) | single-axis (horizontal axis)' })
    .option('max-rotation', { type: 'string', describe: 'with --tracking single-axis: largest rotation [°] (default 60)' })
    .option('aod500', { type: 'string', describe: 'with --weather: aerosol optical depth at 500 nm for every hour (default: the file\'s, else 0.1)' })
    .option('water-cm', { type: 'string', describe: 'with --weather: precipitable water [cm] for every hour (default: the file\'s, else from dew point)' })
    .option('ozone-atm-cm', { type: 'string', describe: 'with --weather: ozone column [atm-cm] (default 0.3)' })
    .option('faiman', { type: 'string', describe: 'with --weather: Faiman cell-temperature coefficients "U0,U1" [W/m²/K, W·s/m³/K] (default 25,6.84)' });
}

type Handler = (a: Record<string, unknown>) => Promise<void>;

/**
 * yargs lays out and caches a command's whole help text every time it runs
 * the command's handler, shown or not. Unless help was asked for, every
 * option is hidden from that layout (it still parses and validates) and the
 * descriptions are left out, so help text is built only when it is shown.
 */
/** Whether this call asks for help (set by run from its own arguments). */
let HELP_SHOWN = false;

function hideFromHelpLayout(y: Argv): Argv {
  if (HELP_SHOWN) return y;
  // getOptions() is public on the yargs instance but missing from its type declarations.
  const keys = Object.keys((y as unknown as { getOptions(): { key: Record<string, unknown> } }).getOptions().key);
  for (const key of keys) y.hide(key);
  return y;
}

/** Register a command; yargs' inferred option types are not needed past this point. */
function command(cli: Argv, name: string, describe: string, builder: (y: Argv) => Argv, handler: Handler): Argv {
  return cli.command(name, HELP_SHOWN ? describe : '', ((y: Argv) => hideFromHelpLayout(builder(y))) as never, handler as never);
}

/** Run the command line on these arguments (without node and script); prints, and sets process.exitCode. */
export async function run(rawArgv: string[]): Promise<void> {
  const debug = rawArgv.includes('--debug');
  const argv = joinNegativeValues(rawArgv);
  HELP_SHOWN = argv.some((a) => a === '--help' || a === '-h');
  const print = (text: string): void => {
    // JSON output is checked as it is built (finiteJson); text is checked here.
    if (!/^\s*[[{]/.test(text)) assertFiniteText(text);
    const safe = sanitiseForTerminal(text);
    process.stdout.write(safe.endsWith('\n') ? safe : `${safe}\n`);
  };
  let cli: Argv = yargs(argv)
    .scriptName('gapstack')
    .usage(HELP_SHOWN ? '$0 <command> [options]\n\nDetailed-balance design of multijunction solar-cell stacks. Results are theoretical limits.' : '$0');
  cli = command(
      cli,
      'evaluate',
      'efficiency of one stack: Jsc, Voc, FF, operating point of every subcell',
      (y) => stackOptions(lightOptions(y)).option('gaps', { type: 'string', describe: 'band gaps [eV], top first, e.g. 1.72,1.12', demandOption: true }).option('json', { type: 'boolean', default: false }),
      async (a) => print((await commandModules.evaluate()).evaluateCommand(a as never)),
    );
  cli = command(
      cli,
      'spectrum [source]',
      'irradiance, photon flux, average photon energy and photon current above gaps of a light source',
      (y) =>
        lightOptions(y)
          .positional('source', { type: 'string', describe: 'am1.5g | blackbody:<K> | file' })
          .option('gaps', { type: 'string', describe: 'gaps [eV] for the photon-current table' })
          .option('ape-window', { type: 'string', describe: 'window for the average photon energy [nm], low:high (default 350:1050)' })
          .option('json', { type: 'boolean', default: false }),
      async (args) => {
        if (args.source !== undefined) args.spectrum = args.source;
        print((await commandModules.spectrum()).spectrumCommand(args as never));
      },
    );
  const searchOptions = (y: Argv) =>
    stackOptions(lightOptions(y))
      .option('cells', { type: 'string', describe: 'number of subcells, 1–6', default: '2' })
      .option('fix', { type: 'string', array: true, describe: 'fix a subcell gap: i=E [eV], 1 = top (repeatable), e.g. --fix 2=1.12' })
      .option('range', { type: 'string', array: true, describe: 'limit a subcell gap: i=low:high [eV] (repeatable)' })
      .option('material', { type: 'string', array: true, describe: 'bind a subcell to an absorber family: i=<id> (see gapstack materials)' })
      .option('full-range', { type: 'boolean', default: false, describe: 'let material-bound subcells use the family\'s full reach, not its practical window (warns)' })
      .option('span', { type: 'string', describe: 'global gap span [eV], low:high (default 0.5:2.6)' })
      .option('ensemble', { type: 'string', describe: 'a set of spectra (folder, manifest or wide table): maximise the yield-weighted efficiency' })
      .option('accept-large', { type: 'boolean', default: false, describe: 'run even when the size check (stacks × spectra) estimates hours of work' });
  const searchWithWeather = (y: Argv) => weatherOptions(searchOptions(y));
  cli = command(
    cli,
    'optimize',
    'global optimum gaps, runner-up basins and the tolerance region',
    (y) =>
      searchWithWeather(y)
        .option('step', { type: 'string', describe: 'coarse grid step [eV] (default 5–40 meV by free subcells); refinement goes below 1 meV' })
        .option('loss', { type: 'string', describe: 'relative efficiency loss that bounds the tolerance region (default 0.01)' })
        .option('free-top-absorptance', { type: 'boolean', default: false, describe: '2T: let the search thin the top cell (constant absorptance above its gap)' })
        .option('threads', { type: 'string', describe: 'most worker threads for large searches (default: the number of cores; the size of the work decides)' })
        .option('json', { type: 'boolean', default: false }),
    async (a) => print(await (await commandModules.optimize()).optimizeCommand(a as never)),
  );
  cli = command(
    cli,
    'map',
    'efficiency over two subcell gaps (others fixed, or maximised: a profile map) as CSV or JSON',
    (y) =>
      searchWithWeather(y)
        .option('axes', { type: 'string', describe: 'the two mapped subcells "i,j", upper first (default 1,2)' })
        .option('x', { type: 'string', describe: 'gap range of the upper mapped subcell [eV], low:high', demandOption: true })
        .option('y', { type: 'string', describe: 'gap range of the lower mapped subcell [eV], low:high', demandOption: true })
        .option('step', { type: 'string', describe: 'map resolution [eV]', demandOption: true })
        .option('out', { type: 'string', describe: 'write the map to a .csv or .json file (atomically)' })
        .option('json', { type: 'boolean', default: false }),
    async (a) => print(await (await commandModules.map()).mapCommand(a as never)),
  );
  cli = command(
    cli,
    'yield',
    'yield-weighted efficiency of one stack over a set of spectra (each re-solved: 2T re-matches its current)',
    (y) =>
      weatherOptions(stackOptions(y))
        .option('gaps', { type: 'string', describe: 'band gaps [eV], top first', demandOption: true })
        .option('ensemble', { type: 'string', describe: 'folder of spectra, manifest (CSV/YAML) or wide table (or give --weather)' })
        .option('units', { type: 'string', describe: 'units of headerless member files' })
        .option('ape-window', { type: 'string', describe: 'window for the average photon energy [nm], low:high (default 350:1050)' })
        .option('json', { type: 'boolean', default: false }),
    async (a) => print((await commandModules.yield()).yieldCommand(a as never)),
  );
  cli = command(
    cli,
    'report <design>',
    'HTML report with efficiency maps for a design file (YAML or JSON), plus standalone figures and data',
    (y) =>
      y
        .positional('design', { type: 'string', describe: 'design file (see examples/ and schema/design.schema.json)' })
        .option('output', { alias: 'o', type: 'string', describe: 'report file to write (default report.html), atomically' })
        .option('figures', { type: 'string', describe: 'also write every chart as SVG and PNG, with its data as CSV and JSON, into this folder' })
        .option('sites-rows', { type: 'string', describe: 'a design with sites: take the Sites rows from this batch already run (gapstack sites, merged; .csv or .jsonl) instead of running it again' })
        .option('accept-large', { type: 'boolean', default: false, describe: 'a design with sites: run its batch even when the size check (stacks × hours of a year) estimates hours of work per site' })
        .option('json', { type: 'boolean', default: false, describe: 'print a JSON summary of the answer' }),
    async (a) => print(await (await commandModules.report()).reportCommand(a as never)),
  );
  cli = command(
    cli,
    'sky',
    'sun position (--lat --lon --time), a SPECTRL2 clear-sky spectrum (--zenith …), or a weather file\'s hourly year as an ensemble (--weather … --out)',
    (y) =>
      y
        .option('lat', { type: 'string', describe: 'latitude [°], north positive' })
        .option('lon', { type: 'string', describe: 'longitude [°], east positive' })
        .option('time', { type: 'string', describe: 'ISO 8601 time with UTC offset, e.g. 2003-10-17T12:30:30-07:00' })
        .option('elevation', { type: 'string', describe: 'site elevation [m] (default 0)' })
        .option('pressure-hpa', { type: 'string', describe: 'surface pressure [hPa] (default 1013.25)' })
        .option('air-temp', { type: 'string', describe: 'air temperature [°C] for refraction (default 12)' })
        .option('delta-t', { type: 'string', describe: 'TT − UT1 [s] (default 69)' })
        .option('zenith', { type: 'string', describe: 'apparent solar zenith [°]: print a SPECTRL2 clear-sky spectrum' })
        .option('aoi', { type: 'string', describe: 'angle of incidence on the plane [°] (default: the zenith)' })
        .option('tilt', { type: 'string', describe: 'plane tilt [°] (default 0)' })
        .option('day', { type: 'string', describe: 'day of year 1–366 (default 81)' })
        .option('water-cm', { type: 'string', describe: 'precipitable water [cm] (default 1.42)' })
        .option('ozone-atm-cm', { type: 'string', describe: 'ozone column [atm-cm] (default 0.34)' })
        .option('aod500', { type: 'string', describe: 'aerosol optical depth at 500 nm (default 0.1)' })
        .option('albedo', { type: 'string', describe: 'ground albedo (default 0.2)' })
        .option('air-mass', { type: 'string', describe: 'relative air mass (default Kasten–Young of the zenith)' })
        .option('alpha', { type: 'string', describe: 'Ångström exponent (default 1.14, rural)' })
        .option('omega0', { type: 'string', describe: 'single-scattering albedo at 400 nm (default 0.945, rural)' })
        .option('asymmetry', { type: 'string', describe: 'aerosol asymmetry factor (default 0.65, rural)' })
        .option('weather', { type: 'string', describe: 'weather file (EPW or NSRDB TMY3 CSV): build its hourly year on the plane --tilt/--azimuth' })
        .option('azimuth', { type: 'string', describe: 'with --weather: azimuth the module faces [°] east of north (180 = south); with a tracker, its axis azimuth' })
        .option('tracking', { type: 'string', describe: 'with --weather: none (default) | single-axis (horizontal axis)' })
        .option('max-rotation', { type: 'string', describe: 'with --tracking single-axis: largest rotation [°] (default 60)' })
        .option('faiman', { type: 'string', describe: 'with --weather: Faiman coefficients "U0,U1" (default 25,6.84)' })
        .option('out', { type: 'string', describe: 'with --weather: folder to write the hourly spectra and manifest (an ensemble)' })
        .option('json', { type: 'boolean', default: false }),
    async (a) => print(await (await commandModules.sky()).skyCommand(a as never)),
  );
  cli = command(
    cli,
    'figure <design>',
    'one chart of a design for a proposal (map, comparison or sensitivity) as SVG, PNG or PDF at a printed size, without the whole report',
    (y) =>
      y
        .positional('design', { type: 'string', describe: 'design file (see examples/)' })
        .option('chart', { type: 'string', default: 'map', describe: 'map | compare (AM1.5G beside an ensemble) | sensitivity' })
        .option('wiring', { type: 'string', describe: "one of the design's wirings (default: the first)" })
        .option('pair', { type: 'string', describe: 'mapped subcells "i,j", upper first (default: the first map pair)' })
        .option('output', { alias: 'o', type: 'string', describe: 'file to write: .svg, .png or .pdf (PDF needs Chromium)' })
        .option('width-mm', { type: 'string', describe: 'printed width [mm] (default 120)' })
        .option('height-mm', { type: 'string', describe: 'printed height of a map [mm] (default keeps its aspect)' })
        .option('font-pt', { type: 'string', describe: 'printed size of the base text [pt] (default 8)' })
        .option('ink', { type: 'string', default: 'dark-on-white', describe: 'dark-on-white (paper) | light-on-dark (slides)' })
        .option('dpi', { type: 'string', describe: 'PNG resolution [dots per inch] (default 300)' })
        .option('colour-range', { type: 'string', describe: "fixed colour scale low:high [%] (default: the report's scale for the pair, shared by every wiring)" })
        .option('scenario', { type: 'string', describe: 'in a file with scenarios: which one (name or number)' })
        .option('json', { type: 'boolean', default: false }),
    async (a) => print(await (await commandModules.figure()).figureCommand(a as never)),
  );
  cli = command(
    cli,
    'materials [id] [file]',
    'absorber families: composition ↔ gap and practical windows; "materials fit FILE" fits a gap model to your measured points',
    (y) =>
      y
        .positional('id', { type: 'string', describe: 'family id, e.g. perovskite-i-br; or "fit"' })
        .positional('file', { type: 'string', describe: 'with fit: (composition, gap) points, header e.g. "composition,gap_eV"' })
        .option('gap', { type: 'string', describe: 'gap [eV] → composition(s)' })
        .option('composition', { type: 'string', describe: 'composition x → gap [eV]' })
        .option('model', { type: 'string', describe: 'with fit: bowing (default) or poly:N (polynomial of degree N)' })
        .option('write', { type: 'string', describe: 'with fit: write a family definition (YAML) for a design file\'s materials:' })
        .option('family-id', { type: 'string', describe: 'with fit --write: the family id (default from the file name)' })
        .option('name', { type: 'string', describe: 'with fit --write: the family name' })
        .option('variable', { type: 'string', describe: 'with fit --write: what x means' })
        .option('dedt', { type: 'string', describe: 'with fit --write: dE_g/dT [eV/K] (required)' })
        .option('index', { type: 'string', describe: 'with fit --write: refractive index [-] (required)' })
        .option('json', { type: 'boolean', default: false }),
    async (a) => {
      if (a.id === 'fit') {
        const { materialsFitCommand } = await commandModules['materials-fit']();
        print(await materialsFitCommand(a as never));
        return;
      }
      print((await commandModules.materials()).materialsCommandFromArgs(a));
    },
  );
  cli = command(
    cli,
    'sites',
    'one design question over many weather files, in shards a scheduler can run; merge the shards',
    (y) =>
      command(
        y,
        'merge <parts..>',
        'combine the part files of every shard into the file one unsharded run writes (refuses parts of different questions)',
        (m) =>
          m
            .positional('parts', { type: 'string', array: true, describe: 'part files of all shards (all .csv or all .jsonl)' })
            .option('out', { alias: 'o', type: 'string', describe: 'merged file to write (atomically)', demandOption: true })
            .option('json', { type: 'boolean', default: false }),
        async (a) => print((await commandModules.sites()).sitesMergeCommand(a as never)),
      )
        .command(
          'map <rows>',
          'draw the sites of a rows file (.csv or .jsonl) on a world or regional outline, coloured by a column: SVG and PNG',
          (m: Argv) =>
            m
              .positional('rows', { type: 'string', describe: 'a merged or single-part rows file' })
              .option('colour', { type: 'string', default: 'top-gap', describe: 'top-gap | 2t-loss | 4t-gain | a numeric column name' })
              .option('wiring', { type: 'string', describe: 'wiring column prefix for top-gap (default: the first, e.g. 2t)' })
              .option('world', { type: 'boolean', default: false, describe: 'show the whole world even when the sites fit in a region' })
              .option('out', { alias: 'o', type: 'string', describe: 'file name for <out>.svg and <out>.png', demandOption: true }),
          (async (a: Record<string, unknown>) => print(await (await commandModules.sites()).sitesMapCommand(a as never))) as never,
        )
        .command(
          '$0 <design> [weather..]',
          'answer the design\'s question at every weather file (this task\'s shard of them): one row per site, streamed and resumable; without weather files, at the sites its sites: names',
          (r: Argv) =>
            r
              .positional('design', { type: 'string', describe: 'design file: subcells, wirings, temperature (its own light is replaced by each site\'s)' })
              .positional('weather', { type: 'string', array: true, describe: 'weather files (EPW, TMY3 CSV) or folders of them' })
              .option('out', { type: 'string', describe: 'folder for part-K-of-N.csv and .jsonl', demandOption: true })
              .option('shard', { type: 'string', describe: 'this task\'s share K/N (K from 1); default: from SLURM_ARRAY_TASK_* or JOB_COMPLETION_INDEX, else all' })
              .option('shard-count', { type: 'string', describe: 'number of shards where the scheduler does not say it (Kubernetes: spec.completions)' })
              .option('tilt', { type: 'string', describe: 'module plane tilt from horizontal [°], or "latitude" (each site\'s own); needed with weather files' })
              .option('azimuth', { type: 'string', describe: 'direction the plane faces, east of north [°] (180 = south), or "equator"; needed with weather files' })
              .option('albedo', { type: 'string', describe: 'ground albedo, overriding the files\' (default 0.2 where a file has none)' })
              .option('tracking', { type: 'string', describe: 'none | single-axis (default none)' })
              .option('max-rotation', { type: 'string', describe: 'single-axis tracker limit [°] (default 60)' })
              .option('aod500', { type: 'string', describe: 'aerosol optical depth at 500 nm, overriding the files\'' })
              .option('water-cm', { type: 'string', describe: 'precipitable water [cm], overriding the files\' and the dew-point estimate' })
              .option('ozone-atm-cm', { type: 'string', describe: 'ozone column [atm-cm] (default 0.3)' })
              .option('faiman', { type: 'string', describe: 'Faiman cell-temperature coefficients "U0,U1"' })
              .option('accept-large', { type: 'boolean', default: false, describe: 'run even when the size check (stacks × hours of a year) estimates hours of work per site' })
              .option('json', { type: 'boolean', default: false }),
          (async (a: Record<string, unknown>) => print(await (await commandModules.sites()).sitesWeatherCommand(a as never))) as never,
        ),
    async () => {},
  );
  cli = cli
    .demandCommand(1, 'name a command; see gapstack --help')
    .option('debug', { type: 'boolean', describe: 'print internal details on failure', default: false })
    .strict()
    .help()
    .alias('h', 'help')
    // The version from gapstack's own package.json: yargs would look for the nearest one above the process's entry, which an installed copy does not own.
    .version(toolVersion())
    .wrap(Math.min(110, process.stdout.columns || 100))
    .fail((msg, err) => {
      throw err ?? new UserError(msg);
    });
  if (!HELP_SHOWN) {
    // yargs lays out the whole help text after every command it runs, to show it on a
    // later failure; failures here throw instead (.fail above), so that text is never shown.
    // getInternalMethods() is public on the instance but missing from its type declarations.
    const usage = (cli as unknown as { getInternalMethods(): { getUsageInstance(): { cacheHelpMessage(): void } } }).getInternalMethods().getUsageInstance();
    usage.cacheHelpMessage = () => {};
  }
  try {
    // Fault injection for the test of the internal-error path (see DEVELOPERS.md).
    if (process.env.GAPSTACK_FAULT_INJECTION === 'internal') throw new Error('injected fault');
    checkRepeatedOptions(argv);
    await cli.parseAsync();
  } catch (err) {
    if (isUserError(err) || (err as Error)?.name === 'YError') {
      // One line; a design with several problems lists the others below it (its first line says so).
      const [, ...more] = (err as Error).message.split('\n');
      const first = commandLineMessage(err as Error);
      const listed = isUserError(err) && /listed below\)$/.test(first) ? more : [];
      process.stderr.write(`${sanitiseForTerminal([`gapstack: ${first}`, ...listed.map((d) => `  ${d}`)].join('\n'))}\n`);
      process.exitCode = EXIT_USER;
      return;
    }
    const e = err as Error;
    process.stderr.write(`gapstack: internal error: ${sanitiseForTerminal(e?.message ?? String(e))}${debug ? `\n${e?.stack ?? ''}` : ' (rerun with --debug for details)'}\n`);
    process.exitCode = EXIT_INTERNAL;
  }
}

/** The command line of this process (bin/gapstack.cjs calls it). */
export async function main(): Promise<void> {
  // A closed pipe or a full disk on this process's own output: see guardStandardStreams.
  guardStandardStreams();
  await run(hideBin(process.argv));
}
