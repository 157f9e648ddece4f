/**
 * Every example report in headless Chromium, measured as printed and as seen:
 * no two text labels of one chart overlap and none leaves its chart; maps a
 * reader compares (one gap pair across wirings, the two lights of a
 * comparison) share one colour domain; the headline and the answer table sit
 * on the first A4 page; figures do not split across pages; the page count of
 * the PDF is bounded.
 */
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, test } from 'vitest';
import { reportCommand } from '../../src/cli/report-command.js';
import { BROWSER_TIMEOUT_MS, launchChromium } from '../helpers/chromium.js';

const ROOT = new URL('../..', import.meta.url).pathname;
const ARTIFACTS = join(ROOT, 'test/.artifacts/examples');

/** The example designs and the most A4 pages each may print on (issue: the two-subcell example on at most 6). */
const EXAMPLES: { file: string; maxPages: number }[] = [
  { file: 'perovskite-silicon.yaml', maxPages: 6 },
  { file: 'triple-junction.yaml', maxPages: 7 },
  { file: 'perovskite-silicon-year.yaml', maxPages: 9 },
  { file: 'perovskite-cigs-wirings.yaml', maxPages: 9 },
  // Three scenarios, each with its own sections after one comparison table.
  { file: 'three-tandems.yaml', maxPages: 16 },
  // Several sites: the AM1.5G answer, then the Sites section (table and site map) from the batch over four invented sites.
  { file: 'sites/sites-report.yaml', maxPages: 9 },
];

/** A4 at 96 CSS px per inch, less the report's @page margins (14 mm top, 16 mm bottom, 12 mm each side). */
const MM = 96 / 25.4;
const PRINT_WIDTH_PX = Math.floor((210 - 24) * MM);
const PRINT_HEIGHT_PX = Math.floor((297 - 30) * MM);

interface TextBox {
  text: string;
  x0: number;
  y0: number;
  x1: number;
  y1: number;
}

/** Every chart's visible text boxes and its own box, in page pixels. */
async function chartTexts(page: Page): Promise<{ id: string; box: TextBox; texts: TextBox[] }[]> {
  return page.evaluate(() => {
    const rect = (el: Element, text: string) => {
      const r = el.getBoundingClientRect();
      return { text, x0: r.left, y0: r.top, x1: r.right, y1: r.bottom };
    };
    return Array.from(document.querySelectorAll('svg.gs-chart')).map((svg) => {
      const texts = Array.from(svg.querySelectorAll('text'))
        .filter((t) => (t.textContent ?? '').trim() !== '' && getComputedStyle(t).visibility !== 'hidden' && (t as SVGGraphicsElement).getBBox().width > 0)
        .map((t) => rect(t, (t.textContent ?? '').trim()));
      return { id: svg.id, box: rect(svg, svg.id), texts };
    });
  });
}

const overlap = (a: TextBox, b: TextBox, tol: number) => a.x0 + tol < b.x1 && b.x0 + tol < a.x1 && a.y0 + tol < b.y1 && b.y0 + tol < a.y1;

/** Overlapping pairs and escaping labels of one chart, in words. */
function collisions(c: { id: string; box: TextBox; texts: TextBox[] }): string[] {
  const out: string[] = [];
  // Glyph boxes include line spacing above and below the ink: allow 1.5 px of box overlap.
  const tol = 1.5;
  for (let i = 0; i < c.texts.length; i++) {
    const a = c.texts[i];
    if (a.x0 < c.box.x0 - 0.5 || a.y0 < c.box.y0 - 0.5 || a.x1 > c.box.x1 + 0.5 || a.y1 > c.box.y1 + 0.5) out.push(`${c.id}: "${a.text}" leaves the chart`);
    for (let j = i + 1; j < c.texts.length; j++) if (overlap(a, c.texts[j], tol)) out.push(`${c.id}: "${a.text}" overlaps "${c.texts[j].text}"`);
  }
  return out;
}

