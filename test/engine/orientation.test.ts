import { describe, expect, it } from 'vitest';
import { pitchFromKnownElevationUnchecked, rayAzimuthFromAxis, rayElevation, tiltFromHorizon } from '../../src/engine/orientation';
import { expectInputError } from './expect-error';
import { dirOf, pinhole } from './pinhole';

/*
 * The closed forms of orientation.ts against a camera built the long way: basis vectors for yaw,
 * pitch and roll, and points projected through the pinhole by dot products (the construction the
 * fixture generator uses, test/fixtures/lib/geometry.mjs). Every scene here is invented.
 */

const DEG = Math.PI / 180;
const camera = pinhole;

describe('camera tilt and ray directions (pinhole, DESIGN.md)', () => {
  const W = 1280;
  const H = 720;
  const f = 900;
  const cases = [
    { yaw: 0.3, pitch: 12 * DEG, roll: 0 },
    { yaw: -1.1, pitch: -4 * DEG, roll: 2.5 * DEG },
    { yaw: 2.0, pitch: 25 * DEG, roll: -1 * DEG },
  ];
  for (const c of cases) {
    it(`recovers pitch ${(c.pitch / DEG).toFixed(1)} deg and roll ${(c.roll / DEG).toFixed(1)} deg from two horizon points`, () => {
      const cam = camera(c.yaw, c.pitch, c.roll, f, W, H);
      // two level directions either side of the axis project onto the horizon
      const a = cam.project(dirOf(c.yaw + 0.2, 0));
      const b = cam.project(dirOf(c.yaw - 0.25, 0));
      const t = tiltFromHorizon(a.x, a.y, b.x, b.y, W, H, f);
      expect(t.pitch).toBeCloseTo(c.pitch, 10);
      expect(t.roll).toBeCloseTo(c.roll, 10);
    });
    it(`gives the elevation and azimuth of rays through the picture (yaw ${c.yaw})`, () => {
      const cam = camera(c.yaw, c.pitch, c.roll, f, W, H);
      for (const [dAz, el] of [
        [0.1, 0.05],
        [-0.3, 0.2],
        [0.25, -0.1],
      ] as const) {
        const p = cam.project(dirOf(c.yaw + dAz, el));
        const X = p.x - W / 2;
        const Y = H / 2 - p.y;
        expect(rayElevation(X, Y, f, c)).toBeCloseTo(el, 10);
        expect(rayAzimuthFromAxis(X, Y, f, c)).toBeCloseTo(dAz, 10);
      }
    });
  }

  it('finds a level camera’s pitch from a ground point at a known depression', () => {
    const pitch = 7 * DEG;
    const cam = camera(0.4, pitch, 0, f, W, H);
    // a foot 240 m away, seen from 1.5 m up
    const depression = Math.atan2(1.5, 240);
    const p = cam.project(dirOf(0.4 + 0.15, -depression));
    expect(pitchFromKnownElevationUnchecked(p.x - W / 2, H / 2 - p.y, f, -depression)).toBeCloseTo(pitch, 10);
  });

  it('refuses a horizon too short or too steep to be one, naming the field', () => {
    expectInputError(() => tiltFromHorizon(10, 10, 11, 10, W, H, f), 'horizon length');
    expectInputError(() => tiltFromHorizon(10, 10, 100, 200, W, H, f), 'horizon slope');
    expectInputError(() => tiltFromHorizon(10, Number.NaN, 100, 20, W, H, f), 'horizon first point y');
  });
});
