/**
 * One figure of a design, for a proposal, without the whole report: an
 * efficiency map, an AM1.5G-versus-ensemble comparison or a sensitivity chart,
 * laid out for a printed size [mm] and font size [pt], dark ink on white
 * paper or light ink on a dark slide.
 *
 * Sizing: the charts are drawn in user units whose base text is 11 units
 * high. A font of `fontPt` points therefore fixes the millimetres per unit,
 * and the requested width [mm] fixes the layout width in units: a smaller
 * figure at the same font gets a tighter layout, not smaller text. The
 * side-by-side comparison has a fixed layout; it is scaled to the width and
 * its effective font size is reported.
 */
import { UserError } from '../errors.js';
import type { Design } from '../design/index.js';
import { computeReport } from './compute.js';
import { compareColourRange } from './charts/compare-chart.js';
import { MAP_HEIGHT, MAP_WIDTH } from './charts/map-chart.js';
import { sharedColourDomain, type ColourDomain } from './charts/map-layers.js';
import { compareChart, mapChart, sensitivityChart, type Chart } from './figure-data.js';

/** Millimetres per point (1 pt = 1/72 in). */
const MM_PER_PT = 25.4 / 72;
/** Height of the charts' base text [user units]. */
const BASE_FONT_UNITS = 11;
/** Narrowest layouts that still hold their axes, colour bar and legend [user units]. */
const MIN_WIDTH_UNITS = { map: 420, sensitivity: 380 };

export type FigureKind = 'map' | 'compare' | 'sensitivity';
export type Ink = 'dark-on-white' | 'light-on-dark';

export interface FigureRequest {
  kind: FigureKind;
  /** Wiring key as in the design's `wirings` (default: the first). */
  wiring?: string;
  /** Mapped subcells, 1-based, upper first (default: the design's first map pair). */
  pair?: [number, number];
  widthMm: number;
  /** Maps only; default keeps the report's aspect ratio. */
  heightMm?: number;
  fontPt: number;
  ink: Ink;
  /** Fixed colour range [%] for maps and comparisons; by default the report's (one scale over every wiring's map of the pair). */
  colourRange?: ColourDomain;
}

export interface StandaloneFigure {
  /** The SVG with its printed size in mm. */
  svg: string;
  widthMm: number;
  heightMm: number;
  /** Font size of the base text as printed [pt]. */
  fontPt: number;
  chart: Chart;
  /** Colour range [%] of a map or comparison, else null. */
  colourRange: ColourDomain | null;
}

/** Light ink on a dark backdrop: frame, axes, legend and titles turn light; labels inside the plot keep their haloes. */
const LIGHT_ON_DARK = {
  background: '#1d232b',
  css: [
    'svg > g > text, svg > text, .gs-axis text, .gs-colourbar text, .gs-legend text, .gs-panel-title { fill: #f2f2f2; }',
    '.gs-axis path, .gs-axis line, .gs-colourbar line, .gs-colourbar path, .gs-plot-area { stroke: #d8d8d8; }',
    '.gs-grid line { stroke: #3a4350; }',
  ].join(' '),
};

/** The root <svg> tag with its printed size in mm (viewBox kept), and the ink variant applied. */
export function sizedSvg(svg: string, widthMm: number, heightMm: number, ink: Ink): string {
  const open = /^<svg\b[^>]*>/.exec(svg);
  if (!open) throw new Error('not an SVG');
  let tag = open[0].replace(/\swidth="[^"]*"/, ` width="${widthMm.toFixed(2)}mm"`).replace(/\sheight="[^"]*"/, ` height="${heightMm.toFixed(2)}mm"`);
  let inner = svg.slice(open[0].length);
  if (ink === 'light-on-dark') {
    tag = tag.replace(/>$/, ` data-ink="light-on-dark">`);
    inner = `<style>${LIGHT_ON_DARK.css}</style><rect class="gs-backdrop" width="100%" height="100%" fill="${LIGHT_ON_DARK.background}"/>${inner}`;
  } else tag = tag.replace(/>$/, ` data-ink="dark-on-white">`);
  return `${tag}${inner}`;
}

/** Width and height of an SVG's viewBox [user units]. */
function viewBoxSize(svg: string): { w: number; h: number } {
  const m = /viewBox="0 0 ([\d.]+) ([\d.]+)"/.exec(svg);
  if (!m) throw new Error('SVG without a viewBox');
  return { w: Number(m[1]), h: Number(m[2]) };
}

function wiringIndex(design: Design, key: string | undefined): number {
  if (key === undefined) return 0;
  const k = design.wirings.findIndex((w) => w.key === key);
  if (k < 0) throw new UserError(`--wiring: "${key}" is not among the design's wirings (${design.wirings.map((w) => w.key).join(', ')})`);
  return k;
}

