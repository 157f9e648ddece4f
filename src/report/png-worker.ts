/**
 * Worker thread that rasterises chart SVGs to PNG (resvg, the same call as
 * svgToPng, so the same bytes) while the main thread draws the next chart.
 * Messages in: { id, svg }; out: { id, png } or { id, error }.
 */
import { parentPort } from 'node:worker_threads';
import { svgToPng } from './figures.js';

parentPort?.on('message', (m: { id: number; svg: string }) => {
  try {
    parentPort?.postMessage({ id: m.id, png: svgToPng(m.svg) });
  } catch (err) {
    parentPort?.postMessage({ id: m.id, error: err instanceof Error ? err.message : String(err) });
  }
});
