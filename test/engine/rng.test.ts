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

  it('normal draws match the standard normal: moments and tail areas', () => {
    const r = new Rng(11);
    const n = 400_000;
    let s = 0;
    let s2 = 0;
    let s4 = 0;
    const tails = { 1: 0, 1.6448536: 0, 1.959964: 0, 2.5758293: 0, 3.4426: 0 };
    for (let i = 0; i < n; i++) {
      const z = r.normal();
      s += z;
      s2 += z * z;
      s4 += z ** 4;
      for (const k of Object.keys(tails) as unknown as (keyof typeof tails)[]) if (Math.abs(z) > Number(k)) tails[k]++;
    }
    const mean = s / n;
    expect(Math.abs(mean)).toBeLessThan(0.006);
    expect(Math.abs(s2 / n - 1)).toBeLessThan(0.01);
    expect(Math.abs(s4 / n - 3)).toBeLessThan(0.05); // kurtosis of a normal is 3
    // two-sided tail areas P(|Z| > z) from the standard normal table (e.g. NIST/SEMATECH
    // e-Handbook of Statistical Methods, 1.3.6.7.1): 0.3173, 0.10, 0.05, 0.01; and beyond the
    // ziggurat's base r = 3.4426 (its tail branch), 2 (1 - Phi(3.4426)) = 0.000576
    const expected = { 1: 0.3173, 1.6448536: 0.1, 1.959964: 0.05, 2.5758293: 0.01, 3.4426: 0.000576 };
    for (const k of Object.keys(tails) as unknown as (keyof typeof tails)[]) {
      const p = expected[k];
      const sd = Math.sqrt((p * (1 - p)) / n);
      expect(Math.abs(tails[k] / n - p)).toBeLessThan(4 * sd);
    }
  });

  it('rejects a seed that is not a 32-bit whole number, naming the field', () => {
    expect(() => new Rng(-1)).toThrow(InputError);
    expect(() => new Rng(1.5)).toThrow(/seed/);
    expect(() => new Rng(Number.NaN)).toThrow(/seed: got NaN/);
  });
});
