import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import { MAX_SNAP_RADIUS_PX, sampleCount, sampleLine, snapAlong, type Gray } from '../../src/engine/snap';
import { Rng } from '../../src/engine/rng';
import { expectInputError } from './expect-error';

/*
 * Synthetic images rendered analytically: an edge is the line n . p = c (n a unit normal, the bright
 * side where n . p > c), blurred by a Gaussian of sigma `blur` px, and each pixel holds the mean of
 * that picture over its area (a camera pixel integrates light). Crisp edges use the exact area of
 * the pixel on the bright side (polygon clipping); blurred edges across an axis use the exact
 * integral of the normal CDF; blurred slanted ones average 12 x 12 points per pixel.
 */

/** erfc by the Chebyshev fit of Numerical Recipes (2nd ed., section 6.2, erfcc): fractional error < 1.2e-7. */
function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r =
    t *
    Math.exp(
      -z * z - 1.26551223 +
        t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? r : 2 - r;
}
const Phi = (u: number) => 0.5 * erfc(-u / Math.SQRT2);

/** Area of the unit pixel [i, i+1] x [j, j+1] on the side n . p > c (Sutherland-Hodgman, then shoelace). */
function coverage(i: number, j: number, nx: number, ny: number, c: number): number {
  const pts: [number, number][] = [
    [i, j],
    [i + 1, j],
    [i + 1, j + 1],
    [i, j + 1],
  ];
  const out: [number, number][] = [];
  for (let k = 0; k < 4; k++) {
    const a = pts[k]!;
    const b = pts[(k + 1) % 4]!;
    const fa = nx * a[0] + ny * a[1] - c;
    const fb = nx * b[0] + ny * b[1] - c;
    if (fa >= 0) out.push(a);
    if (fa >= 0 !== fb >= 0) {
      const t = fa / (fa - fb);
      out.push([a[0] + t * (b[0] - a[0]), a[1] + t * (b[1] - a[1])]);
    }
  }
  let area = 0;
  for (let k = 0; k < out.length; k++) {
    const a = out[k]!;
    const b = out[(k + 1) % out.length]!;
    area += a[0] * b[1] - b[0] * a[1];
  }
  return Math.abs(area) / 2;
}

interface EdgeSpec {
  nx: number;
  ny: number;
  c: number;
  contrast: number;
  blur: number;
}

/** Float image of one or more edges over a base level. */
function render(w: number, h: number, edges: EdgeSpec[], baseLevel = 50): Gray {
  const d = new Float32Array(w * h);
  for (let j = 0; j < h; j++) {
    for (let i = 0; i < w; i++) {
      let v = baseLevel;
      for (const e of edges) v += e.contrast * pixelFraction(i, j, e);
      d[j * w + i] = v;
    }
  }
  return { data: d, width: w, height: h, channels: 1 };
}

function pixelFraction(i: number, j: number, e: EdgeSpec): number {
  if (e.blur === 0) return coverage(i, j, e.nx, e.ny, e.c);
  if (e.ny === 0 && e.nx === 1) {
    // mean of Phi((x - c) / s) over [i, i+1]: G(u) = u Phi(u / s) + s phi(u / s) is its antiderivative
    const s = e.blur;
    const G = (u: number) => u * Phi(u / s) + (s * Math.exp(-0.5 * (u / s) ** 2)) / Math.sqrt(2 * Math.PI);
    return G(i + 1 - e.c) - G(i - e.c);
  }
  const n = 12;
  let acc = 0;
  for (let a = 0; a < n; a++) {
    for (let b = 0; b < n; b++) acc += Phi((e.nx * (i + (a + 0.5) / n) + e.ny * (j + (b + 0.5) / n) - e.c) / e.blur);
  }
  return acc / (n * n);
}

const vertical = (x: number, contrast = 150, blur = 0): EdgeSpec => ({ nx: 1, ny: 0, c: x, contrast, blur });

