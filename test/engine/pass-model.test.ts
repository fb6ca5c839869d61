import { describe, expect, it } from 'vitest';
import { sightLineFixedPoint } from '../../src/engine/fixedpoint';
import { aspectSine, Axis, closestApproach, fixedPointFractionAt, P, relativePosition, spanAngle } from '../../src/engine/pass-model';

/*
 * The pass model's geometry against constructions done the long way: the two ends of a span placed
 * in space and the angle between their rays taken from the dot and cross products; DESIGN.md's
 * closed forms for the parallel fixed point; the general fixed point of fixedpoint.ts; a brute-force
 * search for the closest approach. Every pass here is invented.
 */

const DEG = Math.PI / 180;
type V = [number, number, number];
const sub = (a: V, b: V): V => [a[0] - b[0], a[1] - b[1], a[2] - b[2]];
const cross = (a: V, b: V): V => [a[1] * b[2] - a[2] * b[1], a[2] * b[0] - a[0] * b[2], a[0] * b[1] - a[1] * b[0]];
const dot = (a: V, b: V) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
const norm = (a: V) => Math.sqrt(dot(a, a));
const angle = (a: V, b: V) => Math.atan2(norm(cross(a, b)), dot(a, b));

/** w, beta, xr, rho, eps as pass-model.ts P orders them. */
function params(w: number, beta: number, xr: number, rho: number, eps: number): Float64Array {
  const p = new Float64Array(5);
  p[P.w] = w;
  p[P.beta] = beta;
  p[P.xr] = xr;
  p[P.rho] = rho;
  p[P.eps] = eps;
  return p;
}

/** The object's centre and axes in space at time t, observer at (u t, 0, 0), built from scratch. */
function world(p: Float64Array, u: number, tr: number, t: number) {
  const w = p[P.w]!;
  const b = p[P.beta]!;
  const y0 = p[P.rho]! * Math.cos(p[P.eps]!);
  const h = p[P.rho]! * Math.sin(p[P.eps]!);
  const obs: V = [u * (t - tr), 0, 0];
  const obj: V = [p[P.xr]! + w * Math.cos(b) * (t - tr), y0 + w * Math.sin(b) * (t - tr), h];
  return { obs, obj, length: [Math.cos(b), Math.sin(b), 0] as V, wing: [-Math.sin(b), Math.cos(b), 0] as V, up: [0, 0, 1] as V };
}

describe('pass geometry', () => {
  const u = 27;
  const tr = 5;
  const passes = [
    { name: 'parallel, the other way', p: params(-75, 0, 300, 640, 12 * DEG) },
    { name: 'parallel, the same way, slower', p: params(22, 0, -80, 260, 14 * DEG) },
    { name: '20 deg off parallel', p: params(-60, 20 * DEG, 150, 500, 8 * DEG) },
    { name: 'high, 30 deg', p: params(-50, 0, -120, 350, 30 * DEG) },
  ];
  for (const { name, p } of passes) {
    it(`${name}: a span's angle is the angle between its ends' rays, whatever its axis`, () => {
      const L = 35;
      const rel = new Float64Array(3);
      for (const t of [0, 2.5, 5, 8.3]) {
        const wld = world(p, u, tr, t);
        relativePosition(p, u, tr, t, rel);
        expect(rel[0]).toBeCloseTo(wld.obj[0] - wld.obs[0], 9);
        for (const [axis, e] of [
          [Axis.LENGTH, wld.length],
          [Axis.WINGSPAN, wld.wing],
          [Axis.HEIGHT, wld.up],
        ] as const) {
          const a = sub([wld.obj[0] + (L / 2) * e[0], wld.obj[1] + (L / 2) * e[1], wld.obj[2] + (L / 2) * e[2]], wld.obs);
          const b = sub([wld.obj[0] - (L / 2) * e[0], wld.obj[1] - (L / 2) * e[1], wld.obj[2] - (L / 2) * e[2]], wld.obs);
          expect(spanAngle(axis, L, p[P.beta]!, rel[0]!, rel[1]!, rel[2]!)).toBeCloseTo(angle(a, b), 12);
          const r = sub(wld.obj, wld.obs);
          expect(aspectSine(axis, p[P.beta]!, rel[0]!, rel[1]!, rel[2]!)).toBeCloseTo(norm(cross(r, e)) / norm(r), 12);
        }
        // a ball of diameter L: 2 atan(L / 2R) for a disc facing the camera
        expect(spanAngle(Axis.SQUARE, L, 0, rel[0]!, rel[1]!, rel[2]!)).toBeCloseTo(2 * Math.atan(L / (2 * norm(sub(wld.obj, wld.obs)))), 12);
      }
    });

    it(`${name}: the closest approach is the least distance over time`, () => {
      const out = new Float64Array(3);
      closestApproach(p, u, tr, out);
      let best = Infinity;
      let bestT = 0;
      for (let t = -200; t <= 200; t += 0.001) {
        const wld = world(p, u, tr, t);
        const d = norm(sub(wld.obj, wld.obs));
        if (d < best) {
          best = d;
          bestT = t;
        }
      }
      expect(out[0]).toBeCloseTo(bestT, 2);
      expect(out[1]).toBeCloseTo(best, 4);
      expect(out[2]).toBeCloseTo(Math.sqrt(best * best - (p[P.rho]! * Math.sin(p[P.eps]!)) ** 2), 3);
    });

    it(`${name}: the motionless point agrees with fixedpoint.ts's general formula`, () => {
      const rel = new Float64Array(3);
      for (const t of [1, 5, 9]) {
        relativePosition(p, u, tr, t, rel);
        const s = fixedPointFractionAt(p, u, rel[0]!, rel[1]!);
        const w = p[P.w]!;
        const fp = sightLineFixedPoint({ x: 0, y: 0 }, { x: u, y: 0 }, { x: rel[0]!, y: rel[1]! }, { x: w * Math.cos(p[P.beta]!), y: w * Math.sin(p[P.beta]!) });
        expect(fp.regime).not.toBe('none');
        if (fp.regime !== 'none') expect(s).toBeCloseTo(fp.fraction, 9);
      }
    });
  }

  it('on parallel tracks the point lies D u / (u - w) from the road at every moment (DESIGN.md, intercept theorem)', () => {
    const rel = new Float64Array(3);
    for (const w of [-75, 22, 45]) {
      const p = params(w, 0, 100, 600, 10 * DEG);
      const D = 600 * Math.cos(10 * DEG);
      for (const t of [0, 3, 7]) {
        relativePosition(p, u, tr, t, rel);
        const s = fixedPointFractionAt(p, u, rel[0]!, rel[1]!);
        expect(s * rel[1]!).toBeCloseTo((D * u) / (u - w), 8);
      }
    }
  });

  it('a length on a parallel pass goes as L rho / R^2 (DESIGN.md "Range over time"), not L / R', () => {
    const p = params(-75, 0, 0, 600, 12 * DEG);
    const rel = new Float64Array(3);
    const L = 38;
    for (const t of [0, 4, 8, 12]) {
      relativePosition(p, u, tr, t, rel);
      const R = Math.hypot(rel[0]!, rel[1]!, rel[2]!);
      const theta = spanAngle(Axis.LENGTH, L, 0, rel[0]!, rel[1]!, rel[2]!);
      expect(theta / ((L * 600) / (R * R))).toBeCloseTo(1, 3);
    }
  });
});
