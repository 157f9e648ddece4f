/**
 * The example report in a real headless Chromium (system `chromium` on PATH,
 * else the one the @sparticuz/chromium npm package carries; see
 * test/helpers/chromium.ts; driven by playwright-core): no console errors, no
 * network, contour paths on the maps, the optimum marker drawn where the
 * reported optimum is, a working hover readout, A4 printing; a screenshot
 * lands in test/.artifacts/.
 */
import { mkdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { reportCommand } from '../../src/cli/report-command.js';
import { BROWSER_TIMEOUT_MS, launchChromium } from '../helpers/chromium.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const EXAMPLE = join(ROOT, 'examples/perovskite-silicon.yaml');
const ARTIFACTS = join(ROOT, 'test/.artifacts');

/** Open a report file in a fresh headless Chromium, collecting console problems (and requests, if asked). */
async function openReport(file: string, problems: string[], requests?: string[]): Promise<{ ctx: BrowserContext; page: Page }> {
  const { ctx } = await launchChromium();
  const page = await ctx.newPage();
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') problems.push(`console ${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  if (requests) page.on('request', (r) => requests.push(r.url()));
  await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });
  return { ctx, page };
}

describe('the example report in headless Chromium', () => {
  let ctx: BrowserContext;
  let page: Page;
  let summary: any;
  const problems: string[] = [];
  const requests: string[] = [];

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    const out = join(ARTIFACTS, 'example-report.html');
    summary = JSON.parse(await reportCommand({ design: EXAMPLE, output: out, json: true }));
    ({ ctx, page } = await openReport(out, problems, requests));
  }, BROWSER_TIMEOUT_MS);

  afterAll(async () => {
    await ctx?.close();
  }, BROWSER_TIMEOUT_MS);

  test('loads with no console errors and fetches nothing but itself', async () => {
    await page.waitForTimeout(100);
    expect(problems).toEqual([]);
    expect(requests).toEqual([page.url()]);
  }, BROWSER_TIMEOUT_MS);

  test('every map has contour paths, isolines and the tolerance outline; the series map has the matching locus', async () => {
    for (const id of ['map-series-1-2', 'map-independent-1-2']) {
      const counts = await page.evaluate((sel) => {
        const svg = document.getElementById(sel);
        const n = (c: string) => svg?.querySelectorAll(c).length ?? -1;
        return { bands: n('path.gs-band'), iso: n('path.gs-isoline'), tol: n('path.gs-tolerance'), match: n('path.gs-matching'), opt: n('.gs-optimum') };
      }, id);
      expect(counts.bands).toBeGreaterThan(10);
      expect(counts.iso).toBeGreaterThan(3);
      expect(counts.tol).toBe(1);
      expect(counts.opt).toBe(1);
      expect(counts.match).toBe(id.includes('series') ? 1 : 0);
    }
  }, BROWSER_TIMEOUT_MS);

  test('the optimum marker sits at the reported optimum: data attributes and its drawn position through the axes', async () => {
    for (const w of summary.wirings) {
      const id = `map-${w.wiring}-1-2`;
      const m = await page.evaluate((sel) => {
        const svg = document.getElementById(sel) as unknown as SVGSVGElement;
        const marker = document.getElementById(`optimum-${sel}`) as unknown as SVGGElement;
        const dot = marker.querySelector('.gs-optimum-dot') as SVGCircleElement;
        const area = svg.querySelector('.gs-plot-area') as SVGRectElement;
        const d = dot.getBoundingClientRect();
        const a = area.getBoundingClientRect();
        const num = (el: Element, k: string) => Number(el.getAttribute(k));
        return {
          gapX: num(marker, 'data-gap-x'),
          gapY: num(marker, 'data-gap-y'),
          eff: num(marker, 'data-efficiency'),
          cx: d.x + d.width / 2,
          cy: d.y + d.height / 2,
          left: a.x,
          top: a.y,
          width: a.width,
          height: a.height,
          xmin: num(svg, 'data-x-min'),
          xmax: num(svg, 'data-x-max'),
          ymin: num(svg, 'data-y-min'),
          ymax: num(svg, 'data-y-max'),
        };
      }, id);
      expect(m.gapX).toBeCloseTo(w.gaps_ev[0], 5);
      expect(m.gapY).toBeCloseTo(w.gaps_ev[1], 5);
      expect(m.eff).toBeCloseTo(w.efficiency, 7);
      const drawnX = m.xmin + ((m.cx - m.left) / m.width) * (m.xmax - m.xmin);
      const drawnY = m.ymax - ((m.cy - m.top) / m.height) * (m.ymax - m.ymin);
      const pixelEv = (m.xmax - m.xmin) / m.width;
      expect(Math.abs(drawnX - w.gaps_ev[0])).toBeLessThan(1.5 * pixelEv);
      expect(Math.abs(drawnY - w.gaps_ev[1])).toBeLessThan(1.5 * ((m.ymax - m.ymin) / m.height));
    }
  }, BROWSER_TIMEOUT_MS);

  test('hovering the map reads out the efficiency at the pointer', async () => {
    const map = page.locator('#map-series-1-2');
    await map.scrollIntoViewIfNeeded();
    const box = await page.locator('#map-series-1-2 .gs-plot-area').boundingBox();
    expect(box).not.toBeNull();
    if (!box) return;
    await page.mouse.move(box.x + box.width * 0.4, box.y + box.height * 0.5, { steps: 4 });
    const text = await page.locator('#map-series-1-2 .gs-readout').textContent();
    const m = /^(\d\.\d{3}) \/ (\d\.\d{3}) eV \(grid\): η (\d+\.\d\d) %$/.exec(text ?? '');
    expect(m, text ?? '').not.toBeNull();
    if (!m) return;
    // The gaps shown are the grid point whose η is shown.
    const grid = await page.evaluate(() => {
      const svg = document.querySelector('#map-series-1-2');
      return JSON.parse(document.getElementById(svg?.getAttribute('data-grid') ?? '')?.textContent ?? 'null');
    });
    const ix = Math.round((Number(m[1]) - grid.x0) / grid.dx), iy = Math.round((Number(m[2]) - grid.y0) / grid.dy);
    expect(Math.abs(grid.x0 + ix * grid.dx - Number(m[1]))).toBeLessThan(6e-4);
    expect(Math.abs(grid.y0 + iy * grid.dy - Number(m[2]))).toBeLessThan(6e-4);
    expect(grid.v[iy * grid.nx + ix].toFixed(2)).toBe(m[3]);
    expect(await page.locator('#map-series-1-2 .gs-hover').getAttribute('visibility')).toBe('visible');
    expect(problems).toEqual([]);
  }, BROWSER_TIMEOUT_MS);

  test('prints on A4 over several pages; a screenshot is saved', async () => {
    const pdf = await page.pdf({ format: 'A4', printBackground: true });
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect((pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length).toBeGreaterThan(2);
    await page.evaluate(() => window.scrollTo(0, 0));
    const shot = join(ARTIFACTS, 'example-report.png');
    await page.screenshot({ path: shot, fullPage: true });
    await page.locator('#figure-map-series-1-2').screenshot({ path: join(ARTIFACTS, 'example-map-series.png') });
    expect(readFileSync(shot).subarray(1, 4).toString('latin1')).toBe('PNG');
  }, BROWSER_TIMEOUT_MS);
});

