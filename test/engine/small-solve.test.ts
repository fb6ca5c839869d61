import { describe, expect, it } from 'vitest';
import { invertSymmetric, sandwich, solveSymmetric } from '../../src/engine/small-solve';

// The textbook Cholesky example A = L L^T with L = [[2, 0, 0], [6, 1, 0], [-8, 5, 3]] (it appears in
// most numerical-analysis texts; common practice as a check).
const A = Float64Array.from([4, 12, -16, 12, 37, -43, -16, -43, 98]);

describe('small symmetric solves', () => {
  it('solves A x = b for a known x', () => {
    const x = [1, -2, 0.5];
    const b = [0, 1, 2].map((r) => A[3 * r]! * x[0]! + A[3 * r + 1]! * x[1]! + A[3 * r + 2]! * x[2]!);
    const out = new Float64Array(3);
    expect(solveSymmetric(A, b, 3, out)).toBe(true);
    out.forEach((v, i) => expect(v).toBeCloseTo(x[i]!, 10));
  });

  it('inverts A (A A^-1 = I) and refuses a matrix that is not positive definite', () => {
    const inv = invertSymmetric(A, 3)!;
    for (let r = 0; r < 3; r++) {
      for (let c = 0; c < 3; c++) {
        let s = 0;
        for (let k = 0; k < 3; k++) s += A[3 * r + k]! * inv[3 * k + c]!;
        expect(s).toBeCloseTo(r === c ? 1 : 0, 10);
      }
    }
    expect(invertSymmetric(Float64Array.from([1, 2, 2, 1]), 2)).toBeNull();
  });

  it('the sandwich of one group equals H^-1 s s^T H^-1', () => {
    const H = Float64Array.from([2, 0, 0, 4]);
    const s = Float64Array.from([1, 2]);
    const cov = sandwich(H, s, 1, 2)!;
    // H^-1 s = (0.5, 0.5): every entry 0.25
    for (const v of cov) expect(v).toBeCloseTo(0.25, 12);
  });
});
