import { describe, expect, it } from 'vitest';
import { Rng } from '../../src/engine/rng';
import { InputError } from '../../src/engine/errors';

describe('Rng (xoshiro128** seeded by splitmix32)', () => {
  it('is deterministic for a seed and differs between seeds', () => {
    const a = new Rng(42);
    const b = new Rng(42);
    const c = new Rng(43);
    const sa = Array.from({ length: 8 }, () => a.nextU32());
    const sb = Array.from({ length: 8 }, () => b.nextU32());
    const sc = Array.from({ length: 8 }, () => c.nextU32());
    expect(sa).toEqual(sb);
    expect(sa).not.toEqual(sc);
  });

  it('uniform draws fill [0, 1) evenly (chi-square over 10 bins, seeded)', () => {
    const r = new Rng(7);
    const bins = new Array(10).fill(0);
    const n = 100_000;
    for (let i = 0; i < n; i++) {
      const u = r.uniform();
      expect(u >= 0 && u < 1).toBe(true);
      bins[Math.floor(u * 10)]++;
    }
    const e = n / 10;
    const chi2 = bins.reduce((s, o) => s + (o - e) ** 2 / e, 0);
    // 9 degrees of freedom: the 99.9th percentile is 27.88 (standard chi-square tables)
    expect(chi2).toBeLessThan(27.88);
  });

  it('normal draws have mean 0, sd 1 and the 1.645 sd tails of a standard normal', () => {
    const r = new Rng(11);
    const n = 200_000;
    let s = 0;
    let s2 = 0;
    let tail = 0;
    for (let i = 0; i < n; i++) {
      const z = r.normal();
      s += z;
      s2 += z * z;
      if (z > 1.6448536) tail++;
    }
    const mean = s / n;
    const sd = Math.sqrt(s2 / n - mean * mean);
    expect(Math.abs(mean)).toBeLessThan(0.01);
    expect(Math.abs(sd - 1)).toBeLessThan(0.01);
    // P(Z > 1.6449) = 0.05 (standard normal table)
    expect(Math.abs(tail / n - 0.05)).toBeLessThan(0.003);
  });

  it('rejects a seed that is not a 32-bit whole number, naming the field', () => {
    expect(() => new Rng(-1)).toThrow(InputError);
    expect(() => new Rng(1.5)).toThrow(/seed/);
    expect(() => new Rng(Number.NaN)).toThrow(/seed: got NaN/);
  });
});
