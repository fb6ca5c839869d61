import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { fixedCameraTrack, type FixedCamera, type TrackSample } from '../../src/engine/track';
import { fitRangeOverTime } from '../../src/engine/fit';
import { InputError } from '../../src/engine/errors';
import { DEG, MAX_RANGE_M } from '../../src/engine/constants';
import { expectInputError } from './expect-error';

/*
 * All scenes are invented. Marks are generated from exact plane geometry (object and camera on
 * straight tracks at constant velocity), the inverse of what fixedCameraTrack does; checks then go
 * through independent routes where there is one (brute-force closest approach, the range-over-time
 * fit on the same ranges).
 */

interface Scene {
  camera: { x: number; y: number }; // velocity, m/s
  objectStart: { x: number; y: number }; // position at t = 0, camera at the origin then
  objectVelocity: { x: number; y: number };
  altitude: number; // m above the camera
  axisHeading: number; // rad
}

function objectAt(s: Scene, t: number) {
  return { x: s.objectStart.x + s.objectVelocity.x * t, y: s.objectStart.y + s.objectVelocity.y * t };
}

function marks(s: Scene, times: number[]): TrackSample[] {
  return times.map((t) => {
    const o = objectAt(s, t);
    const dx = o.x - s.camera.x * t;
    const dy = o.y - s.camera.y * t;
    const horizontal = Math.hypot(dx, dy);
    const sample: TrackSample = {
      t,
      bearing: wrap(Math.atan2(dy, dx) - s.axisHeading),
      range: Math.hypot(horizontal, s.altitude),
    };
    if (s.altitude !== 0) sample.elevation = Math.atan2(s.altitude, horizontal);
    return sample;
  });
}

function wrap(a: number): number {
  return Math.atan2(Math.sin(a), Math.cos(a));
}

function camera(s: Scene): FixedCamera {
  return { axisHeading: s.axisHeading, velocity: s.camera, t0: 0 };
}


const times = [0, 2, 4, 6, 8, 10, 12];

// invented: camera at 25 m/s along x; object 2 km away at 60 m/s on a heading of 150 deg, 400 m up
const SCENE: Scene = {
  camera: { x: 25, y: 0 },
  objectStart: { x: 2000 * Math.cos(50 * DEG), y: 2000 * Math.sin(50 * DEG) },
  objectVelocity: { x: 60 * Math.cos(150 * DEG), y: 60 * Math.sin(150 * DEG) },
  altitude: 400,
  axisHeading: 60 * DEG,
};