function withNoise(img: Gray, sd: number, rng: Rng): Gray {
  const d = new Float32Array(img.data);
  for (let i = 0; i < d.length; i++) d[i] = d[i]! + sd * rng.normal();
  return { ...img, data: d };
}

/** Distance of p from the edge line, along its normal. */
const off = (p: { x: number; y: number }, e: EdgeSpec) => e.nx * p.x + e.ny * p.y - e.c;

describe('sampleLine', () => {
  // a plane sampled at pixel centres is reproduced exactly by bilinear interpolation inside the image
  const W = 20;
  const H = 16;
  const plane = (x: number, y: number) => 3 + 2 * x - 0.5 * y;
  const img: Gray = (() => {
    const d = new Float32Array(W * H);
    for (let j = 0; j < H; j++) for (let i = 0; i < W; i++) d[j * W + i] = plane(i + 0.5, j + 0.5);
    return { data: d, width: W, height: H, channels: 1 };
  })();

  it('samples every step from the first end, pixel centres at integer + 0.5 (a plane comes back exact)', () => {
    const s = sampleLine(img, 2.5, 3.5, 14.5, 12.5, 0.25);
    expect(s.length).toBe(sampleCount(2.5, 3.5, 14.5, 12.5, 0.25));
    expect(s.length).toBe(61); // length 15 px
    for (let k = 0; k < s.length; k++) {
      const t = (k * 0.25) / 15;
      expect(s[k]).toBeCloseTo(plane(2.5 + 12 * t, 3.5 + 9 * t), 4);
    }
  });

  it('at a pixel centre returns that pixel; halfway between two centres their mean', () => {
    const d = new Float32Array([10, 30, 50, 70]);
    const g: Gray = { data: d, width: 4, height: 1, channels: 1 };
    expect(sampleLine(g, 1.5, 0.5, 1.5, 0.5)[0]).toBe(30);
    expect(sampleLine(g, 2, 0.5, 2, 0.5)[0]).toBe(40);
    // beyond the border the border pixel repeats
    expect(sampleLine(g, -3, 0.5, -3, 0.5)[0]).toBe(10);
    expect(sampleLine(g, 4, 0.5, 4, 0.5)[0]).toBe(70);
  });

  it('takes BT.709 luma (0.2126, 0.7152, 0.0722) of RGBA data as given, ignoring alpha', () => {
    const d = new Uint8ClampedArray(4 * 4);
    for (let i = 0; i < 4; i++) d.set([200, 100, 50, i * 60], i * 4);
    const s = sampleLine({ data: d, width: 2, height: 2, channels: 4 }, 0.2, 0.3, 1.8, 1.7);
    for (const v of s) expect(v).toBeCloseTo(0.2126 * 200 + 0.7152 * 100 + 0.0722 * 50, 4);
  });

  it('writes into a given buffer: itself when it fits exactly, else a view of its start', () => {
    const n = sampleCount(2.5, 3.5, 6.5, 3.5, 0.5);
    expect(n).toBe(9);
    const exact = new Float32Array(n);
    expect(sampleLine(img, 2.5, 3.5, 6.5, 3.5, 0.5, exact)).toBe(exact);
    const big = new Float32Array(20).fill(-1);
    const v = sampleLine(img, 2.5, 3.5, 6.5, 3.5, 0.5, big);
    expect(v.length).toBe(9);
    expect(v.buffer).toBe(big.buffer);
    expect(big[8]).toBeCloseTo(plane(6.5, 3.5), 4);
    expect(big[9]).toBe(-1);
    expectInputError(() => sampleLine(img, 2.5, 3.5, 6.5, 3.5, 0.5, new Float32Array(8)), 'sample buffer length');
  });

  it('a length that is not a whole number of steps stops short of the far end; a point gives one sample', () => {
    expect(sampleCount(0, 0, 1, 0, 0.3)).toBe(4);
    expect(sampleCount(0, 0, 3, 4, 0.25)).toBe(21);
    expect(sampleCount(5, 5, 5, 5)).toBe(1);
  });

  it('rejects bad images, segments and steps, naming the field', () => {
    expectInputError(() => sampleLine({ ...img, width: 0 }, 0, 0, 1, 1), 'image width');
    expectInputError(() => sampleLine({ ...img, height: 2.5 }, 0, 0, 1, 1), 'image height');
    expectInputError(() => sampleLine({ ...img, channels: 3 as 1 }, 0, 0, 1, 1), 'image channels');
    expectInputError(() => sampleLine({ ...img, data: new Float32Array(10) }, 0, 0, 1, 1), 'image data length');
    expectInputError(() => sampleLine({ ...img, data: [1, 2] as unknown as Float32Array }, 0, 0, 1, 1), 'image data');
    expectInputError(() => sampleLine(img, NaN, 0, 1, 1), 'line start x');
    expectInputError(() => sampleLine(img, 0, 0, 1, Infinity), 'line end y');
    expectInputError(() => sampleLine(img, 0, 0, 1, 1, 0), 'sample step');
    expectInputError(() => sampleCount(0, 0, 1, 1, -1), 'sample step');
    expectInputError(() => sampleLine(null as unknown as Gray, 0, 0, 1, 1), 'image');
  });
});

