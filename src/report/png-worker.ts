/**
 * Worker thread that rasterises chart SVGs to PNG while the main thread draws
 * the next chart. Each render runs on libuv's thread pool (resvg's async
 * render, so several at once when cores are free) and is encoded here; the
 * options and calls are svgToPng's, so the bytes are the same.
 * Messages in: { id, svg }; out: { id, png } or { id, error }.
 */
import { parentPort } from 'node:worker_threads';
import { renderAsync } from '@resvg/resvg-js';
import { pngRenderOptions } from './figures.js';

const options = pngRenderOptions();

parentPort?.on('message', (m: { id: number; svg: string }) => {
  renderAsync(m.svg, options)
    .then((image) => parentPort?.postMessage({ id: m.id, png: image.asPng() }))
    .catch((err: unknown) => parentPort?.postMessage({ id: m.id, error: err instanceof Error ? err.message : String(err) }));
});