describe('fixedCameraTrack: moving camera', () => {
  const samples = marks(SCENE, times);
  const track = fixedCameraTrack(samples, camera(SCENE));

  it('keeps every mark within the frame of a camera pointed 60 deg off the road (scene sanity)', () => {
    for (const s of samples) expect(Math.abs(s.bearing)).toBeLessThan(45 * DEG);
  });

  it('recovers the object speed 60 m/s and heading 150 deg (plane geometry)', () => {
    expect(track.speed).toBeCloseTo(60, 9);
    expect(track.heading / DEG).toBeCloseTo(150, 9);
    expect(track.velocity.x).toBeCloseTo(SCENE.objectVelocity.x, 9);
    expect(track.velocity.y).toBeCloseTo(SCENE.objectVelocity.y, 9);
    expect(track.relativeVelocity.x).toBeCloseTo(SCENE.objectVelocity.x - 25, 9);
    expect(track.relativeVelocity.y).toBeCloseTo(SCENE.objectVelocity.y, 9);
    expect(track.residualRms!).toBeLessThan(1e-9);
  });

  it('places each mark where the object was, horizontally, in the ground frame', () => {
    track.positions.forEach((p, i) => {
      const o = objectAt(SCENE, times[i]!);
      expect(p.t).toBe(times[i]);
      expect(p.x).toBeCloseTo(o.x, 8);
      expect(p.y).toBeCloseTo(o.y, 8);
    });
  });

  it('closest approach matches a brute-force search over time and the range-over-time fit', () => {
    // brute force: least horizontal distance on a 1 ms grid over a wide window
    let best = Infinity;
    let bestT = 0;
    for (let t = -200; t <= 200; t += 0.001) {
      const o = objectAt(SCENE, t);
      const d = Math.hypot(o.x - 25 * t, o.y);
      if (d < best) {
        best = d;
        bestT = t;
      }
    }
    expect(track.closestApproach).toBeCloseTo(best, 3);
    expect(track.tClosest!).toBeCloseTo(bestT, 2);
    // independent method: fit R(t)^2 = D^2 + V^2 (t - t0)^2 to the slant ranges; D' includes altitude
    const fit = fitRangeOverTime(samples.map((s) => ({ t: s.t, range: s.range, sigma: 0.001 * s.range })));
    expect(fit.closestApproach).toBeCloseTo(Math.hypot(track.closestApproach, SCENE.altitude), 4);
    expect(fit.relativeSpeed).toBeCloseTo(Math.hypot(track.relativeVelocity.x, track.relativeVelocity.y), 6);
    expect(fit.tClosest).toBeCloseTo(track.tClosest!, 5);
  });

  it('measures positions from the camera at t0; the default t0 is the first sample', () => {
    const later = marks(SCENE, times).map((s) => ({ ...s, t: s.t + 100 }));
    const a = fixedCameraTrack(later, { axisHeading: SCENE.axisHeading, velocity: SCENE.camera });
    const b = fixedCameraTrack(later, { axisHeading: SCENE.axisHeading, velocity: SCENE.camera, t0: 90 });
    expect(a.positions[0]!.x).toBeCloseTo(track.positions[0]!.x, 8);
    // with t0 ten seconds earlier the camera, and so every position, sits 250 m further along x
    expect(b.positions[0]!.x - a.positions[0]!.x).toBeCloseTo(250, 8);
    expect(b.velocity.x).toBeCloseTo(a.velocity.x, 9);
    expect(b.closestApproach).toBeCloseTo(a.closestApproach, 6);
    expect(b.tClosest!).toBeCloseTo(track.tClosest! + 100, 6);
  });
});

describe('fixedCameraTrack: tripod', () => {
  it('recovers a crossing object from a camera that does not move', () => {
    // invented: tripod pointed north-east (+45 deg); object crosses 3 km out at 90 m/s, heading -80 deg
    const scene: Scene = {
      camera: { x: 0, y: 0 },
      objectStart: { x: 2500, y: 1700 },
      objectVelocity: { x: 90 * Math.cos(-80 * DEG), y: 90 * Math.sin(-80 * DEG) },
      altitude: 0,
      axisHeading: 45 * DEG,
    };
    const t = fixedCameraTrack(marks(scene, times), camera(scene));
    expect(t.speed).toBeCloseTo(90, 9);
    expect(t.heading / DEG).toBeCloseTo(-80, 9);
    expect(t.relativeVelocity).toEqual(t.velocity);
  });

  it('reports a still object as speed 0 with no time of closest approach', () => {
    const t = fixedCameraTrack(
      [0, 1, 2, 3].map((s) => ({ t: s, bearing: 10 * DEG, range: 500 })),
      { axisHeading: 0, velocity: { x: 0, y: 0 } },
    );
    expect(t.speed).toBeLessThan(1e-12);
    expect(t.heading).toBe(Math.atan2(t.velocity.y, t.velocity.x));
    expect(t.closestApproach).toBeCloseTo(500, 9);
    expect(t.tClosest).toBeNull();
  });
});