describe('snapAlong: noise-free edges', () => {
  it('finds a crisp edge at any sub-pixel position within 0.05 px, searching either way', () => {
    for (let f = 0; f < 1; f += 0.1) {
      const e = vertical(20 + f);
      const img = render(44, 14, [e]);
      for (const [x0, dir] of [
        [21.7, 1],
        [18.2, -1],
        [23.9, -1],
        [16.1, 1],
        [20.05, 1],
      ] as const) {
        const r = snapAlong(img, x0, 7.3, dir, 0);
        expect(r).not.toBeNull();
        expect(Math.abs(r!.x - e.c)).toBeLessThan(0.05);
        expect(r!.y).toBe(7.3);
        expect(r!.offsetPx * dir).toBeCloseTo(r!.x - x0, 9);
      }
    }
  });

  it('finds a crisp horizontal edge searching along y, and a dark-to-bright edge as well as bright-to-dark', () => {
    const e: EdgeSpec = { nx: 0, ny: 1, c: 11.37, contrast: -120, blur: 0 };
    const img = render(16, 26, [e], 180);
    const r = snapAlong(img, 8.2, 13.9, 0, -1)!;
    expect(Math.abs(r.y - 11.37)).toBeLessThan(0.05);
    expect(r.x).toBeCloseTo(8.2, 12);
  });

  it('finds crisp slanted edges within 0.05 px, searching along the normal or along x', () => {
    for (const deg of [8, 23, 45, 61, 80]) {
      const a = (deg * Math.PI) / 180;
      for (const shift of [0, 0.3, 0.55, 0.8]) {
        const x0 = 20.1 + shift;
        const y0 = 19.7;
        const e: EdgeSpec = { nx: Math.cos(a), ny: Math.sin(a), c: Math.cos(a) * x0 + Math.sin(a) * y0, contrast: 150, blur: 0 };
        const img = render(40, 40, [e]);
        const r1 = snapAlong(img, x0 - 1.3 * e.nx, y0 - 1.3 * e.ny, e.nx, e.ny)!;
        expect(Math.abs(off(r1, e))).toBeLessThan(0.05);
        if (deg <= 61) {
          const r2 = snapAlong(img, x0 + 1.1, y0, -1, 0)!;
          expect(Math.abs(off(r2, e))).toBeLessThan(0.05);
        }
      }
    }
  });

  it('finds Gaussian-blurred edges (sigma 0.7, 1.5, 2.5 px) within 0.15 px, axis-aligned and slanted', () => {
    for (const blur of [0.7, 1.5, 2.5]) {
      for (let f = 0; f < 1; f += 0.2) {
        const e = vertical(20 + f, 150, blur);
        const r = snapAlong(render(44, 12, [e]), 21.7, 6.2, 1, 0)!;
        expect(Math.abs(r.x - e.c)).toBeLessThan(0.15);
      }
      const a = (33 * Math.PI) / 180;
      const e: EdgeSpec = { nx: Math.cos(a), ny: Math.sin(a), c: Math.cos(a) * 20.4 + Math.sin(a) * 20.2, contrast: 100, blur };
      const img = render(40, 40, [e]);
      expect(Math.abs(off(snapAlong(img, 22, 20.2, -1, 0)!, e))).toBeLessThan(0.15);
      expect(Math.abs(off(snapAlong(img, 20.4 - 2 * e.nx, 20.2 - 2 * e.ny, e.nx, e.ny)!, e))).toBeLessThan(0.15);
    }
  });

  it('works on RGBA canvas data rounded to whole levels (luma of the two colours)', () => {
    const w = 40;
    const h = 10;
    const d = new Uint8ClampedArray(w * h * 4);
    const edgeX = 17.62;
    for (let j = 0; j < h; j++) {
      for (let i = 0; i < w; i++) {
        const t = Math.min(1, Math.max(0, i + 1 - edgeX)); // share of the pixel right of the edge
        const k = (j * w + i) * 4;
        d[k] = 30 + t * 190; // Uint8ClampedArray rounds
        d[k + 1] = 60 + t * 120;
        d[k + 2] = 200 - t * 150;
        d[k + 3] = 255;
      }
    }
    const r = snapAlong({ data: d, width: w, height: h, channels: 4 }, 15.5, 5, 1, 0)!;
    expect(Math.abs(r.x - edgeX)).toBeLessThan(0.05);
  });

  it('normalises the direction: (2, 0) snaps like (1, 0), and (-1, 0) to the same point with the sign of the offset flipped', () => {
    const img = render(44, 12, [vertical(20.3, 150, 1)]);
    const a = snapAlong(img, 22, 6, 1, 0)!;
    const b = snapAlong(img, 22, 6, 2, 0)!;
    const c = snapAlong(img, 22, 6, -1, 0)!;
    expect(b.x).toBeCloseTo(a.x, 12);
    expect(c.x).toBeCloseTo(a.x, 6);
    expect(c.offsetPx).toBeCloseTo(-a.offsetPx, 6);
  });

  it('strength is the peak gradient: linear in the contrast, and lower for a blurred edge', () => {
    const s1 = snapAlong(render(44, 12, [vertical(20.3, 100, 1)]), 22, 6, 1, 0)!.strength;
    const s2 = snapAlong(render(44, 12, [vertical(20.3, 200, 1)]), 22, 6, 1, 0)!.strength;
    const s3 = snapAlong(render(44, 12, [vertical(20.3, 100, 2.5)]), 22, 6, 1, 0)!.strength;
    expect(s2 / s1).toBeCloseTo(2, 4);
    expect(s3).toBeLessThan(s1 * 0.6);
    // an erf step of contrast C blurred by s has peak gradient C / (sqrt(2 pi) s); pixels and the
    // light smoothing widen it a little, so the found peak lies a little below
    expect(s3).toBeLessThan(100 / (Math.sqrt(2 * Math.PI) * 2.5));
    expect(s3).toBeGreaterThan(0.9 * (100 / (Math.sqrt(2 * Math.PI) * 2.5)));
  });

  it('gives the floor sigma of 0.1 px to a clean crisp edge', () => {
    const r = snapAlong(render(44, 12, [vertical(20.3)]), 22, 6, 1, 0)!;
    expect(r.sigmaPx).toBe(0.1);
  });

  it('property: crisp edges at any angle and offset, snapped from up to 4 px away along the normal, are found within 0.05 px', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 2 * Math.PI, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: -4, max: 4, noNaN: true }),
        (a, f, start) => {
          const x0 = 16 + f;
          const y0 = 16.3;
          const e: EdgeSpec = { nx: Math.cos(a), ny: Math.sin(a), c: Math.cos(a) * x0 + Math.sin(a) * y0, contrast: 120, blur: 0 };
          const img = render(32, 32, [e]);
          const r = snapAlong(img, x0 + start * e.nx, y0 + start * e.ny, e.nx, e.ny);
          expect(r).not.toBeNull();
          expect(Math.abs(off(r!, e))).toBeLessThan(0.05);
          expect(r!.sigmaPx).toBeGreaterThanOrEqual(0.1);
          expect(r!.sigmaPx).toBeLessThanOrEqual(3);
        },
      ),
      { numRuns: 60 },
    );
  });
});

