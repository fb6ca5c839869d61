import { describe, expect, it } from 'vitest';
import { landscapeFrame } from '../../src/engine/landscape-frame';
import { checkLandmark, motionlessPoint, type StillPointOk } from '../../src/engine/still-point';
import { fitTurn, type TurnFitOk } from '../../src/engine/turn-fit';
import { expectInputError } from './expect-error';
import { cameraOf, fixtureLib, groundPixel, objectMotion, poseOf, renderFrame, sceneNamed, truthTheta } from './turn-scenes';

// The motionless point against the fixture scenes' exact geometry (test/fixtures/lib/geometry.mjs):
// the fixed point on the ground (fixedPointGround, a parallel pass's sight lines all cross it)
// projected into the frame with poseAt. The README of the fixtures: in the tracked clips that column is
// the frame centre. Every scene is invented.

type Lib = Awaited<ReturnType<typeof fixtureLib>>;

/** A fit result carrying the exact motion and no uncertainty: isolates the geometry from the fit. */
function exactFit(lib: Lib, name: string, i: number): TurnFitOk {
  const th = truthTheta(lib, sceneNamed(lib, name), i);
  return {
    ok: true,
    theta: th,
    cov: new Float64Array(36),
    yawRad: th[0]!,
    yawSigmaRad: 0,
    pitchRad: th[1]!,
    rollRad: th[2]!,
    travelForward: th[3]!,
    travelLeft: th[4]!,
    groundBlocks: 0,
    inlierGroundBlocks: 0,
    misfitPx: 0,
  };
}

function fixedPointTruth(lib: Lib, name: string, i: number): { x: number; y: number; distanceM: number } {
  const scene = sceneNamed(lib, name);
  const fp = lib.geo.fixedPointGround(scene);
  const p = poseOf(lib, scene, i);
  const img = groundPixel(lib, scene, i, fp.x, fp.y)!;
  return { x: img.x, y: img.y, distanceM: Math.hypot(fp.x - p.pos.x, fp.y - p.pos.y) };
}

describe('motionless point', () => {
  it.each([
    ['pass-tracked', 12],
    ['pass-tracked', 40],
    ['drift-fixed', 30],
  ])('%s frame %i, exact motion: the fixed point on the ground, to a hundredth of a pixel', async (name, i) => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, name);
    const sp = motionlessPoint(exactFit(lib, name, i), cameraOf(lib, scene, i), { ...objectMotion(lib, scene, i), sigmaPx: 0.01 }, scene.camera.height);
    const truth = fixedPointTruth(lib, name, i);
    expect(sp.ok).toBe(true);
    if (!sp.ok) return;
    // the frame-to-frame step sees the fixed point of the pair's mid time; on a parallel pass it is one
    // point, so the column holds to rounding and the distance to the observer's half-frame travel
    expect(Math.abs(sp.x - truth.x)).toBeLessThan(0.01);
    expect(Math.abs(sp.distanceM! / truth.distanceM - 1)).toBeLessThan(0.005);
    if (name === 'pass-tracked') expect(Math.abs(sp.x - 320)).toBeLessThan(0.01);
  });

  it('behind the observer or no turn: a reason, not a point', async () => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, 'pass-tracked');
    const fit = exactFit(lib, 'pass-tracked', 20);
    const cam = cameraOf(lib, scene, 20);
    const o = objectMotion(lib, scene, 20);
    // an object image moving with the camera's turn: the sight line keeps its bearing
    const still = { ...fit, theta: Float64Array.from(fit.theta) };
    still.theta[0] = 0;
    const none = motionlessPoint(still, cam, { ...o, dx: 0, dy: 0 });
    expect(none.ok).toBe(false);
    const back = motionlessPoint(fit, cam, { ...o, dx: 2 * fit.yawRad * cam.focalPx });
    expect(back.ok).toBe(false);
    if (!back.ok) expect(back.reason).toMatch(/behind the observer/);
  });

  it('names the field of bad input', async () => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, 'pass-tracked');
    const fit = exactFit(lib, 'pass-tracked', 20);
    expectInputError(() => motionlessPoint(fit, cameraOf(lib, scene, 20), { x: NaN, y: 0, dx: 0, dy: 0 }), 'object x');
    expectInputError(() => motionlessPoint(fit, cameraOf(lib, scene, 20), { x: 1, y: 0, dx: 0, dy: 0 }, -1), 'camera height');
  });

  it('from the landscape alone: the column within 5 px, and the mast flagged as at it, the tower not (pass-tracked)', async () => {
    const lib = await fixtureLib();
    const scene = sceneNamed(lib, 'pass-tracked');
    for (const i of [10, 24]) {
      const o = objectMotion(lib, scene, i);
      const a = landscapeFrame(renderFrame(lib, scene, i));
      const b = landscapeFrame(renderFrame(lib, scene, i + 1));
      const cam = cameraOf(lib, scene, i);
      const fit = fitTurn(a, b, cam, { exclude: [{ left: o.x - 30, right: o.x + 30, top: o.y - 20, bottom: o.y + 20 }] });
      expect(fit.ok).toBe(true);
      if (!fit.ok) continue;
      const sp = motionlessPoint(fit, cam, o, scene.camera.height);
      expect(sp.ok).toBe(true);
      if (!sp.ok) continue;
      const truth = fixedPointTruth(lib, 'pass-tracked', i);
      expect(Math.abs(sp.x - truth.x)).toBeLessThan(5);
      // the distance along the sight line: the truth inside the 2-sigma band the fit gives
      const h = scene.camera.height;
      expect(truth.distanceM).toBeGreaterThan(sp.bandH[0] * h);
      expect(truth.distanceM).toBeLessThan(sp.bandH[1] * h);
      for (const lm of scene.landmarks) {
        const base = groundPixel(lib, scene, i, lm.groundX, lm.groundY)!;
        const check = checkLandmark(sp as StillPointOk, { x: base.x, baseY: base.y });
        expect(check.atStill).toBe(lm.atFixedPoint === true);
      }
    }
  });
});
