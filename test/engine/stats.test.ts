import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { finiteShare, quantileInPlace, summarize } from '../../src/engine/stats';
import { UndeterminedError } from '../../src/engine/errors';

/** Reference: sort, then interpolate linearly between order statistics (numpy's 'linear' method, R type 7). */
function referenceQuantile(values: number[], q: number): number {
  const s = [...values].sort((a, b) => a - b);
  const h = (s.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, s.length - 1);
  return s[lo]! + (h - lo) * (s[hi]! - s[lo]!);
}

describe('quantiles by selection', () => {
  it('match the sort-and-interpolate definition (R type 7) on random data', () => {
    fc.assert(
      fc.property(
        fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 300 }),
        fc.constantFrom(0, 0.05, 0.25, 0.5, 0.9, 0.95, 1),
        (xs, q) => {
          const got = quantileInPlace(Float64Array.from(xs), xs.length, q);
          expect(got).toBeCloseTo(referenceQuantile(xs, q), 6);
        },
      ),
    );
  });

  it('summarize agrees with the reference on all three quantiles (property)', () => {
    fc.assert(
      fc.property(fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 1, maxLength: 400 }), (xs) => {
        const e = summarize(Float64Array.from(xs));
        expect(e.p05).toBeCloseTo(referenceQuantile(xs, 0.05), 6);
        expect(e.median).toBeCloseTo(referenceQuantile(xs, 0.5), 6);
        expect(e.p95).toBeCloseTo(referenceQuantile(xs, 0.95), 6);
      }),
    );
  });

  it('summarize is exact on large inputs too (the binned path): spread, skewed, tied, with outliers', () => {
    const big = (arb: fc.Arbitrary<number>) => fc.array(arb, { minLength: 512, maxLength: 5000 });
    fc.assert(
      fc.property(
        fc.oneof(
          big(fc.double({ min: -1e6, max: 1e6, noNaN: true })),
          big(fc.integer({ min: 0, max: 5 })), // heavy ties: whole bins of equal values
          big(fc.double({ min: 0, max: 1, noNaN: true }).map((u) => Math.exp(20 * u))), // long right tail
          big(fc.double({ min: 0, max: 1, noNaN: true })).map((xs) => [...xs, 1e12, -1e12]), // two outliers squeeze the rest into one bin
        ),
        (xs) => {
          const e = summarize(Float64Array.from(xs));
          for (const [q, got] of [[0.05, e.p05], [0.5, e.median], [0.95, e.p95]] as const) {
            const want = referenceQuantile(xs, q);
            expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-9 * Math.max(1, Math.abs(want)));
          }
        },
      ),
      { numRuns: 60 },
    );
  });

  it('handles many ties and sorted input', () => {
    const a = Float64Array.from({ length: 1001 }, (_, i) => Math.floor(i / 100));
    expect(quantileInPlace(a.slice(), a.length, 0.5)).toBe(5);
    const sorted = Float64Array.from({ length: 20_001 }, (_, i) => i);
    expect(quantileInPlace(sorted, sorted.length, 0.95)).toBe(19_000);
  });

  it('summarize gives 5 %, median, 95 % of 1..101 exactly (worked by hand)', () => {
    const e = summarize(Float64Array.from({ length: 101 }, (_, i) => i + 1));
    expect(e).toEqual({ p05: 6, median: 51, p95: 96 });
  });

  it('drops non-finite draws, and refuses when none is finite', () => {
    const v = Float64Array.from([1, Number.NaN, 2, Infinity, 3]);
    expect(finiteShare(v)).toBeCloseTo(0.6, 12);
    expect(summarize(v).median).toBe(2);
    expect(() => summarize(Float64Array.from([Number.NaN]))).toThrow(UndeterminedError);
  });
});