describe('snapAlong: what is not an edge', () => {
  it('returns null on a flat image, float or 8-bit', () => {
    expect(snapAlong(render(30, 30, []), 15, 15, 1, 0)).toBeNull();
    const u = new Uint8ClampedArray(30 * 30 * 4).fill(128);
    expect(snapAlong({ data: u, width: 30, height: 30, channels: 4 }, 15, 15, 0.6, 0.8)).toBeNull();
  });

  it('returns null on a smooth ramp (a constant gradient does not stand out)', () => {
    const d = new Float32Array(40 * 10);
    for (let j = 0; j < 10; j++) for (let i = 0; i < 40; i++) d[j * 40 + i] = 20 + 3 * (i + 0.5);
    expect(snapAlong({ data: d, width: 40, height: 10, channels: 1 }, 20, 5, 1, 0)).toBeNull();
  });

  it('finds an edge on a ramp all the same', () => {
    const img = render(44, 12, [vertical(21.4, 80, 0.8)]);
    const d = new Float32Array(img.data);
    for (let j = 0; j < 12; j++) for (let i = 0; i < 44; i++) d[j * 44 + i] = d[j * 44 + i]! + 2 * (i + 0.5);
    const r = snapAlong({ ...img, data: d }, 23, 6, -1, 0)!;
    expect(Math.abs(r.x - 21.4)).toBeLessThan(0.05);
  });

  it('returns null on pure noise for all of 100 seeded fields (5-sigma rule)', () => {
    const rng = new Rng(2024);
    let found = 0;
    for (let t = 0; t < 100; t++) {
      const img = withNoise(render(40, 24, []), 6, rng);
      if (snapAlong(img, 20, 12, rng.between(-1, 1), rng.between(-1, 1) + 0.01)) found++;
    }
    expect(found).toBe(0);
  });

  it('returns null when the only edge lies beyond the radius', () => {
    const img = render(44, 12, [vertical(30.2)]);
    expect(snapAlong(img, 20, 6, 1, 0, 6)).toBeNull();
    expect(snapAlong(img, 20, 6, 1, 0, 12)).not.toBeNull();
  });

  it('ignores a second, weaker edge inside the radius, of either polarity', () => {
    for (const second of [60, -60]) {
      const img = render(44, 12, [vertical(20.3, 150, 0.6), vertical(24.1, second, 0.6)]);
      for (const x0 of [21, 23.5, 25.5]) {
        const r = snapAlong(img, x0, 6, 1, 0)!;
        expect(Math.abs(r.x - 20.3)).toBeLessThan(0.05);
      }
    }
  });
});

