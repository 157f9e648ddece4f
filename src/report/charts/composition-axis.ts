/**
 * A secondary composition axis on a map of subcells bound to alloy families:
 * along the top edge for the upper subcell (x), inside the right edge for the
 * lower one (y). Ticks sit at the gaps where the composition takes round
 * values (from the family's gap model at the design temperature).
 */
import type { CompositionAxis } from '../../search/composition-tolerance.js';
import { num, svgText, type Sel } from '../svg.js';

const fmt = (x: number) => (Math.round(x * 100) / 100).toString();

/** Ticks thinned so labels keep at least `gapPx` apart on screen (the first tick always stays). */
function spaced(ticks: CompositionAxis['ticks'], pos: (gapEv: number) => number, gapPx: number): CompositionAxis['ticks'] {
  const kept: CompositionAxis['ticks'] = [];
  for (const t of ticks) if (kept.length === 0 || Math.abs(pos(t.gapEv) - pos(kept[kept.length - 1].gapEv)) >= gapPx) kept.push(t);
  return kept;
}

/** Draw the composition axes of a map into its plot group `g` (plot size w × h, gap scales xs and ys). */
export function drawCompositionAxes(g: Sel, axes: { x?: CompositionAxis; y?: CompositionAxis } | undefined, xs: (gapEv: number) => number, ys: (gapEv: number) => number, w: number): void {
  if (!axes) return;
  if (axes.x) {
    const top = g.append('g').attr('class', 'gs-axis gs-composition-x').attr('data-family', axes.x.family);
    top.append('title').text(svgText(axes.x.label));
    for (const t of spaced(axes.x.ticks, xs, 30)) {
      const px = num(xs(t.gapEv));
      top.append('path').attr('d', `M${px},0V-5`).attr('stroke', '#333333');
      top.append('text').attr('x', px).attr('y', -8).attr('text-anchor', 'middle').attr('font-size', 9).attr('fill', '#333333').attr('data-gap', num(t.gapEv, 4)).text(fmt(t.x));
    }
    top.append('text').attr('x', num(w)).attr('y', -19).attr('text-anchor', 'end').attr('font-size', 9.5).attr('fill', '#333333').text(svgText(`top axis: ${axes.x.label}`));
  }
  if (axes.y) {
    const right = g.append('g').attr('class', 'gs-axis gs-composition-y').attr('data-family', axes.y.family);
    right.append('title').text(svgText(axes.y.label));
    for (const t of spaced(axes.y.ticks, ys, 14)) {
      const py = num(ys(t.gapEv));
      right.append('path').attr('d', `M${num(w)},${py}H${num(w - 5)}`).attr('stroke', '#ffffff').attr('stroke-width', 1.5);
      right
        .append('text')
        .attr('x', num(w - 7))
        .attr('y', py)
        .attr('dy', '0.32em')
        .attr('text-anchor', 'end')
        .attr('font-size', 9)
        .attr('fill', '#111111')
        .attr('stroke', '#ffffff')
        .attr('stroke-width', 2.5)
        .attr('paint-order', 'stroke')
        .attr('data-gap', num(t.gapEv, 4))
        .text(fmt(t.x));
    }
  }
}
