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
  const path = geoPath(projection).digits(1);

  const values = valid.map((p) => p.value).filter((v): v is number => v !== null && Number.isFinite(v));
  let lo = values.length ? Math.min(...values) : 0;
  let hi = values.length ? Math.max(...values) : 1;
  if (hi - lo < 1e-12) {
    lo -= 0.5 * Math.max(Math.abs(lo) * 0.01, 1e-3);
    hi += 0.5 * Math.max(Math.abs(hi) * 0.01, 1e-3);
  }
  const colour = scale.scaleSequential(chromatic.interpolateViridis).domain([lo, hi]);
  const barScale = scale.scaleLinear().domain([lo, hi]).range([BAR.height, 0]).nice(6);
  const [nlo, nhi] = barScale.domain() as [number, number];
  colour.domain([nlo, nhi]);

  const captionLines = inp.caption.flatMap((c) => wrap(c, 130));
  const height = MAP_HEIGHT + 16 + captionLines.length * CAPTION_LINE + 8;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${SITE_MAP_WIDTH}" height="${height}" viewBox="0 0 ${SITE_MAP_WIDTH} ${height}" font-family="${FONT_FAMILY}" font-size="12">`);
  parts.push(`<title>${xml(`Sites coloured by ${inp.valueLabel}`)}</title>`);
  parts.push(`<rect width="${SITE_MAP_WIDTH}" height="${height}" fill="#ffffff"/>`);
  parts.push(`<defs><clipPath id="site-map-clip"><rect x="0" y="0" width="${mapW}" height="${MAP_HEIGHT}"/></clipPath></defs>`);
  parts.push(`<g clip-path="url(#site-map-clip)">`);
  parts.push(`<path d="${path({ type: 'Sphere' }) ?? ''}" fill="#eef4f8" stroke="#9fb3c2" stroke-width="0.8"/>`);
  parts.push(`<path d="${path(geoGraticule10()) ?? ''}" fill="none" stroke="#d5e0e8" stroke-width="0.5"/>`);
  parts.push(`<path d="${path(land) ?? ''}" fill="#e4e1d8" stroke="#a8a294" stroke-width="0.6"/>`);
  parts.push(`<path d="${path(borders) ?? ''}" fill="none" stroke="#c4bfb2" stroke-width="0.4"/>`);
  // Dots: larger values on top would hide nothing of interest; draw in site order, labelled when few.
  for (const p of valid) {
    const xy = projection([p.lonDeg, p.latDeg]);
    if (!xy) continue;
    const fill = p.value === null || !Number.isFinite(p.value) ? 'none' : colour(p.value);
    const tip = `${p.site}: ${p.value === null || !Number.isFinite(p.value) ? 'no value' : p.value} (${f2(p.latDeg)}°, ${f2(p.lonDeg)}°)`;
    parts.push(`<circle cx="${f2(xy[0])}" cy="${f2(xy[1])}" r="5.5" fill="${fill}" stroke="#222222" stroke-width="1"><title>${xml(tip)}</title></circle>`);
    if (valid.length <= LABEL_LIMIT) parts.push(`<text x="${f2(xy[0] + 8)}" y="${f2(xy[1] + 4)}" font-size="10" fill="#333333">${xml(p.site)}</text>`);
  }
  parts.push('</g>');

  // Colour bar.
  const bx = mapW + BAR.gap;
  const by = (MAP_HEIGHT - BAR.height) / 2;
  const stops = Array.from({ length: 11 }, (_, i) => `<stop offset="${i * 10}%" stop-color="${colour(nhi - ((nhi - nlo) * i) / 10)}"/>`).join('');
  parts.push(`<defs><linearGradient id="site-map-bar" x1="0" y1="0" x2="0" y2="1">${stops}</linearGradient></defs>`);
  const labelLines = wrap(inp.valueLabel, 18).slice(0, 3);
  labelLines.forEach((line, i) => parts.push(`<text x="${bx - 8}" y="${by - 14 - (labelLines.length - 1 - i) * 14}" font-size="11">${xml(line)}</text>`));
  parts.push(`<rect x="${bx}" y="${by}" width="${BAR.width}" height="${BAR.height}" fill="url(#site-map-bar)" stroke="#555555" stroke-width="0.6"/>`);
  for (const t of barScale.ticks(6)) {
    const y = by + barScale(t);
    parts.push(`<line x1="${bx + BAR.width}" x2="${bx + BAR.width + 4}" y1="${f2(y)}" y2="${f2(y)}" stroke="#555555"/>`);
    parts.push(`<text x="${bx + BAR.width + 7}" y="${f2(y + 4)}" font-size="10">${xml(barScale.tickFormat(6)(t))}</text>`);
  }
  if (values.length < valid.length) {
    parts.push(`<circle cx="${bx + 6}" cy="${by + BAR.height + 24}" r="5" fill="none" stroke="#222222"/><text x="${bx + 16}" y="${by + BAR.height + 28}" font-size="10">no value</text>`);
  }
  captionLines.forEach((line, i) => parts.push(`<text x="10" y="${MAP_HEIGHT + 20 + i * CAPTION_LINE}" font-size="11" fill="#333333">${xml(line)}</text>`));
  parts.push('</svg>');
  return parts.join('\n');
}