describe('snapAlong: noise (seeded) and sigmaPx', () => {
  /** rms error and rms sigma over many noisy copies of one image. */
  function trial(e: EdgeSpec, sd: number, seed: number, n = 150) {
    const rng = new Rng(seed);
    const clean = render(44, 24, [e]);
    let se = 0;
    let ss = 0;
    let sum = 0;
    let k = 0;
    for (let t = 0; t < n; t++) {
      const x0 = e.c + rng.between(-2, 2);
      const r = snapAlong(withNoise(clean, sd, rng), x0, 12.3, 1, 0);
      if (r === null) continue;
      se += (r.x - e.c) ** 2;
      ss += r.sigmaPx ** 2;
      sum += r.x - e.c;
      k++;
    }
    return { rmsErr: Math.sqrt(se / k), rmsSigma: Math.sqrt(ss / k), bias: sum / k, found: k };
  }

  // noise sd per pixel, contrast 100; the ratio of the scatter to sigmaPx must be near 1 (0.7 to 1.4)
  const cases: [string, EdgeSpec, number][] = [
    ['crisp edge, noise 10', vertical(20.37, 100, 0), 10],
    ['crisp edge, noise 20', vertical(20.37, 100, 0), 20],
    ['blur 1 px, noise 15', vertical(20.37, 100, 1), 15],
    ['blur 2 px, noise 10', vertical(20.37, 100, 2), 10],
    ['blur 3 px, noise 6', vertical(20.37, 100, 3), 6],
  ];
  for (const [name, e, sd] of cases) {
    it(`${name}: the scatter of the snapped edge matches sigmaPx, without bias`, () => {
      const r = trial(e, sd, 77);
      expect(r.found).toBeGreaterThanOrEqual(145);
      expect(r.rmsErr / r.rmsSigma).toBeGreaterThan(0.7);
      expect(r.rmsErr / r.rmsSigma).toBeLessThan(1.4);
      expect(Math.abs(r.bias)).toBeLessThan((3 * r.rmsErr) / Math.sqrt(r.found) + 0.02);
    });
  }

  /**
   * Cramer-Rao bound on the edge position from three rows of pixels with white noise sd (the
   * profile averages three lines): 1 / sqrt(Fisher information), the information being
   * 3 sum_i (d mu_i / d e)^2 / sd^2 with mu_i the pixel means, differentiated numerically.
   */
  function cramerRao(e: EdgeSpec, sd: number): number {
    let info = 0;
    const d = 1e-4;
    for (let i = 0; i < 44; i++) {
      const up = pixelFraction(i, 0, { ...e, c: e.c + d });
      const dn = pixelFraction(i, 0, { ...e, c: e.c - d });
      info += ((e.contrast * (up - dn)) / (2 * d)) ** 2;
    }
    return sd / Math.sqrt(3 * info);
  }

  it('is efficient: the scatter stays within a small factor of the Cramer-Rao bound (Rao 1945, Cramer 1946)', () => {
    const cases: [EdgeSpec, number, number][] = [
      [vertical(20.37, 100, 0), 15, 2],
      [vertical(20.37, 100, 1), 10, 2],
      [vertical(20.37, 100, 2), 6, 2],
      [vertical(20.37, 100, 3), 6, 2],
    ];
    for (const [e, sd, factor] of cases) {
      const r = trial(e, sd, 404, 120);
      const bound = cramerRao(e, sd);
      expect(r.rmsErr).toBeGreaterThan(0.8 * bound); // nothing beats the bound
      expect(r.rmsErr).toBeLessThan(factor * bound);
    }
  });

  it('sigmaPx grows with the noise and with the blur', () => {
    const lo = trial(vertical(20.37, 100, 1), 8, 5, 60);
    const hi = trial(vertical(20.37, 100, 1), 24, 5, 60);
    const broad = trial(vertical(20.37, 100, 3), 8, 5, 60);
    expect(hi.rmsSigma).toBeGreaterThan(2 * lo.rmsSigma);
    expect(broad.rmsSigma).toBeGreaterThan(1.2 * lo.rmsSigma);
  });

  it('stays within [0.1, 3] px and finite, or says null, however strong the noise', () => {
    const rng = new Rng(31);
    const clean = render(44, 24, [vertical(20.37, 100, 1.5)]);
    for (const sd of [0, 1, 10, 40, 80, 200]) {
      for (let t = 0; t < 10; t++) {
        const r = snapAlong(withNoise(clean, sd, rng), 21, 12, 1, 0);
        if (r === null) continue;
        expect(r.sigmaPx).toBeGreaterThanOrEqual(0.1);
        expect(r.sigmaPx).toBeLessThanOrEqual(3);
        expect(Number.isFinite(r.x) && Number.isFinite(r.y) && Number.isFinite(r.strength)).toBe(true);
        expect(Math.abs(r.offsetPx)).toBeLessThanOrEqual(6 + 1);
      }
    }
  });
});