describe('fixedCameraTrack: conventions and residual', () => {
  it('puts a positive bearing toward +y when the axis points along +x', () => {
    const t = fixedCameraTrack(
      [
        { t: 0, bearing: 10 * DEG, range: 100 },
        { t: 1, bearing: 10 * DEG, range: 100 },
      ],
      { axisHeading: 0, velocity: { x: 0, y: 0 } },
    );
    expect(t.positions[0]!.y).toBeCloseTo(100 * Math.sin(10 * DEG), 12);
    expect(t.positions[0]!.x).toBeCloseTo(100 * Math.cos(10 * DEG), 12);
  });

  it('uses the horizontal part of a slant range: elevation 60 deg halves it', () => {
    const t = fixedCameraTrack(
      [
        { t: 0, bearing: 0, range: 1000, elevation: 60 * DEG },
        { t: 1, bearing: 0, range: 1000, elevation: 60 * DEG },
      ],
      { axisHeading: 0, velocity: { x: 0, y: 0 } },
    );
    expect(t.positions[1]!.x).toBeCloseTo(500, 9);
  });

  it('gives no residual for two samples and the hand-computed one for three', () => {
    const still = { axisHeading: 0, velocity: { x: 0, y: 0 } };
    const two = fixedCameraTrack(
      [
        { t: 0, bearing: 0, range: 100 },
        { t: 1, bearing: 0, range: 110 },
      ],
      still,
    );
    expect(two.residualRms).toBeNull();
    expect(two.velocity.x).toBeCloseTo(10, 12);
    // by hand: x = 100, 112, 120 at t = 0, 1, 2; least squares gives slope 10 through the means
    // (1, 110.667), so the line is 100.667 + 10 t; residuals -2/3, +4/3, -2/3; sum of squares 8/3,
    // divided by n - 2 = 1
    const three = fixedCameraTrack(
      [
        { t: 0, bearing: 0, range: 100 },
        { t: 1, bearing: 0, range: 112 },
        { t: 2, bearing: 0, range: 120 },
      ],
      still,
    );
    expect(three.velocity.x).toBeCloseTo(10, 12);
    expect(three.residualRms!).toBeCloseTo(Math.sqrt(8 / 3), 12);
  });
});

