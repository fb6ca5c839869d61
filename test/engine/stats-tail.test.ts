import { describe, expect, it } from 'vitest';
import { cautiousTail, summarize } from '../../src/engine/stats';
import { Rng } from '../../src/engine/rng';

/*
 * cautiousTail (stats.ts) against the distribution-free confidence bound for a quantile from order
 * statistics (Conover, Practical Nonparametric Statistics, 3rd ed., section 3.2; Hahn & Meeker,
 * Statistical Intervals, chapter 5; both from memory): for n independent draws of a continuous
 * quantity, the k-th smallest lies at or below the true p-quantile exactly when at least k draws
 * fall below it, so P(X_(k) <= x_p) = P(Binomial(n, p) >= k), whatever the distribution.
 *
 * The end summarize gives for a tail is the type-7 quantile: at rank r = 1 + (n - 1) tail it
 * interpolates between X_(floor r) and X_(ceil r). It lies at or below the true 5 % point for every
 * distribution whenever X_(ceil r) does (and only then, for a distribution with a gap just above the
 * point), so its distribution-free confidence is P(Binomial(n, 0.05) >= ceil r). The upper end
 * mirrors it: at or above the true 95 % point whenever X_(floor r_hi) is, with confidence
 * P(Binomial(n, 0.05) >= n + 1 - floor r_hi).
 *
 * The ranks are read from summarize itself on the values 1..n (type 7 of 1..n at q is 1 + (n - 1) q),
 * so the check sees the ranks the engine actually interpolates between, floating point included.
 */

/** P(Binomial(n, p) >= k), summed exactly term by term in logs (a hand-written binomial, no library). */
function binomialAtLeast(n: number, p: number, k: number): number {
  if (k <= 0) return 1;
  if (k > n) return 0;
  // log C(n, j) built up from j = 0
  let logC = 0;
  let below = 0;
  for (let j = 0; j < k; j++) {
    below += Math.exp(logC + j * Math.log(p) + (n - j) * Math.log1p(-p));
    logC += Math.log(n - j) - Math.log(j + 1);
  }
  return 1 - below;
}

/** The ranks summarize's ends fall at for n draws cut at `tail`: read off the values 1..n. */
function endRanks(n: number, tail: number): { lo: number; hi: number } {
  const e = summarize(Float64Array.from({ length: n }, (_, i) => i + 1), n, tail);
  return { lo: e.p05, hi: e.p95 };
}

/** Distribution-free confidence that each end reaches the true 5 % / 95 % point (see the header). */
function endConfidence(n: number, tail: number): { lo: number; hi: number } {
  const r = endRanks(n, tail);
  return { lo: binomialAtLeast(n, 0.05, Math.ceil(r.lo)), hi: binomialAtLeast(n, 0.05, n + 1 - Math.floor(r.hi)) };
}

describe('the hand-written binomial', () => {
  it('matches sums worked by hand', () => {
    // P(Bin(4, 1/2) >= 3) = (4 + 1) / 16; P(Bin(10, 0.05) >= 1) = 1 - 0.95^10
    expect(binomialAtLeast(4, 0.5, 3)).toBeCloseTo(5 / 16, 14);
    expect(binomialAtLeast(10, 0.05, 1)).toBeCloseTo(1 - 0.95 ** 10, 14);
    expect(binomialAtLeast(300, 0.05, 0)).toBe(1);
    // the whole distribution sums to one even at n = 20 000 (no underflow trouble in the logs)
    expect(binomialAtLeast(20_000, 0.05, 20_001)).toBe(0);
    expect(1 - binomialAtLeast(20_000, 0.05, 20_000)).toBeCloseTo(1, 9);
  });
});

describe('cautiousTail: each end reaches the true 5 % / 95 % point with at least 95 % confidence', () => {
  it('for the sample sizes named in its contract (300, 1000, 4000 draws), exactly from the binomial', () => {
    for (const n of [300, 1000, 4000]) {
      const c = endConfidence(n, cautiousTail(n));
      expect({ n, lo: c.lo >= 0.95, hi: c.hi >= 0.95, c }).toEqual({ n, lo: true, hi: true, c });
    }
  });

  it('for every draw count a capped case can run (analysis.ts cappedDraws: 300 to 19 900 in hundreds)', () => {
    const short: string[] = [];
    for (let n = 300; n < 20_000; n += 100) {
      const c = endConfidence(n, cautiousTail(n));
      if (!(c.lo >= 0.95 && c.hi >= 0.95)) short.push(`${n}: ${c.lo.toFixed(4)} / ${c.hi.toFixed(4)}`);
    }
    expect(short).toEqual([]);
  });

  it('still cuts something: the ends are no wider than the next order statistic out needs', () => {
    // not a check that cannot fail the other way: the end one rank further in must fall short of 95 %
    for (const n of [300, 1000, 4000]) {
      const r = endRanks(n, cautiousTail(n));
      expect(binomialAtLeast(n, 0.05, Math.ceil(r.lo) + 1)).toBeLessThan(0.95);
    }
  });
});

describe('cautiousTail in a seeded simulation of standard normal draws', () => {
  // the standard normal's 5 % / 95 % points, -/+ 1.6449 (Abramowitz & Stegun 26.2, table 26.1: z for P = 0.95 is 1.644854)
  const Z95 = 1.6448536;
  // repetitions, and the fewest of them allowed to reach the point: the count of a method that truly
  // reaches it 95 % of the time falls below this with probability under 0.1 % (binomial, exact)
  // (20 000 repetitions: a shortfall of half a percent is then three standard errors)
  const REPS = 20_000;
  let minCount = 0;
  while (1 - binomialAtLeast(REPS, 0.95, minCount + 1) < 0.001) minCount++;

  for (const n of [300, 600]) {
    it(`${n} draws: the lower end lies below -1.6449 and the upper above +1.6449 in at least 95 % of ${REPS} repetitions`, () => {
      const rng = new Rng(20_261_205 + n);
      const tail = cautiousTail(n);
      const x = new Float64Array(n);
      let lo = 0;
      let hi = 0;
      for (let r = 0; r < REPS; r++) {
        for (let i = 0; i < n; i++) x[i] = rng.normal();
        const e = summarize(x, n, tail);
        if (e.p05 <= -Z95) lo++;
        if (e.p95 >= Z95) hi++;
      }
      expect({ lo, hi, minCount }).toEqual({ lo: Math.max(lo, minCount), hi: Math.max(hi, minCount), minCount });
    });
  }
});