describe('the synthetic-year report in headless Chromium', () => {
  let ctx: BrowserContext;
  let page: Page;
  const problems: string[] = [];

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    const out = join(ARTIFACTS, 'year-report.html');
    await reportCommand({ design: join(ROOT, 'examples/perovskite-silicon-year.yaml'), output: out });
    ({ ctx, page } = await openReport(out, problems));
  }, BROWSER_TIMEOUT_MS);

  afterAll(async () => {
    await ctx?.close();
  }, BROWSER_TIMEOUT_MS);

  test('the comparison section draws two side-by-side panels per wiring and the APE bars, with no console errors', async () => {
    for (const id of ['compare-series-1-2', 'compare-independent-1-2']) {
      const panels = await page.evaluate((sel) => {
        const svg = document.getElementById(sel);
        return Array.from(svg?.querySelectorAll('.gs-compare-panel') ?? []).map((g) => {
          const area = (g.querySelector('.gs-plot-area') as SVGRectElement).getBoundingClientRect();
          return { light: g.getAttribute('data-light'), bands: g.querySelectorAll('path.gs-band').length, x: area.x, y: area.y, w: area.width, h: area.height };
        });
      }, id);
      expect(panels.map((p) => p.light)).toEqual(['am1.5g', 'ensemble']);
      for (const p of panels) {
        expect(p.bands).toBeGreaterThan(10);
        expect(p.w).toBeGreaterThan(250);
      }
      // Side by side, the same size, top-aligned.
      expect(panels[1].x).toBeGreaterThan(panels[0].x + panels[0].w);
      expect(Math.abs(panels[1].y - panels[0].y)).toBeLessThan(0.5);
      expect(Math.abs(panels[1].w - panels[0].w)).toBeLessThan(0.5);
    }
    const bars = await page.evaluate(() => Array.from(document.querySelectorAll('#ape-histogram .gs-ape-bar')).map((b) => b.getBoundingClientRect().width));
    expect(bars.length).toBeGreaterThan(3);
    expect(bars.every((w) => w > 5)).toBe(true);
    await page.locator('#versus-am15g').screenshot({ path: join(ARTIFACTS, 'year-versus-am15g.png') });
    expect(problems).toEqual([]);
  }, BROWSER_TIMEOUT_MS);
});
