/**
 * Scenarios side by side: one page that opens with a table comparing the best
 * design of every scenario (each wiring), then keeps every scenario's own
 * report sections. Each scenario's page is built by the ordinary report
 * builder; its body is placed in a section with its ids prefixed, so anchors
 * and SVG references stay unique on the combined page.
 */
import type { ScenarioSet } from '../design/index.js';
import type { GapMap } from '../search/map.js';
import { buildReport, pairKey, type BuildReportOptions, type BuiltReport, type Chart } from './build.js';
import { sharedColourDomain } from './charts/map-layers.js';
import { computeReport } from './compute.js';
import { CAUTION } from './assumptions.js';
import { pc, wiringTitle } from './view.js';
import type { StageReporter } from './compute.js';

export interface ScenarioRow {
  scenario: string;
  wiring: string;
  efficiency: number;
  gapsEv: number[];
  /** Subcells in words: label, and film or measured data where given. */
  stack: string;
  objective: string;
}

/** One row per scenario and wiring, best first within the file's order of scenarios. */
export function scenarioRows(set: ScenarioSet, built: BuiltReport[]): ScenarioRow[] {
  return set.scenarios.flatMap((d, k) =>
    built[k].data.outcomes.map((o) => ({
      scenario: d.name,
      wiring: o.wiring.key,
      efficiency: o.search.result.best.value,
      gapsEv: o.search.result.best.gapsEv,
      stack: d.subcells.map((c) => c.label).join(' / '),
      objective: o.search.objective.label,
    })),
  );
}

const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');

/** A scenario's page body with every id, fragment link and SVG url(#…) prefixed. */
function scopedBody(html: string, prefix: string): string {
  const m = /<body[^>]*>([\s\S]*)<\/body>/i.exec(html);
  const body = m ? m[1] : html;
  return body
    .replace(/\bid="([^"]+)"/g, `id="${prefix}$1"`)
    .replace(/\bhref="#([^"]+)"/g, `href="#${prefix}$1"`)
    .replace(/url\(#([^)]+)\)/g, `url(#${prefix}$1)`)
    .replace(/<h1>/g, '<h2 class="scenario-title">')
    .replace(/<\/h1>/g, '</h2>');
}

/** The combined page, its charts (names prefixed per scenario) and a JSON summary. */
export function buildScenarioReport(set: ScenarioSet, opts: Pick<BuildReportOptions, 'date' | 'stage' | 'onChart'>): { html: string; charts: Chart[]; summary: Record<string, unknown>; built: BuiltReport[] } {
  // Scenarios are compared: maps of the same gap pair share one colour scale across every scenario and wiring.
  const datas = set.scenarios.map((d) => computeReport(d, opts.stage));
  const byKey = new Map<string, GapMap[]>();
  for (const data of datas) for (const o of data.outcomes) for (const m of o.maps) byKey.set(pairKey(m), [...(byKey.get(pairKey(m)) ?? []), m.map]);
  const scales = { byPair: new Map([...byKey].map(([k, maps]) => [k, sharedColourDomain(maps)])), sharedBy: 'every scenario and wiring' };
  const built = set.scenarios.map((d, k) => buildReport(d, { ...opts, data: datas[k], scales }));
  const rows = scenarioRows(set, built);
  const best = rows.reduce((a, b) => (b.efficiency > a.efficiency ? b : a), rows[0]);
  const head = /<head>[\s\S]*<\/head>/i.exec(built[0].html)?.[0] ?? '<head><meta charset="utf-8"></head>';
  const title = `<title>${esc(set.name)}</title>`;
  const table = [
    '<table class="answer" id="scenarios">',
    '<thead><tr><th>scenario</th><th>wiring</th><th>best η</th><th>gaps [eV], top first</th><th>subcells</th></tr></thead>',
    '<tbody>',
    ...rows.map(
      (r) =>
        `<tr${r === best ? ' class="emph"' : ''}><th scope="row"><a href="#s${set.scenarios.findIndex((d) => d.name === r.scenario) + 1}-scenario">${esc(r.scenario)}</a></th><td>${esc(wiringTitle(r.wiring))}</td><td class="num">${pc(r.efficiency, 2)}${r.objective === 'efficiency' ? '' : ` <span class="sub">(${esc(r.objective)})</span>`}</td><td class="num">${r.gapsEv.map((g) => g.toFixed(3)).join(' / ')}</td><td>${esc(r.stack)}</td></tr>`,
    ),
    '</tbody></table>',
  ].join('\n');
  const sections = set.scenarios.map((d, k) => `<section class="scenario" id="s${k + 1}-scenario">\n${scopedBody(built[k].html, `s${k + 1}-`)}\n</section>`);
  const html = [
    '<!DOCTYPE html>',
    '<html lang="en">',
    head.replace(/<title>[\s\S]*?<\/title>/i, title),
    '<body>',
    '<header>',
    '  <p class="kicker">gapstack design report · detailed-balance limits · scenarios side by side</p>',
    `  <h1>${esc(set.name)}</h1>`,
    '</header>',
    '<section class="answer-section">',
    '  <h2>Scenarios compared</h2>',
    set.description ? `  <p class="designer">${esc(set.description)}</p>` : '',
    `  <p class="verdict">Highest limit: ${esc(best.scenario)}, ${esc(wiringTitle(best.wiring))}, ${pc(best.efficiency, 2)}. Each scenario's own question, answer, maps and assumptions follow below; compare limits only under the same light and assumptions.</p>`,
    table,
    `  <p class="caution"><strong>Caution.</strong> ${esc(CAUTION)}</p>`,
    '</section>',
    ...sections,
    '</body>',
    '</html>',
  ].join('\n');
  const charts = built.flatMap((b, k) => b.charts.map((c) => ({ ...c, name: `s${k + 1}-${c.name}` })));
  const summary = {
    name: set.name,
    scenarios: set.scenarios.map((d, k) => ({ scenario: d.name, ...built[k].summary })),
    comparison: rows.map((r) => ({ scenario: r.scenario, wiring: r.wiring, efficiency: Number(r.efficiency.toFixed(8)), gaps_ev: r.gapsEv.map((g) => Number(g.toFixed(6))) })),
    caution: CAUTION,
  };
  return { html, charts, summary, built };
}
