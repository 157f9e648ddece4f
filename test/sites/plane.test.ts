import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/errors.js';
import { parsePlane, planeAt, planeKey } from '../../src/sites/plane.js';

describe('batch plane', () => {
  it('fixed numbers hold at every site', () => {
    const p = parsePlane('30', '180');
    expect(planeAt(p, 52)).toEqual({ tiltDeg: 30, azimuthDeg: 180 });
    expect(planeAt(p, -33)).toEqual({ tiltDeg: 30, azimuthDeg: 180 });
  });

  it('latitude tilt facing the equator: south in the north, north in the south (azimuth east of north; common practice)', () => {
    const p = parsePlane('latitude', 'Equator');
    expect(planeAt(p, 52.5)).toEqual({ tiltDeg: 52.5, azimuthDeg: 180 });
    expect(planeAt(p, -22.8)).toEqual({ tiltDeg: 22.8, azimuthDeg: 0 });
    expect(planeAt(p, 0)).toEqual({ tiltDeg: 0, azimuthDeg: 180 });
  });

  it('refuses angles out of range and unknown words', () => {
    for (const [t, a] of [['91', '180'], ['-1', '180'], ['30', '361'], ['steep', '180'], ['30', 'south'], ['', '180']]) {
      expect(() => parsePlane(t!, a!)).toThrow(UserError);
    }
  });

  it('the plane enters the question hash as text', () => {
    expect(planeKey(parsePlane('latitude', 'equator'))).toBe('tilt=latitude;azimuth=equator');
    expect(planeKey(parsePlane('30', '180'))).not.toBe(planeKey(parsePlane('30', '170')));
  });
});
