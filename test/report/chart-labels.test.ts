/** Label placement without collisions, and one colour domain for compared maps (no browser: the board's own geometry). */
import { describe, expect, test } from 'vitest';
import { boxesOverlap, LabelBoard, textBox, textWidthPx } from '../../src/report/charts/labels.js';
import { MAP_COLOURS, sharedColourDomain } from '../../src/report/charts/map-layers.js';

describe('label board', () => {
  const style = { size: 10 };

  test('a label whose first place is taken goes to the next free candidate', () => {
    const board = new LabelBoard({ x0: 0, y0: 0, x1: 300, y1: 200 });
    const cands = [
      { x: 50, y: 50, anchor: 'start' as const },
      { x: 50, y: 90, anchor: 'start' as const },
    ];
    const a = board.place(cands, '44 %', style);
    const b = board.place(cands, '46 %', style);
    expect(a?.y).toBe(50);
    expect(b?.y).toBe(90);
    expect(boxesOverlap(a!.box, b!.box)).toBe(false);
  });

  test('a label that would leave the bounds or cover a reserved marker is refused', () => {
    const board = new LabelBoard({ x0: 0, y0: 0, x1: 100, y1: 100 });
    board.reserve({ x0: 40, y0: 40, x1: 60, y1: 60 });
    expect(board.place([{ x: 95, y: 50, anchor: 'start' }], 'outside', style)).toBeNull();
    expect(board.place([{ x: 50, y: 55, anchor: 'middle' }], 'on it', style)).toBeNull();
    expect(board.place([{ x: 50, y: 20, anchor: 'middle' }], 'above', style)).not.toBeNull();
  });

  test('a long label is cut with an ellipsis to fit, and keeps its full text', () => {
    const board = new LabelBoard({ x0: 0, y0: 0, x1: 120, y1: 40 });
    const full = 'Mixed-halide lead perovskite (I/Br) window';
    const p = board.placeOrShorten([{ x: 4, y: 20, anchor: 'start' }], full, style, 6);
    expect(p).not.toBeNull();
    expect(p!.text.endsWith('…')).toBe(true);
    expect(p!.full).toBe(full);
    expect(p!.box.x1).toBeLessThanOrEqual(120);
  });

  test('text boxes grow with the text and follow the anchor', () => {
    expect(textWidthPx('100.0 %', style)).toBeGreaterThan(textWidthPx('1 %', style));
    const mid = textBox({ x: 100, y: 50, anchor: 'middle' }, 'abc', style);
    expect((mid.x0 + mid.x1) / 2).toBeCloseTo(100, 9);
    const end = textBox({ x: 100, y: 50, anchor: 'end' }, 'abc', style);
    expect(end.x1).toBeCloseTo(100, 9);
  });
});

describe('one colour domain for compared maps', () => {
  const a = { values: Float64Array.from([0.3, 0.35, NaN, 0.385]) };
  const b = { values: Float64Array.from([0.2, 0.33, 0.37, NaN]) };

  test('reaches the highest value of any map and at most the span below it', () => {
    const d = sharedColourDomain([a, b], 12);
    expect(d.hi).toBeCloseTo(38.5, 9);
    expect(d.lo).toBeCloseTo(26.5, 9);
    expect(sharedColourDomain([b, a], 12)).toEqual(d);
  });

  test('stops at the lowest value when the maps span less than the span', () => {
    const d = sharedColourDomain([a], 12);
    expect(d.lo).toBeCloseTo(30, 9);
  });

  test('the under-range colour is not the out-of-order grey', () => {
    expect(MAP_COLOURS.under).not.toBe(MAP_COLOURS.invalid);
  });
});
