import type { PassBins } from './pass-bins';
import type { PassData } from './pass-fit';
import type { DrawValues } from './pass-inputs';

/*
 * Each sign of the relative motion is bootstrapped from the same seed, so its draws are the same
 * draws: for a pass fitted on bins (pass-bins.ts, thousands of frames) the first sign's draws are
 * kept, binned, and the second sign reads them back instead of drawing every frame again. What is
 * kept is exactly what the fit and the figures read from a draw, so both signs see the same numbers
 * they would have drawn. Only binned passes: there a draw is a few hundred bins, not every frame.
 */

const SCALARS = 6;
const BIN_FIELDS = 7;

export class DrawStore {
  private filled = 0;
  private readonly bad: Uint8Array;
  private readonly scalars: Float64Array;
  private readonly landmarks: Float64Array;
  private readonly bins: Float64Array;

  constructor(
    draws: number,
    private readonly binCount: number,
    private readonly landmarkCount: number,
  ) {
    this.bad = new Uint8Array(draws);
    this.scalars = new Float64Array(draws * SCALARS);
    this.landmarks = new Float64Array(draws * landmarkCount);
    this.bins = new Float64Array(draws * binCount * BIN_FIELDS);
  }

  has(i: number): boolean {
    return i < this.filled;
  }

  /** Keeps draw i (drawn in order): d's and v's values, and the binned observations in fd. */
  keep(i: number, bad: boolean, d: PassData, v: DrawValues, fd: PassData): void {
    this.bad[i] = bad ? 1 : 0;
    const s = this.scalars;
    const o = i * SCALARS;
    s[o] = d.L;
    s[o + 1] = d.u;
    s[o + 2] = v.focalPx;
    s[o + 3] = v.eps;
    s[o + 4] = v.beta;
    s[o + 5] = v.cameraHeight;
    this.landmarks.set(v.landmarkRange, i * this.landmarkCount);
    if (!bad) {
      const b = this.binCount;
      const base = i * b * BIN_FIELDS;
      const fields = [fd.t, fd.theta, fd.sTheta, fd.elev, fd.sElev, fd.azim, fd.sAzim];
      for (let f = 0; f < BIN_FIELDS; f++) this.bins.set(fields[f]!.subarray(0, b), base + f * b);
    }
    this.filled = i + 1;
  }

  /** Draw i back into d's scalars, v and fd (which takes d's axis and reference time); returns whether it was bad. */
  load(i: number, d: PassData, v: DrawValues, fd: PassData): boolean {
    const s = this.scalars;
    const o = i * SCALARS;
    d.L = s[o]!;
    d.u = s[o + 1]!;
    v.focalPx = s[o + 2]!;
    v.eps = s[o + 3]!;
    v.beta = s[o + 4]!;
    v.cameraHeight = s[o + 5]!;
    v.landmarkRange.set(this.landmarks.subarray(i * this.landmarkCount, (i + 1) * this.landmarkCount));
    if (this.bad[i]) return true;
    const b = this.binCount;
    const base = i * b * BIN_FIELDS;
    const fields = [fd.t, fd.theta, fd.sTheta, fd.elev, fd.sElev, fd.azim, fd.sAzim];
    for (let f = 0; f < BIN_FIELDS; f++) fields[f]!.set(this.bins.subarray(base + f * b, base + (f + 1) * b));
    fd.axis = d.axis;
    fd.L = d.L;
    fd.u = d.u;
    fd.tr = d.tr;
    return false;
  }
}

/** A store for the draws of a binned pass with more than one sign to fit, else null. */
export function drawStore(bins: PassBins | null, signs: number, draws: number, landmarkCount: number): DrawStore | null {
  return bins && signs > 1 ? new DrawStore(draws, bins.count, landmarkCount) : null;
}