describe('snapAlong: choosing among edges (issue 12)', () => {
  // a weak edge under the point and a strong one 3.8 px on, both crisp and noise-free
  const img = render(44, 12, [vertical(20.3, 50, 0), vertical(24.1, 150, 0)]);

  it("'nearest' takes the edge nearest the point where 'strongest' takes the stronger one", () => {
    expect(Math.abs(snapAlong(img, 20.9, 6, 1, 0, 5)!.x - 24.1)).toBeLessThan(0.05);
    expect(Math.abs(snapAlong(img, 20.9, 6, 1, 0, 5, { pick: 'nearest' })!.x - 20.3)).toBeLessThan(0.05);
    // from beyond the strong edge, the strong edge is the nearer
    expect(Math.abs(snapAlong(img, 24.7, 6, -1, 0, 5, { pick: 'nearest' })!.x - 24.1)).toBeLessThan(0.05);
  });

  it("'nearest' passes over an edge weaker than 0.15 of the strongest in a noise-free picture", () => {
    const faint = render(44, 12, [vertical(20.3, 15, 0), vertical(24.1, 150, 0)]);
    expect(Math.abs(snapAlong(faint, 20.5, 6, 1, 0, 5, { pick: 'nearest' })!.x - 24.1)).toBeLessThan(0.05);
  });

  it('sign keeps only edges whose luminance rises (+1) or falls (-1) along the direction', () => {
    // bright bar from 20.3 to 24.1 on a dark ground: rising at 20.3, falling at 24.1 going +x
    const bar = render(44, 12, [vertical(20.3, 150, 0), vertical(24.1, -150, 0)]);
    expect(Math.abs(snapAlong(bar, 22, 6, 1, 0, 5, { sign: 1 })!.x - 20.3)).toBeLessThan(0.05);
    expect(Math.abs(snapAlong(bar, 22, 6, 1, 0, 5, { sign: -1 })!.x - 24.1)).toBeLessThan(0.05);
    expect(Math.abs(snapAlong(bar, 21, 6, -1, 0, 5, { pick: 'nearest', sign: 1 })!.x - 24.1)).toBeLessThan(0.05);
    expect(snapAlong(render(44, 12, [vertical(20.3, 150, 0)]), 21, 6, 1, 0, 4, { sign: -1 })).toBeNull();
  });

  it('still finds a crisp edge within 0.05 px with the widest scale capped and the lines drawn closer', () => {
    for (const f of [0, 0.3, 0.7]) {
      const e = vertical(20 + f);
      const r = snapAlong(render(44, 14, [e]), 21.2, 7.3, -1, 0, 3, { pick: 'nearest', maxScalePx: 0.5, lineSpacingPx: 0.4 })!;
      expect(Math.abs(r.x - e.c)).toBeLessThan(0.05);
    }
  });

  it('rejects a bad pick, sign, widest scale or line spacing, naming the field', () => {
    expectInputError(() => snapAlong(img, 21, 6, 1, 0, 4, { pick: 'first' as 'nearest' }), 'snap pick');
    expectInputError(() => snapAlong(img, 21, 6, 1, 0, 4, { sign: 2 as 1 }), 'snap sign');
    expectInputError(() => snapAlong(img, 21, 6, 1, 0, 4, { maxScalePx: 0.2 }), 'snap widest scale');
    expectInputError(() => snapAlong(img, 21, 6, 1, 0, 4, { lineSpacingPx: 1.5 }), 'snap line spacing');
  });
});

