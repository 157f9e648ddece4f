/**
 * A map of a batch's sites: each site a dot on a world or regional outline
 * (Natural Earth land and borders at 1:110m from the world-atlas package, drawn
 * with d3-geo in the Equal Earth projection), coloured by one column, with a
 * colour bar and a caption. SVG as text; PNG through the report's rasteriser.
 * Heavy modules load here only, when a map is drawn.
 */
import { createRequire } from 'node:module';
import { UserError } from '../errors.js';
import { FONT_FAMILY } from '../report/svg.js';
import { LabelBoard, pointBox, type Candidate } from '../report/charts/labels.js';

/** One dot: where, and the value it is coloured by (null: no value, drawn hollow). */
export interface SiteMapPoint {
  site: string;
  latDeg: number;
  lonDeg: number;
  value: number | null;
}

export interface SiteMapInput {
  points: SiteMapPoint[];
  /** What the colour shows, with its unit, e.g. "2T site-optimal top gap [eV]". */
  valueLabel: string;
  /** Lines under the map: the question, the assumptions, the caution. */
  caption: string[];
  /** 'world' always shows the whole Earth; 'auto' frames the sites when they fit in a region. */
  extent?: 'world' | 'auto';
  /** The SVG's id, also the prefix of its clip path and gradient ids (several maps on one page); default "site-map". */
  id?: string;
  /** Colour range [value units] shared with other maps; default siteColourDomain of these points. */
  domain?: SiteColourDomain;
}

/** The colour range of a site map [value units]: the bar's ends, rounded outwards to nice ticks. */
export interface SiteColourDomain {
  lo: number;
  hi: number;
}

const BAR_TICKS = 6;

/**
 * The colour range of site maps over these values: their lowest to highest,
 * widened a little when all are equal, rounded outwards to the colour bar's
 * ticks. Maps a reader compares get one range over all their values.
 */
export async function siteColourDomain(values: readonly (number | null)[]): Promise<SiteColourDomain> {
  const v = values.filter((x): x is number => x !== null && Number.isFinite(x));
  let lo = v.length ? Math.min(...v) : 0;
  let hi = v.length ? Math.max(...v) : 1;
  if (hi - lo < 1e-12) {
    lo -= 0.5 * Math.max(Math.abs(lo) * 0.01, 1e-3);
    hi += 0.5 * Math.max(Math.abs(hi) * 0.01, 1e-3);
  }
  const scale = await import('d3-scale');
  const [nlo, nhi] = scale.scaleLinear().domain([lo, hi]).range([BAR.height, 0]).nice(BAR_TICKS).domain() as [number, number];
  return { lo: nlo, hi: nhi };
}

export const SITE_MAP_WIDTH = 960;
const MAP_HEIGHT = 500;
const BAR = { width: 16, height: 260, gap: 28 };
const CAPTION_LINE = 16;
const LABEL_LIMIT = 12;