for (const ex of EXAMPLES) {
  describe(`example ${ex.file} in headless Chromium`, () => {
    let ctx: BrowserContext;
    let page: Page;
    let pdf: Buffer;
    const problems: string[] = [];

    beforeAll(async () => {
      mkdirSync(ARTIFACTS, { recursive: true });
      const out = join(ARTIFACTS, ex.file.replace(/\.yaml$/, '.html').replace(/\//g, '-'));
      await reportCommand({ design: join(ROOT, 'examples', ex.file), output: out });
      ({ ctx } = await launchChromium());
      page = await ctx.newPage();
      page.on('pageerror', (e) => problems.push(e.message));
      await page.goto(`file://${out}`, { waitUntil: 'load' });
      pdf = await page.pdf({ format: 'A4', printBackground: true });
    }, BROWSER_TIMEOUT_MS);

    afterAll(async () => {
      await ctx?.close();
    }, BROWSER_TIMEOUT_MS);

    test('no two text labels of one chart overlap, and none leaves its chart', async () => {
      const charts = await chartTexts(page);
      expect(charts.length).toBeGreaterThan(3);
      expect(charts.every((c) => c.texts.length > 5)).toBe(true);
      expect(charts.flatMap(collisions)).toEqual([]);
      expect(problems).toEqual([]);
    }, BROWSER_TIMEOUT_MS);

    test('printed at A4 width, labels still do not collide', async () => {
      await page.setViewportSize({ width: PRINT_WIDTH_PX, height: PRINT_HEIGHT_PX });
      await page.emulateMedia({ media: 'print' });
      try {
        expect((await chartTexts(page)).flatMap(collisions)).toEqual([]);
      } finally {
        await page.emulateMedia({ media: 'screen' });
        await page.setViewportSize({ width: 1100, height: 900 });
      }
    }, BROWSER_TIMEOUT_MS);

    test('compared maps share one colour domain: one gap pair across wirings, both lights of a comparison', async () => {
      const domains = await page.evaluate(() =>
        Array.from(document.querySelectorAll('svg.gs-map, svg.gs-compare')).map((s) => ({
          id: s.id,
          kind: s.classList.contains('gs-map') ? 'map' : 'compare',
          lo: s.getAttribute('data-colour-lo'),
          hi: s.getAttribute('data-colour-hi'),
          bars: Array.from(s.querySelectorAll('.gs-colourbar')).map((b) => `${b.getAttribute('data-lo')}–${b.getAttribute('data-hi')}`),
        })),
      );
      expect(domains.length).toBeGreaterThan(0);
      const groups = new Map<string, Set<string>>();
      for (const d of domains) {
        expect(d.lo).not.toBeNull();
        // The colour bar shows the chart's domain.
        expect(d.bars).toEqual([`${d.lo}–${d.hi}`]);
        const pair = /-(\d+-\d+)$/.exec(d.id)?.[1] ?? '';
        const key = `${d.kind} ${pair}`;
        if (!groups.has(key)) groups.set(key, new Set());
        groups.get(key)?.add(`${d.lo}–${d.hi}`);
      }
      for (const [key, set] of groups) expect([key, set.size]).toEqual([key, 1]);
    }, BROWSER_TIMEOUT_MS);

    test('the headline and the answer table are on page 1; figures and tables do not split', async () => {
      await page.setViewportSize({ width: PRINT_WIDTH_PX, height: PRINT_HEIGHT_PX });
      await page.emulateMedia({ media: 'print' });
      try {
        const layout = await page.evaluate(() => {
          const bottom = (sel: string) => (document.querySelector(sel) as HTMLElement).getBoundingClientRect().bottom + window.scrollY;
          const avoid = Array.from(document.querySelectorAll('figure, table')).map((e) => getComputedStyle(e).breakInside);
          // A page of scenarios opens with their comparison table; a single design with its answer table.
          const answer = document.getElementById('scenarios') ?? document.getElementById('answer');
          const before = Array.from(document.querySelectorAll('body *')).some((e) => getComputedStyle(e).breakBefore === 'page' && e.compareDocumentPosition(answer as Node) & Node.DOCUMENT_POSITION_FOLLOWING);
          return { verdict: bottom('.verdict'), answer: (answer as HTMLElement).getBoundingClientRect().bottom + window.scrollY, avoid, breakBeforeAnswer: before };
        });
        expect(layout.breakBeforeAnswer).toBe(false);
        expect(layout.answer).toBeLessThan(PRINT_HEIGHT_PX);
        expect(layout.avoid.every((v) => v === 'avoid')).toBe(true);
      } finally {
        await page.emulateMedia({ media: 'screen' });
        await page.setViewportSize({ width: 1100, height: 900 });
      }
    }, BROWSER_TIMEOUT_MS);

    test(`prints to a PDF of at most ${ex.maxPages} A4 pages`, () => {
      expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
      const pages = (pdf.toString('latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
      expect(pages).toBeGreaterThan(0);
      expect(pages).toBeLessThanOrEqual(ex.maxPages);
    });
  });
}