describe('snapAlong: spreadPx, the width of the edge along the direction', () => {
  it('on a crisp edge at sub-pixel phase f is sqrt(1/12 + f (1 - f) + 1/96), to 0.002 px', () => {
    // the moment method: the pixel's box has variance 1/12; linear interpolation between pixel
    // centres splits the step over two unit intervals with weights 1 - f and f, adding f (1 - f);
    // the central difference on the 0.25 px grid, summed by the trapezoid rule, adds h^2 / 6
    for (let f = 0; f < 1; f += 0.125) {
      const r = snapAlong(render(44, 12, [vertical(20 + f)]), 21, 6, -1, 0, 3)!;
      expect(Math.abs(r.spreadPx - Math.sqrt(1 / 12 + f * (1 - f) + 1 / 96))).toBeLessThan(0.002);
      expect(r.spreadSigmaPx).toBe(0);
    }
  });

  it('grows with blur, averaged over sub-pixel phases', () => {
    const mean = (blur: number) => {
      let m = 0;
      for (let f = 0; f < 1; f += 0.125) m += snapAlong(render(44, 12, [vertical(20 + f, 150, blur)]), 21, 6, -1, 0, 3)!.spreadPx ** 2 / 8;
      return m;
    };
    const [b0, b05, b1] = [mean(0), mean(0.5), mean(1)];
    // f (1 - f) averaged over f = 0, 1/8, ..., 7/8 is 21/128
    expect(b0).toBeCloseTo(1 / 12 + 21 / 128 + 1 / 96, 3);
    // within its 2 px window a blur of sigma s adds about s^2 (a little less as the tails leave it)
    expect(b05 - b0).toBeGreaterThan(0.7 * 0.25);
    expect(b05 - b0).toBeLessThan(0.25);
    expect(b1 - b05).toBeGreaterThan(0.3);
  });

  it('spreadSigmaPx matches the scatter of spreadPx in noise (ratio 0.7 to 1.4)', () => {
    const rng = new Rng(5);
    for (const [blur, sd] of [
      [0, 10],
      [0.5, 10],
      [1, 6],
    ] as const) {
      const v: number[] = [];
      let claimed = 0;
      for (let t = 0; t < 150; t++) {
        const r = snapAlong(withNoise(render(44, 24, [vertical(20.37, 100, blur)]), sd, rng), 20.37 + rng.between(-2, 2), 12, -1, 0, 3);
        if (!r) continue;
        v.push(r.spreadPx);
        claimed += r.spreadSigmaPx ** 2;
      }
      const mean = v.reduce((a, b) => a + b, 0) / v.length;
      const scatter = Math.sqrt(v.reduce((a, b) => a + (b - mean) ** 2, 0) / (v.length - 1));
      const ratio = scatter / Math.sqrt(claimed / v.length);
      expect(ratio).toBeGreaterThan(0.7);
      expect(ratio).toBeLessThan(1.4);
    }
  });
});

