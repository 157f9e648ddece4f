/**
 * Efficiency over two gaps as filled contour bands on a perceptually uniform
 * scale (viridis), with labelled isolines, the tolerance outline at
 * (1 − loss)·best, the current-matching locus (series), practical windows of
 * bound families as shaded bands, fixed absorbers as lines, and the
 * recommended optimum as a marker that carries its gaps as data attributes.
 */
import { contours } from 'd3-contour';
import { scaleLinear } from 'd3-scale';
import { interpolateViridis } from 'd3-scale-chromatic';
import type { MapOutcome } from '../compute.js';
import { buildSvg, d3, linePath, num, styleAxis, svgText, type Sel } from '../svg.js';

export const MAP_WIDTH = 680;
export const MAP_HEIGHT = 590;
const M = { top: 30, right: 118, bottom: 88, left: 68 };

/** Palette of the overlays, chosen to read on every part of viridis. */
export const MAP_COLOURS = {
  tolerance: '#ffffff',
  matching: '#ff5a36',
  fixed: '#111111',
  window: '#ffffff',
  invalid: '#e6e6e6',
  marker: '#111111',
};

export interface MapChartInput {
  outcome: MapOutcome;
  /** Element id; also prefixes inner ids. */
  id: string;
  /** Id of the <script type="application/json"> holding the grid for the hover readout. */
  gridId: string;
  wiringLabel: string;
  xLabel: string;
  yLabel: string;
  loss: number;
}

export type Ring = [number, number][];
export type Pos = number[];

/** Values in percent with unordered pixels filled from their row's nearest ordered neighbour (for contouring only). */
export function filledGrid(values: Float64Array, nx: number, ny: number, scale: number): { grid: number[]; lo: number; hi: number } {
  let lo = Infinity;
  let hi = -Infinity;
  for (const v of values) {
    if (Number.isNaN(v)) continue;
    lo = Math.min(lo, v * scale);
    hi = Math.max(hi, v * scale);
  }
  const grid = new Array<number>(nx * ny);
  for (let iy = 0; iy < ny; iy++) {
    let next = NaN;
    for (let ix = nx - 1; ix >= 0; ix--) {
      const v = values[iy * nx + ix];
      if (!Number.isNaN(v)) next = v * scale;
      grid[iy * nx + ix] = Number.isNaN(v) ? next : v * scale;
    }
    let prev = NaN;
    for (let ix = 0; ix < nx; ix++) {
      const k = iy * nx + ix;
      if (!Number.isNaN(grid[k])) prev = grid[k];
      else grid[k] = Number.isNaN(prev) ? lo : prev;
    }
  }
  return { grid, lo, hi };
}

/** The first step in `steps` that splits `range` into at most `target` parts. */
export function niceStep(range: number, target: number, steps: number[]): number {
  for (const s of steps) if (range / s <= target) return s;
  return steps[steps.length - 1];
}

/** The polygon of the rectangle [x0,x1]×[y0,y1] where y ≥ x (gaps out of order). */
export function unorderedRegion(x0: number, x1: number, y0: number, y1: number): Ring {
  const corners: Ring = [
    [x0, y0],
    [x1, y0],
    [x1, y1],
    [x0, y1],
  ];
  const inside = (p: [number, number]) => p[1] >= p[0];
  const out: Ring = [];
  for (let i = 0; i < 4; i++) {
    const a = corners[i];
    const b = corners[(i + 1) % 4];
    if (inside(a)) out.push(a);
    if (inside(a) !== inside(b)) {
      const da = a[1] - a[0];
      const db = b[1] - b[0];
      const t = da / (da - db);
      out.push([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]);
    }
  }
  return out;
}