describe('fixedCameraTrack: properties (fast-check)', () => {
  const arbScene = fc.record({
    cvx: fc.double({ min: -40, max: 40, noNaN: true }),
    cvy: fc.double({ min: -5, max: 5, noNaN: true }),
    dist: fc.double({ min: 200, max: 20000, noNaN: true }),
    az: fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }),
    speed: fc.double({ min: 0, max: 300, noNaN: true }),
    hdg: fc.double({ min: -Math.PI, max: Math.PI, noNaN: true }),
    altitude: fc.double({ min: 0, max: 3000, noNaN: true }),
    ticks: fc.uniqueArray(fc.integer({ min: 0, max: 120 }), { minLength: 2, maxLength: 12 }),
  });

  it('recovers any straight constant-velocity track seen within the frame', () => {
    fc.assert(
      fc.property(arbScene, (a) => {
        const ts = [...a.ticks].sort((x, y) => x - y).map((k) => k / 2);
        const scene: Scene = {
          camera: { x: a.cvx, y: a.cvy },
          objectStart: { x: a.dist * Math.cos(a.az), y: a.dist * Math.sin(a.az) },
          objectVelocity: { x: a.speed * Math.cos(a.hdg), y: a.speed * Math.sin(a.hdg) },
          altitude: a.altitude,
          axisHeading: 0,
        };
        // point the camera at the object's direction at mid-clip, then keep only clips it stays in
        const mid = 0.5 * (ts[0]! + ts[ts.length - 1]!);
        const o = objectAt(scene, mid);
        scene.axisHeading = Math.atan2(o.y - a.cvy * mid, o.x - a.cvx * mid);
        const samples = marks(scene, ts);
        fc.pre(samples.every((s) => Math.abs(s.bearing) < 80 * DEG && s.range > 50 && s.range < MAX_RANGE_M));
        const t = fixedCameraTrack(samples, camera(scene));
        expect(Math.abs(t.velocity.x - scene.objectVelocity.x)).toBeLessThan(1e-6);
        expect(Math.abs(t.velocity.y - scene.objectVelocity.y)).toBeLessThan(1e-6);
        expect(Math.abs(t.speed - a.speed)).toBeLessThan(1e-6);
        if (a.speed > 1) expect(Math.abs(wrap(t.heading - a.hdg))).toBeLessThan(1e-6);
        if (ts.length > 2) expect(t.residualRms!).toBeLessThan(1e-6);
        else expect(t.residualRms).toBeNull();
        expect(t.closestApproach).toBeGreaterThanOrEqual(0);
        expect(Number.isFinite(t.closestApproach)).toBe(true);
      }),
      { numRuns: 300, seed: 17 },
    );
  });

  it('throws InputError naming the field for any one bad value', () => {
    const good = (): TrackSample[] => [
      { t: 0, bearing: 0.1, range: 1000, elevation: 0.05 },
      { t: 1, bearing: 0.12, range: 1010, elevation: 0.05 },
      { t: 2, bearing: 0.14, range: 1020, elevation: 0.05 },
    ];
    const cases: [keyof TrackSample, number][] = [
      ['t', NaN],
      ['t', -1],
      ['bearing', 90 * DEG],
      ['bearing', -90 * DEG],
      ['bearing', Infinity],
      ['range', 0],
      ['range', -3],
      ['range', 2 * MAX_RANGE_M],
      ['elevation', 90 * DEG],
      ['elevation', -90 * DEG],
      ['elevation', NaN],
    ];
    fc.assert(
      fc.property(fc.integer({ min: 0, max: 2 }), fc.constantFrom(...cases), (i, [key, value]) => {
        const s = good();
        (s[i] as unknown as Record<string, number>)[key] = value;
        const field = key === 't' ? `timestamp[${i}]` : `${key}[${i}]`;
        let caught: unknown;
        try {
          fixedCameraTrack(s, { axisHeading: 0.3, velocity: { x: 20, y: 0 } });
        } catch (e) {
          caught = e;
        }
        expect(caught).toBeInstanceOf(InputError);
        expect((caught as InputError).field).toBe(field);
      }),
      { numRuns: 150, seed: 18 },
    );
  });

  it('throws InputError for bad sample lists and cameras', () => {
    const cam = { axisHeading: 0, velocity: { x: 0, y: 0 } };
    const one = [{ t: 0, bearing: 0, range: 100 }];
    expectInputError(() => fixedCameraTrack(one, cam), 'samples', { exactField: true });
    expectInputError(() => fixedCameraTrack(null as unknown as TrackSample[], cam), 'samples', { exactField: true });
    const same = [
      { t: 3, bearing: 0, range: 100 },
      { t: 3, bearing: 0, range: 100 },
    ];
    expectInputError(() => fixedCameraTrack(same, cam), 'timestamp[1]', { exactField: true });
    const backwards = [
      { t: 3, bearing: 0, range: 100 },
      { t: 2, bearing: 0, range: 100 },
    ];
    expectInputError(() => fixedCameraTrack(backwards, cam), 'timestamp[1]', { exactField: true });
    const ok = [
      { t: 0, bearing: 0, range: 100 },
      { t: 1, bearing: 0, range: 100 },
    ];
    expectInputError(() => fixedCameraTrack(ok, { axisHeading: NaN, velocity: { x: 0, y: 0 } }), 'camera axis heading', { exactField: true });
    expectInputError(() => fixedCameraTrack(ok, { axisHeading: 0, velocity: { x: NaN, y: 0 } }), 'camera velocity x', { exactField: true });
    expectInputError(() => fixedCameraTrack(ok, { axisHeading: 0, velocity: { x: 0, y: 5000 } }), 'camera velocity y', { exactField: true });
    expectInputError(() => fixedCameraTrack(ok, { axisHeading: 0, velocity: { x: 800, y: 800 } }), 'camera speed', { exactField: true });
    expectInputError(
      () => fixedCameraTrack(ok, { axisHeading: 0, velocity: undefined as unknown as { x: number; y: number } }),
      'camera velocity',
      { exactField: true },
    );
    expectInputError(() => fixedCameraTrack(ok, { axisHeading: 0, velocity: { x: 0, y: 0 }, t0: -5 }), 'camera t0', { exactField: true });
    expectInputError(() => fixedCameraTrack(ok, undefined as unknown as FixedCamera), 'camera', { exactField: true });
  });

  it('leaves its inputs untouched', () => {
    const samples = marks(SCENE, times);
    const cam = camera(SCENE);
    const copy = JSON.parse(JSON.stringify({ samples, cam }));
    fixedCameraTrack(samples, cam);
    expect({ samples, cam }).toEqual(copy);
  });
});