describe('snapAlong: invalid input', () => {
  const img = render(20, 20, [vertical(10.3)]);
  it('rejects bad points, directions and radii, naming the field', () => {
    expectInputError(() => snapAlong(img, -1, 5, 1, 0), 'snap point x');
    expectInputError(() => snapAlong(img, 5, 20.5, 1, 0), 'snap point y');
    expectInputError(() => snapAlong(img, NaN, 5, 1, 0), 'snap point x');
    expectInputError(() => snapAlong(img, 5, 5, 0, 0), 'snap direction');
    expectInputError(() => snapAlong(img, 5, 5, NaN, 1), 'snap direction x');
    expectInputError(() => snapAlong(img, 5, 5, 1, Infinity), 'snap direction y');
    expectInputError(() => snapAlong(img, 5, 5, 1, 0, 0.5), 'snap radius');
    expectInputError(() => snapAlong(img, 5, 5, 1, 0, MAX_SNAP_RADIUS_PX + 1), 'snap radius');
    expectInputError(() => snapAlong({ ...img, channels: 2 as 1 }, 5, 5, 1, 0), 'image channels');
  });
  it('accepts the largest radius on an image smaller than the search line', () => {
    const r = snapAlong(img, 12, 10, -1, 0, MAX_SNAP_RADIUS_PX)!;
    expect(Math.abs(r.x - 10.3)).toBeLessThan(0.05);
  });
});