function xml(s: string): string {
  // eslint-disable-next-line no-control-regex
  return s.replace(/[\u0000-\u0008\u000B\u000C\u000E-\u001F\u007F]/g, '').replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

const f2 = (x: number) => {
  const s = x.toFixed(2);
  return s === '-0.00' ? '0.00' : s;
};

/** Cut long caption lines at word boundaries so they fit the figure's width. */
function wrap(text: string, chars: number): string[] {
  const out: string[] = [];
  let line = '';
  for (const word of text.split(/\s+/)) {
    if (line && line.length + 1 + word.length > chars) {
      out.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) out.push(line);
  return out;
}

/** The site map as a standalone SVG document's root element. */
export async function siteMapSvg(inp: SiteMapInput): Promise<string> {
  const valid = inp.points.filter((p) => Number.isFinite(p.latDeg) && Number.isFinite(p.lonDeg));
  if (valid.length === 0) throw new UserError('no site has a latitude and longitude to draw');
  const [{ geoEqualEarth, geoPath, geoGraticule10 }, topo, scale, chromatic] = await Promise.all([
    import('d3-geo'),
    import('topojson-client'),
    import('d3-scale'),
    import('d3-scale-chromatic'),
  ]);
  const require = createRequire(import.meta.url);
  const world = require('world-atlas/countries-110m.json') as import('topojson-specification').Topology;
  const land = topo.feature(world, world.objects.land as import('topojson-specification').GeometryCollection);
  const borders = topo.mesh(world, world.objects.countries as import('topojson-specification').GeometryCollection, (a, b) => a !== b);

  const mapW = SITE_MAP_WIDTH - 150;
  const projection = geoEqualEarth();
  const lons = valid.map((p) => p.lonDeg);
  const lats = valid.map((p) => p.latDeg);
  const spanLon = Math.max(...lons) - Math.min(...lons);
  const spanLat = Math.max(...lats) - Math.min(...lats);
  const regional = (inp.extent ?? 'auto') === 'auto' && spanLon < 90 && spanLat < 60;
  if (regional) {
    const pad = Math.max(5, 0.25 * Math.max(spanLon, spanLat));
    const box = {
      type: 'MultiPoint' as const,
      coordinates: [
        [Math.max(-180, Math.min(...lons) - pad), Math.max(-85, Math.min(...lats) - pad)],
        [Math.min(180, Math.max(...lons) + pad), Math.min(85, Math.max(...lats) + pad)],
        [Math.max(-180, Math.min(...lons) - pad), Math.min(85, Math.max(...lats) + pad)],
        [Math.min(180, Math.max(...lons) + pad), Math.max(-85, Math.min(...lats) - pad)],
      ],
    };
    projection.rotate([-(Math.min(...lons) + Math.max(...lons)) / 2, 0]).fitExtent([[10, 10], [mapW - 10, MAP_HEIGHT - 10]], box);
  } else {
    projection.fitExtent([[10, 10], [mapW - 10, MAP_HEIGHT - 10]], { type: 'Sphere' });
  }
  // The whole Earth is about twice as wide as tall: the map is as tall as the projected sphere, with no empty bands above and below.
  let mapH = MAP_HEIGHT;
  if (!regional) {
    const [[, y0], [, y1]] = geoPath(projection).bounds({ type: 'Sphere' });
    mapH = Math.max(BAR.height + 60, Math.ceil(y1 - y0 + 20));
    projection.fitExtent([[10, 10], [mapW - 10, mapH - 10]], { type: 'Sphere' });
  }
  const path = geoPath(projection).digits(1);

  const values = valid.map((p) => p.value).filter((v): v is number => v !== null && Number.isFinite(v));
  const { lo: nlo, hi: nhi } = inp.domain ?? (await siteColourDomain(values));
  const colour = scale.scaleSequential(chromatic.interpolateViridis).domain([nlo, nhi]).clamp(true);
  const barScale = scale.scaleLinear().domain([nlo, nhi]).range([BAR.height, 0]);
  const id = inp.id ?? 'site-map';

  const captionLines = inp.caption.flatMap((c) => wrap(c, 130));
  const height = captionLines.length > 0 ? mapH + 16 + captionLines.length * CAPTION_LINE + 8 : mapH;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" id="${xml(id)}" class="gs-chart gs-site-map" data-colour-lo="${nlo}" data-colour-hi="${nhi}" width="${SITE_MAP_WIDTH}" height="${height}" viewBox="0 0 ${SITE_MAP_WIDTH} ${height}" font-family="${FONT_FAMILY}" font-size="12" role="img">`);
  parts.push(`<title>${xml(`Sites coloured by ${inp.valueLabel}`)}</title>`);
  parts.push(`<rect width="${SITE_MAP_WIDTH}" height="${height}" fill="#ffffff"/>`);
  parts.push(`<defs><clipPath id="${xml(id)}-clip"><rect x="0" y="0" width="${mapW}" height="${mapH}"/></clipPath></defs>`);
  parts.push(`<g clip-path="url(#${xml(id)}-clip)">`);
  parts.push(`<path d="${path({ type: 'Sphere' }) ?? ''}" fill="#eef4f8" stroke="#9fb3c2" stroke-width="0.8"/>`);
  parts.push(`<path d="${path(geoGraticule10()) ?? ''}" fill="none" stroke="#d5e0e8" stroke-width="0.5"/>`);
  parts.push(`<path d="${path(land) ?? ''}" fill="#e4e1d8" stroke="#a8a294" stroke-width="0.6"/>`);
  parts.push(`<path d="${path(borders) ?? ''}" fill="none" stroke="#c4bfb2" stroke-width="0.4"/>`);
  // Dots in site order; when few, each is named where its label clears every dot and every other label (one board for the map).
  const dots = valid.flatMap((p) => {
    const xy = projection([p.lonDeg, p.latDeg]);
    return xy ? [{ p, x: xy[0], y: xy[1] }] : [];
  });
  for (const { p, x, y } of dots) {
    const fill = p.value === null || !Number.isFinite(p.value) ? 'none' : colour(p.value);
    const tip = `${p.site}: ${p.value === null || !Number.isFinite(p.value) ? 'no value' : p.value} (${f2(p.latDeg)}°, ${f2(p.lonDeg)}°)`;
    parts.push(`<circle cx="${f2(x)}" cy="${f2(y)}" r="5.5" fill="${fill}" stroke="#222222" stroke-width="1"><title>${xml(tip)}</title></circle>`);
  }
  if (dots.length <= LABEL_LIMIT) {
    // Whole names when every one fits; otherwise every site by the first part of its name (a weather file's
    // "City, Region, Country" → "City"), cut where even that does not fit. The full name stays as a tooltip.
    const shortName = (site: string) => site.split(',')[0]!.trim() || site;
    const placeAll = (text: (site: string) => string) => {
      const board = new LabelBoard({ x0: 2, y0: 2, x1: mapW - 2, y1: mapH - 2 }, 2);
      for (const d of dots) board.reserve(pointBox(d.x, d.y, 6.5));
      return dots.map(({ p, x, y }) => {
        const cands: Candidate[] = [
          { x: x + 9, y: y + 4, anchor: 'start' },
          { x: x - 9, y: y + 4, anchor: 'end' },
          { x, y: y - 10, anchor: 'middle' },
          { x, y: y + 18, anchor: 'middle' },
        ];
        return { site: p.site, t: board.placeOrShorten(cands, text(p.site), { size: 10 }) };
      });
    };
    let labels = placeAll((site) => site);
    if (labels.some((l) => l.t === null || l.t.full !== undefined)) labels = placeAll(shortName);
    for (const { site, t } of labels) {
      if (!t) continue;
      const title = t.text !== site ? `<title>${xml(site)}</title>` : '';
      parts.push(`<text class="gs-site-label" x="${f2(t.x)}" y="${f2(t.y)}" text-anchor="${t.anchor}" font-size="10" fill="#222222" stroke="#ffffff" stroke-width="2.5" paint-order="stroke">${title}${xml(t.text)}</text>`);
    }
  }
  parts.push('</g>');

  // Colour bar.
  const bx = mapW + BAR.gap;
  const by = (mapH - BAR.height) / 2;
  const stops = Array.from({ length: 11 }, (_, i) => `<stop offset="${i * 10}%" stop-color="${colour(nhi - ((nhi - nlo) * i) / 10)}"/>`).join('');
  parts.push(`<defs><linearGradient id="${xml(id)}-bar" x1="0" y1="0" x2="0" y2="1">${stops}</linearGradient></defs>`);
  const labelLines = wrap(inp.valueLabel, 18).slice(0, 3);
  labelLines.forEach((line, i) => parts.push(`<text x="${bx - 8}" y="${by - 14 - (labelLines.length - 1 - i) * 14}" font-size="11">${xml(line)}</text>`));
  parts.push(`<rect class="gs-colourbar" data-lo="${nlo}" data-hi="${nhi}" x="${bx}" y="${by}" width="${BAR.width}" height="${BAR.height}" fill="url(#${xml(id)}-bar)" stroke="#555555" stroke-width="0.6"/>`);
  for (const t of barScale.ticks(BAR_TICKS)) {
    const y = by + barScale(t);
    parts.push(`<line x1="${bx + BAR.width}" x2="${bx + BAR.width + 4}" y1="${f2(y)}" y2="${f2(y)}" stroke="#555555"/>`);
    parts.push(`<text x="${bx + BAR.width + 7}" y="${f2(y + 4)}" font-size="10">${xml(barScale.tickFormat(BAR_TICKS)(t))}</text>`);
  }
  if (values.length < valid.length) {
    parts.push(`<circle cx="${bx + 6}" cy="${by + BAR.height + 24}" r="5" fill="none" stroke="#222222"/><text x="${bx + 16}" y="${by + BAR.height + 28}" font-size="10">no value</text>`);
  }
  captionLines.forEach((line, i) => parts.push(`<text x="10" y="${mapH + 20 + i * CAPTION_LINE}" font-size="11" fill="#333333">${xml(line)}</text>`));
  parts.push('</svg>');
  return parts.join('\n');
}
