/**
 * The chart serialiser (svgMarkup in src/report/svg.ts) on the DOM every
 * build gives d3-node (src/report/dom/, redirected by scripts/report-dom.mjs,
 * which the test runner uses too).
 */
import { spawnSync } from 'node:child_process';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { scaleLinear } from 'd3-scale';
import { D3Node } from 'd3-node';
import { describe, expect, it } from 'vitest';
import { buildSvg, d3, svgMarkup, type Sel } from '../../src/report/svg.js';

const SVG_NS = 'http://www.w3.org/2000/svg';

describe('svgMarkup', () => {
  const doc = new D3Node().document;

  it('writes attributes in the order they were set, names as created, and an end tag for every element', () => {
    const svg = doc.createElementNS(SVG_NS, 'svg');
    svg.setAttribute('xmlns', SVG_NS);
    svg.setAttribute('width', '10');
    svg.setAttribute('height', '20');
    svg.setAttribute('width', '12'); // set again: keeps its place
    const clip = doc.createElementNS(SVG_NS, 'clipPath');
    clip.setAttribute('id', 'c');
    clip.appendChild(doc.createElementNS(SVG_NS, 'rect'));
    svg.appendChild(clip);
    expect(svgMarkup(svg)).toBe(`<svg xmlns="${SVG_NS}" width="12" height="20"><clipPath id="c"><rect></rect></clipPath></svg>`);
  });

  it('escapes text (& < >) and attribute values (& < " tab, line feed, carriage return) so the markup is well-formed XML that keeps its values, and writes no-break spaces as a character reference', () => {
    const t = doc.createElementNS(SVG_NS, 'text');
    t.setAttribute('data-note', 'a<b & "c"\t1\n2\r');
    t.textContent = 'x < y & z > w "q" \u00A0';
    expect(svgMarkup(t)).toBe('<text data-note="a&lt;b &amp; &quot;c&quot;&#9;1&#10;2&#13;">x &lt; y &amp; z &gt; w "q" &#160;</text>');
  });

  it('is what buildSvg returns, and the chart is removed from the shared document afterwards', () => {
    let root: Element | null = null;
    const out = buildSvg(40, 30, { id: 'probe' }, (s) => {
      root = s.node();
      expect(root?.isConnected).toBe(true);
      s.append('g').attr('class', 'a').append('text').attr('x', 1).text('A & B');
    });
    expect(out).toBe(
      `<svg xmlns="${SVG_NS}" width="40" height="30" viewBox="0 0 40 30" font-family="DejaVu Sans, Liberation Sans, Arial, Helvetica, sans-serif" font-size="12" id="probe"><g class="a"><text x="1">A &amp; B</text></g></svg>`,
    );
    expect((root as Element | null)?.isConnected).toBe(false);
  });
});

describe('the report DOM', () => {
  it("gives d3-node's d3 selection and axes only", () => {
    const d3 = new D3Node().d3 as Record<string, unknown>;
    expect(Object.keys(d3).sort()).toEqual(['axisBottom', 'axisLeft', 'axisRight', 'axisTop', 'select']);
  });

  it('fails loudly if a chart ever reads a style sheet (the CSS parser is left out)', () => {
    const style = new D3Node().document.createElement('style') as HTMLStyleElement;
    style.textContent = 'rect { fill: red }';
    expect(() => style.sheet).toThrow(/without a CSS parser/);
  });
});

describe('the same markup from another DOM', () => {
  it("jsdom and full d3 (what d3-node loads when nothing redirects it) give the same bytes, through svgMarkup and through d3-node's own serialiser, for a chart with axes, a clip path and text", () => {
    const draw = `(s) => { s.append('defs').append('clipPath').attr('id', 'x-clip').append('rect').attr('width', 200).attr('height', 60); s.append('g').attr('class', 'gs-axis').attr('transform', 'translate(10,50)').call(d3().axisBottom(scaleLinear().domain([0.5, 2.5]).range([0, 200])).ticks(5)); s.append('g').attr('transform', 'translate(10,0)').call(d3().axisLeft(scaleLinear().domain([0, 50]).range([50, 0])).ticks(3)); s.append('text').attr('x', 4).attr('y', 12).attr('clip-path', 'url(#x-clip)').text('η [%] < 50 & "gaps"'); }`;
    // The compiled, unbundled module: d3-node there imports the real jsdom and all of d3 (nothing redirects Node's own resolver).
    const compiled = pathToFileURL(resolve(import.meta.dirname, '../../dist/report/svg.js')).href;
    const script = [
      `import { buildSvg, d3, FONT_FAMILY } from ${JSON.stringify(compiled)};`,
      "import { D3Node } from 'd3-node';",
      "import { scaleLinear } from 'd3-scale';",
      `const draw = ${draw};`,
      "const viaMarkup = buildSvg(240, 80, { id: 'x' }, draw);",
      // The serialiser the report used before svgMarkup: d3-node's svgString on jsdom.
      "const n = new D3Node();",
      "const svg = n.createSVG(240, 80, { viewBox: '0 0 240 80', 'font-family': FONT_FAMILY, 'font-size': 12, id: 'x' });",
      'draw(svg);',
      "process.stdout.write(JSON.stringify({ document: n.document.constructor.name, d3Exports: Object.keys(n.d3).length, viaMarkup, viaD3Node: n.svgString() }));",
    ].join('\n');
    const other = spawnSync(process.execPath, ['--input-type=module', '-e', script], { encoding: 'utf8', cwd: resolve(import.meta.dirname, '../..') });
    expect(other.status, other.stderr).toBe(0);
    const jsdom = JSON.parse(other.stdout) as { document: string; d3Exports: number; viaMarkup: string; viaD3Node: string };
    // It really was the other DOM: jsdom's Document (linkedom's is HTMLDocument) and the whole of d3.
    expect(jsdom.document).toBe('Document');
    expect(jsdom.d3Exports).toBeGreaterThan(100);
    // eslint-disable-next-line no-new-func -- the same drawing, run here on linkedom
    const here = buildSvg(240, 80, { id: 'x' }, new Function('d3', 'scaleLinear', `return ${draw}`)(d3, scaleLinear) as (s: Sel) => void);
    expect(here).toContain('class="tick"');
    expect(here).toContain('<clipPath id="x-clip">');
    expect(jsdom.viaMarkup).toBe(here);
    expect(jsdom.viaD3Node).toBe(here);
  }, 30_000);
});