export function mapChartSvg(inp: MapChartInput): string {
  const o = inp.outcome;
  const m = o.map;
  const nx = m.x.length;
  const ny = m.y.length;
  const w = MAP_WIDTH - M.left - M.right;
  const h = MAP_HEIGHT - M.top - M.bottom;
  const x0 = m.x[0];
  const x1 = m.x[nx - 1];
  const y0 = m.y[0];
  const y1 = m.y[ny - 1];
  const xs = scaleLinear().domain([x0, x1]).range([0, w]);
  const ys = scaleLinear().domain([y0, y1]).range([h, 0]);
  const dx = nx > 1 ? (x1 - x0) / (nx - 1) : 1;
  const dy = ny > 1 ? (y1 - y0) / (ny - 1) : 1;
  // d3-contour puts sample (i, j) at grid coordinate (i + 0.5, j + 0.5).
  const px = (c: number) => xs(x0 + (c - 0.5) * dx);
  const py = (c: number) => ys(y0 + (c - 0.5) * dy);
  const ringPath = (rings: Pos[][]) => rings.map((r) => `${linePath(r.map((p) => [px(p[0]), py(p[1])] as [number, number]), 1)}Z`).join('');
  const polyPath = (mp: { coordinates: Pos[][][] }) => mp.coordinates.map(ringPath).join('');
  const { grid, lo: vmin, hi: vmax } = filledGrid(m.values, nx, ny, 100);
  const hi = vmax;
  const lo = Math.max(vmin, hi - 12);
  const colour = (v: number) => interpolateViridis(Math.min(1, Math.max(0, (v - lo) / Math.max(1e-9, hi - lo))));
  const bandStep = niceStep(hi - lo, 30, [0.1, 0.25, 0.5, 1, 2]);
  const bandLevels: number[] = [];
  for (let t = Math.ceil(lo / bandStep) * bandStep; t < hi; t += bandStep) bandLevels.push(Number(t.toFixed(4)));
  const isoStep = niceStep(hi - lo, 7, [0.2, 0.5, 1, 2, 5]);
  const isoLevels: number[] = [];
  for (let t = Math.ceil((lo + 1e-9) / isoStep) * isoStep; t < hi - 1e-9; t += isoStep) isoLevels.push(Number(t.toFixed(4)));
  const gen = contours().size([nx, ny]);
  const clipId = `${inp.id}-clip`;
  const optX = xs(o.optimum.x);
  const optY = ys(o.optimum.y);

  return buildSvg(
    MAP_WIDTH,
    MAP_HEIGHT,
    {
      id: inp.id,
      class: 'gs-chart gs-map',
      'data-grid': inp.gridId,
      'data-x-min': num(x0, 6),
      'data-x-max': num(x1, 6),
      'data-y-min': num(y0, 6),
      'data-y-max': num(y1, 6),
      'data-plot-left': M.left,
      'data-plot-top': M.top,
      'data-plot-width': w,
      'data-plot-height': h,
      role: 'img',
    },
    (svg) => {
      svg.append('title').text(svgText(`Efficiency map, ${inp.wiringLabel}: ${inp.xLabel} against ${inp.yLabel}`));
      svg.append('defs').append('clipPath').attr('id', clipId).append('rect').attr('width', w).attr('height', h);
      const g = svg.append('g').attr('transform', `translate(${M.left},${M.top})`);
      const plot = g.append('g').attr('clip-path', `url(#${clipId})`);
      plot.append('rect').attr('class', 'gs-map-base').attr('width', w).attr('height', h).attr('fill', colour(lo));
      const bands = plot.append('g').attr('class', 'gs-bands');
      for (const c of gen.thresholds(bandLevels)(grid)) {
        if (c.coordinates.length === 0) continue;
        bands.append('path').attr('class', 'gs-band').attr('data-level', num(c.value, 2)).attr('fill', colour(c.value + bandStep / 2)).attr('d', polyPath(c));
      }
      // Windows, ranges and fixed absorbers.
      const marks = plot.append('g').attr('class', 'gs-marks');
      const markLabels: [number, number][] = [];
      const markTexts: { x: number; y: number; text: string }[] = [];
      for (const mk of o.marks) {
        const horizontal = mk.axis === 'y';
        const a = horizontal ? ys(mk.hiEv) : xs(mk.loEv);
        const b = horizontal ? ys(mk.loEv) : xs(mk.hiEv);
        if (mk.kind === 'fixed') {
          const line = horizontal ? { x1: 0, x2: w, y1: a, y2: a } : { x1: a, x2: a, y1: 0, y2: h };
          for (const [stroke, width] of [
            ['#ffffff', 4],
            [MAP_COLOURS.fixed, 1.6],
          ] as const) {
            marks.append('line').attr('class', width === 4 ? 'gs-fixed-halo' : 'gs-fixed').attr('data-gap', num(mk.loEv, 4)).attr('x1', num(line.x1)).attr('x2', num(line.x2)).attr('y1', num(line.y1)).attr('y2', num(line.y2)).attr('stroke', stroke).attr('stroke-width', width);
          }
        } else {
          const r = horizontal ? { x: 0, y: a, width: w, height: b - a } : { x: a, y: 0, width: b - a, height: h };
          marks
            .append('rect')
            .attr('class', mk.kind === 'window' ? 'gs-window' : 'gs-range')
            .attr('data-lo', num(mk.loEv, 4))
            .attr('data-hi', num(mk.hiEv, 4))
            .attr('x', num(r.x))
            .attr('y', num(r.y))
            .attr('width', num(Math.max(0, r.width)))
            .attr('height', num(Math.max(0, r.height)))
            .attr('fill', mk.kind === 'window' ? MAP_COLOURS.window : 'none')
            .attr('fill-opacity', mk.kind === 'window' ? 0.2 : 0)
            .attr('stroke', MAP_COLOURS.window)
            .attr('stroke-width', 1.2)
            .attr('stroke-dasharray', mk.kind === 'window' ? '6,3' : '2,3');
        }
        const tx = horizontal ? 6 : Math.min(w - 6, Math.max(6, a + 4));
        const ty = horizontal ? Math.max(12, a - 5) : 14;
        for (let k = 0; k < 4; k++) markLabels.push([tx + k * 40, ty - 4]);
        markTexts.push({ x: tx, y: ty, text: mk.label });
      }
      // Isolines, each labelled once where it is farthest from labels already placed and from the markers.
      const iso = plot.append('g').attr('class', 'gs-isolines');
      const labels = plot.append('g').attr('class', 'gs-isolabels');
      const bx = xs(m.best.x);
      const by = ys(m.best.y);
      const placed: [number, number][] = [
        [optX, optY],
        [optX + 80, optY + 14],
        [bx, by],
        ...markLabels,
      ];
      for (const c of gen.thresholds(isoLevels)(grid)) {
        if (c.coordinates.length === 0) continue;
        iso.append('path').attr('class', 'gs-isoline').attr('data-level', num(c.value, 2)).attr('fill', 'none').attr('stroke', '#ffffff').attr('stroke-opacity', 0.75).attr('stroke-width', 0.8).attr('d', polyPath(c));
        let pick: [number, number] | null = null;
        let score = -Infinity;
        for (const poly of c.coordinates) {
          for (const ring of poly) {
            for (const p of ring) {
              const X = px(p[0]);
              const Y = py(p[1]);
              if (X < 22 || X > w - 22 || Y < 12 || Y > h - 12) continue;
              let d = Infinity;
              for (const q of placed) d = Math.min(d, Math.hypot((X - q[0]) / 1.6, Y - q[1]));
              if (d > score + 1e-9) {
                score = d;
                pick = [X, Y];
              }
            }
          }
        }
        if (pick) placed.push(pick);
        if (pick) {
          labels
            .append('text')
            .attr('class', 'gs-isolabel')
            .attr('x', num(pick[0], 1))
            .attr('y', num(pick[1] + 3.5, 1))
            .attr('text-anchor', 'middle')
            .attr('font-size', 10)
            .attr('fill', '#111111')
            .attr('stroke', '#ffffff')
            .attr('stroke-width', 2.5)
            .attr('paint-order', 'stroke')
            .text(`${num(c.value, isoStep < 1 ? 1 : 0)} %`);
        }
      }
      // Current-matching locus J_gen(x) = J_gen(y) (series only).
      if (o.matching) {
        const fm = filledGrid(o.matching, nx, ny, 1);
        const c = gen.contour(fm.grid, 0);
        if (c.coordinates.length > 0 && fm.lo < 0 && fm.hi > 0) {
          plot.append('path').attr('class', 'gs-matching').attr('fill', 'none').attr('stroke', MAP_COLOURS.matching).attr('stroke-width', 2).attr('stroke-dasharray', '9,4').attr('d', polyPath(c));
        }
      }
      // Tolerance outline at (1 − loss)·best.
      const tol = gen.contour(grid, o.threshold * 100);
      if (tol.coordinates.length > 0) {
        plot.append('path').attr('class', 'gs-tolerance-halo').attr('fill', 'none').attr('stroke', '#000000').attr('stroke-opacity', 0.45).attr('stroke-width', 3.6).attr('d', polyPath(tol));
        plot.append('path').attr('class', 'gs-tolerance').attr('data-threshold', num(o.threshold, 8)).attr('fill', 'none').attr('stroke', MAP_COLOURS.tolerance).attr('stroke-width', 1.8).attr('stroke-dasharray', '4,2.5').attr('d', polyPath(tol));
      }
      // Gaps out of order.
      const bad = unorderedRegion(x0, x1, y0, y1);
      if (bad.length >= 3) {
        plot.append('path').attr('class', 'gs-unordered').attr('fill', MAP_COLOURS.invalid).attr('d', `${linePath(bad.map(([a, b]) => [xs(a), ys(b)]), 1)}Z`);
      }
      // Labels of windows and lines, above the mask so they stay legible.
      const mt = plot.append('g').attr('class', 'gs-mark-labels');
      for (const t of markTexts) {
        mt.append('text')
          .attr('class', 'gs-mark-label')
          .attr('x', num(t.x))
          .attr('y', num(t.y))
          .attr('font-size', 10)
          .attr('fill', '#ffffff')
          .attr('stroke', '#000000')
          .attr('stroke-width', 2.2)
          .attr('paint-order', 'stroke')
          .text(svgText(t.text));
      }
      // Map maximum (unconstrained on this view) when it differs from the recommendation.
      if (Math.abs(m.best.x - o.optimum.x) > 1.5 * o.stepEv || Math.abs(m.best.y - o.optimum.y) > 1.5 * o.stepEv) {
        const mx = plot.append('g').attr('class', 'gs-mapmax').attr('data-gap-x', num(m.best.x, 4)).attr('data-gap-y', num(m.best.y, 4));
        mx.append('path').attr('d', `M${num(bx - 6)},${num(by)}H${num(bx + 6)}M${num(bx)},${num(by - 6)}V${num(by + 6)}`).attr('stroke', '#ffffff').attr('stroke-width', 2);
        mx.append('text').attr('x', num(bx + 8)).attr('y', num(by - 6)).attr('font-size', 10).attr('fill', '#ffffff').attr('stroke', '#000000').attr('stroke-width', 2).attr('paint-order', 'stroke').text(`map max ${num(m.best.value * 100, 2)} %`);
      }
      // The recommendation.
      const opt = g
        .append('g')
        .attr('class', 'gs-optimum')
        .attr('id', `optimum-${inp.id}`)
        .attr('data-gap-x', num(o.optimum.x, 6))
        .attr('data-gap-y', num(o.optimum.y, 6))
        .attr('data-efficiency', num(o.optimum.value, 8));
      opt.append('circle').attr('class', 'gs-optimum-ring').attr('cx', num(optX)).attr('cy', num(optY)).attr('r', 7).attr('fill', 'none').attr('stroke', '#ffffff').attr('stroke-width', 3);
      opt.append('circle').attr('class', 'gs-optimum-dot').attr('cx', num(optX)).attr('cy', num(optY)).attr('r', 3.2).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1);
      const optText = `optimum ${num(o.optimum.value * 100, 2)} % (${num(o.optimum.x, 3)} / ${num(o.optimum.y, 3)} eV)`;
      const right = optX + 11 + optText.length * 7 < w;
      opt
        .append('text')
        .attr('x', num(optX + (right ? 11 : -11)))
        .attr('y', num(optY + 16))
        .attr('text-anchor', right ? 'start' : 'end')
        .attr('font-size', 11)
        .attr('font-weight', 'bold')
        .attr('fill', '#111111')
        .attr('stroke', '#ffffff')
        .attr('stroke-width', 3)
        .attr('paint-order', 'stroke')
        .text(optText);
      // Axes and frame.
      g.append('rect').attr('class', 'gs-plot-area').attr('width', w).attr('height', h).attr('fill', 'none').attr('stroke', '#333333').attr('stroke-width', 1);
      const ax = g.append('g').attr('class', 'gs-axis gs-axis-x').attr('transform', `translate(0,${h})`);
      ax.call(d3().axisBottom(xs).ticks(8).tickSizeOuter(0));
      styleAxis(ax);
      const ay = g.append('g').attr('class', 'gs-axis gs-axis-y');
      ay.call(d3().axisLeft(ys).ticks(8).tickSizeOuter(0));
      styleAxis(ay);
      g.append('text').attr('x', w / 2).attr('y', h + 38).attr('text-anchor', 'middle').attr('font-size', 12).text(svgText(inp.xLabel));
      g.append('text').attr('transform', `translate(-48,${h / 2}) rotate(-90)`).attr('text-anchor', 'middle').attr('font-size', 12).text(svgText(inp.yLabel));
      // Colour bar.
      const cb = g.append('g').attr('class', 'gs-colourbar').attr('transform', `translate(${w + 22},0)`);
      const cs = scaleLinear().domain([lo, hi]).range([h, 0]);
      const steps = 64;
      for (let k = 0; k < steps; k++) {
        const v0 = lo + ((hi - lo) * k) / steps;
        const v1 = lo + ((hi - lo) * (k + 1)) / steps;
        cb.append('rect').attr('x', 0).attr('y', num(cs(v1), 2)).attr('width', 14).attr('height', num(cs(v0) - cs(v1) + 0.4, 2)).attr('fill', colour((v0 + v1) / 2));
      }
      cb.append('rect').attr('width', 14).attr('height', h).attr('fill', 'none').attr('stroke', '#333333');
      const cax = cb.append('g').attr('transform', 'translate(14,0)');
      cax.call(d3().axisRight(cs).ticks(8).tickSizeOuter(0));
      styleAxis(cax);
      cb.append('text').attr('x', 7).attr('y', -10).attr('text-anchor', 'middle').attr('font-size', 11).text('η [%]');
      // Legend.
      const lg = g.append('g').attr('class', 'gs-legend').attr('transform', `translate(0,${h + 58})`);
      const items: { draw: (s: Sel) => void; text: string }[] = [
        { draw: (s) => s.append('circle').attr('cx', 8).attr('cy', 0).attr('r', 5).attr('fill', MAP_COLOURS.marker).attr('stroke', '#ffffff').attr('stroke-width', 1.5), text: 'recommended optimum' },
        { draw: (s) => s.append('path').attr('d', 'M0,0H18').attr('stroke', '#555555').attr('stroke-width', 2).attr('stroke-dasharray', '4,2.5'), text: `tolerance: ≥ (1 − ${num(inp.loss * 100, 1)} %)·best` },
      ];
      if (o.matching) items.push({ draw: (s) => s.append('path').attr('d', 'M0,0H18').attr('stroke', MAP_COLOURS.matching).attr('stroke-width', 2).attr('stroke-dasharray', '9,4'), text: 'current matched (J_gen equal)' });
      if (o.marks.some((k) => k.kind === 'window')) items.push({ draw: (s) => s.append('rect').attr('x', 0).attr('y', -6).attr('width', 18).attr('height', 12).attr('fill', '#bbbbbb').attr('stroke', '#777777').attr('stroke-dasharray', '3,2'), text: 'practical window' });
      if (o.marks.some((k) => k.kind === 'fixed')) items.push({ draw: (s) => s.append('path').attr('d', 'M0,0H18').attr('stroke', MAP_COLOURS.fixed).attr('stroke-width', 1.6), text: 'fixed absorber' });
      let lx = 0;
      let ly = 0;
      for (const it of items) {
        const width = 40 + it.text.length * 7;
        if (lx + width > w + 100) {
          lx = 0;
          ly += 18;
        }
        const item = lg.append('g').attr('transform', `translate(${num(lx, 1)},${ly})`);
        it.draw(item);
        item.append('text').attr('x', 24).attr('y', 4).attr('font-size', 11).text(it.text);
        lx += width;
      }
      // Hover readout (the page's script fills it; inert in a standalone file).
      const hover = g.append('g').attr('class', 'gs-hover').attr('visibility', 'hidden').attr('pointer-events', 'none');
      hover.append('line').attr('class', 'gs-hover-x').attr('y1', 0).attr('y2', h).attr('stroke', '#ffffff').attr('stroke-width', 0.8);
      hover.append('line').attr('class', 'gs-hover-y').attr('x1', 0).attr('x2', w).attr('stroke', '#ffffff').attr('stroke-width', 0.8);
      hover.append('text').attr('class', 'gs-readout').attr('x', w - 6).attr('y', 16).attr('text-anchor', 'end').attr('font-size', 11).attr('fill', '#111111').attr('stroke', '#ffffff').attr('stroke-width', 3).attr('paint-order', 'stroke');
    },
  );
}
