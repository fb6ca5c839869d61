import { describe, expect, it } from 'vitest';
import { cameraAxes, checkLandscapeCamera, flowBasis, N_PARAMS, warpPixel } from '../../src/engine/ground-motion';
import { expectInputError } from './expect-error';
import { cameraOf, fixtureLib, poseOf, sceneNamed, truthTheta } from './turn-scenes';

// The motion model against the fixture generator's own geometry (test/fixtures/lib/geometry.mjs:
// poseAt and project), which renders the scenes: a ground point seen at a pixel of frame i must land
// where the generator projects it in frame i + 1. Every scene is invented.

describe('ground motion model', () => {
  it.each([
    ['pass-tracked', 40],
    ['drift-fixed', 30],
  ])('%s frame %i: the exact warp puts ground pixels where the generator projects them', async (name, i) => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, name);
    const cam = cameraOf(lib, scene, i);
    const th = truthTheta(lib, scene, i);
    const axA = cameraAxes(0, cam.pitchRad, cam.rollRad, new Float64Array(9));
    const axB = cameraAxes(th[0]!, cam.pitchRad + th[1]!, cam.rollRad + th[2]!, new Float64Array(9));
    const p0 = poseOf(lib, scene, i);
    const p1 = poseOf(lib, scene, i + 1);
    const out = new Float64Array(3);
    let checked = 0;
    for (const [x, y] of [
      [40, 300],
      [320, 270],
      [600, 355],
      [200, 340],
    ] as const) {
      // the generator's ground point under pixel (x, y) of frame i, found on its own ray
      const ray = new Float64Array(3);
      const ax0 = cameraAxes(p0.yaw, p0.pitch, p0.roll, new Float64Array(9));
      const a = x - p0.cx;
      const b = y - p0.cy;
      ray[0] = ax0[6]! * p0.f + ax0[0]! * a - ax0[3]! * b;
      ray[1] = ax0[7]! * p0.f + ax0[1]! * a - ax0[4]! * b;
      ray[2] = ax0[8]! * p0.f + ax0[2]! * a - ax0[5]! * b;
      if (!(ray[2]! < 0)) continue;
      const lam = -p0.pos.z / ray[2]!;
      const truth = lib.geo.project(p1, { x: p0.pos.x + lam * ray[0]!, y: p0.pos.y + lam * ray[1]!, z: 0 })!;
      expect(warpPixel(cam, axA, axB, th, x, y, out)).toBe(true);
      expect(Math.abs(out[0]! - truth.x)).toBeLessThan(1e-6);
      expect(Math.abs(out[1]! - truth.y)).toBeLessThan(1e-6);
      checked++;
    }
    expect(checked).toBeGreaterThanOrEqual(3);
  });

  it('the first-order flow is the derivative of the exact warp (central differences, step 1e-6)', async () => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, 'pass-tracked');
    const cam = { ...cameraOf(lib, scene, 40), rollRad: 0.05 };
    const axA = cameraAxes(0, cam.pitchRad, cam.rollRad, new Float64Array(9));
    const du = new Float64Array(N_PARAMS);
    const dv = new Float64Array(N_PARAMS);
    const lo = new Float64Array(3);
    const hi = new Float64Array(3);
    const numeric = (x: number, y: number, th0: number[], k: number): [number, number] => {
      const h = 1e-6;
      const at = (s: number, out: Float64Array) => {
        const th = [...th0];
        th[k] = th[k]! + s;
        warpPixel(cam, axA, cameraAxes(th[0]!, cam.pitchRad + th[1]!, cam.rollRad + th[2]!, new Float64Array(9)), th, x, y, out);
      };
      at(-h, lo);
      at(h, hi);
      return [(hi[0]! - lo[0]!) / (2 * h), (hi[1]! - lo[1]!) / (2 * h)];
    };
    // a ground pixel (below the horizon, row about 250) and a far one, at rest and moving
    const cases: [number, number, number[], number[]][] = [
      [100, 320, [0, 0, 0, 0, 0, 0], [0, 1, 2, 3, 4]],
      [500, 100, [0, 0, 0, 0, 0, 0.01], [0, 1, 2, 3, 4]],
      [500, 100, [0, 0, 0, 0.3, -0.4, 0], [5]],
    ];
    for (const [x, y, th0, ks] of cases) {
      flowBasis(cam, axA, x, y, th0[3]!, th0[4]!, th0[5]!, du, dv, new Float64Array(3));
      for (const k of ks) {
        const [nu, nv] = numeric(x, y, th0, k);
        const tol = 1e-5 * cam.focalPx + 1e-4 * Math.hypot(nu, nv);
        expect(Math.abs(nu - du[k]!)).toBeLessThan(tol);
        expect(Math.abs(nv - dv[k]!)).toBeLessThan(tol);
      }
    }
  });

  it('names the field of a bad camera', () => {
    expectInputError(() => checkLandscapeCamera({ focalPx: -1, cx: 0, cy: 0, pitchRad: 0, rollRad: 0 }), 'camera focalPx');
    expectInputError(() => checkLandscapeCamera({ focalPx: 800, cx: 0, cy: 0, pitchRad: 2, rollRad: 0 }), 'camera pitchRad');
  });
});