function pairIndex(design: Design, pair: [number, number] | undefined): number {
  if (design.pairs.length === 0) throw new UserError(`${design.path}: the design has no map pair; add map.pairs, or draw --chart sensitivity`);
  if (pair === undefined) return 0;
  const j = design.pairs.findIndex((p) => p.xCell === pair[0] - 1 && p.yCell === pair[1] - 1);
  if (j < 0) throw new UserError(`--pair: ${pair.join(',')} is not among the design's map pairs (${design.pairs.map((p) => `${p.xCell + 1},${p.yCell + 1}`).join('; ')})`);
  return j;
}

/** Draw one figure of a design at a printed size. */
export function standaloneFigure(design: Design, req: FigureRequest): StandaloneFigure {
  if (!(req.fontPt >= 4 && req.fontPt <= 24)) throw new UserError(`--font-pt must be within 4–24 pt, got ${req.fontPt}`);
  if (!(req.widthMm >= 30 && req.widthMm <= 500)) throw new UserError(`--width-mm must be within 30–500 mm, got ${req.widthMm}`);
  if (req.heightMm !== undefined && req.kind !== 'map') throw new UserError('--height-mm applies to maps only; the other charts take their height from their width and legend');
  const mmPerUnit = (req.fontPt * MM_PER_PT) / BASE_FONT_UNITS;
  const wiring = wiringIndex(design, req.wiring);
  if (req.kind === 'compare' && design.light.kind !== 'ensemble') throw new UserError(`${design.path}: --chart compare needs a design whose light is an ensemble (it sets AM1.5G beside the ensemble)`);
  const pairs = req.kind === 'sensitivity' ? [] : [pairIndex(design, req.pair)];
  // Maps and comparisons share the report's colour scale (every wiring's map of the pair) unless a range is given.
  const shared = req.kind !== 'sensitivity' && req.colourRange === undefined;
  const wirings = shared ? design.wirings.map((_, k) => k) : [wiring];
  const data = computeReport(design, undefined, { wirings, pairs, comparison: req.kind === 'compare' });
  const at = wirings.indexOf(wiring);
  const o = data.outcomes[at];
  let chart: Chart;
  let colourRange: ColourDomain | null = null;
  if (req.kind === 'map') {
    const width = req.widthMm / mmPerUnit;
    if (width < MIN_WIDTH_UNITS.map) throw new UserError(`--width-mm: a map at ${req.fontPt} pt needs at least ${Math.ceil(MIN_WIDTH_UNITS.map * mmPerUnit)} mm; widen it or use a smaller --font-pt`);
    const height = req.heightMm === undefined ? (width * MAP_HEIGHT) / MAP_WIDTH : req.heightMm / mmPerUnit;
    if (height < 360) throw new UserError(`--height-mm: a map at ${req.fontPt} pt needs at least ${Math.ceil(360 * mmPerUnit)} mm`);
    const m = o.maps[0];
    colourRange = req.colourRange ?? sharedColourDomain(data.outcomes.map((x) => x.maps[0].map));
    chart = mapChart(data, o, m, colourRange, { width, height }).chart;
  } else if (req.kind === 'sensitivity') {
    const width = req.widthMm / mmPerUnit;
    if (width < MIN_WIDTH_UNITS.sensitivity) throw new UserError(`--width-mm: a sensitivity chart at ${req.fontPt} pt needs at least ${Math.ceil(MIN_WIDTH_UNITS.sensitivity * mmPerUnit)} mm`);
    chart = sensitivityChart(data, o, width, req.ink === 'light-on-dark' ? 'dark' : 'light');
  } else {
    const c = data.comparison;
    const w = c?.wirings[at];
    const cm = w?.maps[0];
    if (!c || !w || !cm) throw new Error('comparison missing');
    colourRange = req.colourRange ?? compareColourRange(c.wirings.flatMap((x) => [x.maps[0].reference, x.maps[0].ensemble.map]));
    chart = compareChart(data, c, w, cm, colourRange).chart;
  }
  const vb = viewBoxSize(chart.svg);
  // The comparison keeps its layout: its text scales with the width.
  const scale = req.kind === 'compare' ? req.widthMm / vb.w : mmPerUnit;
  const widthMm = vb.w * scale;
  const heightMm = vb.h * scale;
  return { svg: sizedSvg(chart.svg, widthMm, heightMm, req.ink), widthMm, heightMm, fontPt: (BASE_FONT_UNITS * scale) / MM_PER_PT, chart, colourRange };
}
