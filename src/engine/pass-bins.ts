import { passData, type PassData } from './pass-fit';

/*
 * A pass marked on thousands of frames is fitted on bins of consecutive frames, not frame by frame:
 * the fit's cost per iteration is its point count, and a bootstrap runs thousands of fits. Each bin
 * stands for its frames by the weighted means of what they saw (span angle, and elevation and
 * azimuth where they have them) at the weighted mean of their times, good to the combined sigma
 * 1 / sqrt(sum 1 / sigma^2).
 *
 * Why that is the same fit: a frame's residual is model(t_k) - obs_k. Within a bin the model is
 * linear in time to first order, so sum w_k (model(t_k) - obs_k)^2 splits into W (model(t_bar) -
 * obs_bar)^2, which the bin fit minimises, plus the frames' scatter about their own mean, which no
 * parameter moves. What is left over is the model's curvature across the bin: a bin holds at most
 * ceil(n / FIT_POINTS) consecutive frames (9 for the largest case, a third of a second at 30 fps),
 * and a pass's span changes over tens of seconds. The noise each draw adds is unchanged: it is put on
 * every frame (pass-inputs.ts fillDraw) before the frames are averaged, so a shared error stays shared
 * and a frame's own error averages out as it would in the fit of every frame.
 * Common practice (binning a dense series before a least-squares fit); used only above FIT_POINTS
 * frames, so the fit of an ordinary case is the fit of every frame.
 */

/** Frames a pass fit takes one by one; above it, bins. */
export const FIT_POINTS = 512;

export interface PassBins {
  /** first frame of each bin, and one past the last of the last bin */
  start: Int32Array;
  count: number;
}

/** Bins of consecutive frames, at most ceil(n / maxPoints) each, or null when the frames are few enough. */
export function passBins(n: number, maxPoints = FIT_POINTS): PassBins | null {
  if (n <= maxPoints) return null;
  const size = Math.ceil(n / maxPoints);
  const count = Math.ceil(n / size);
  const start = new Int32Array(count + 1);
  for (let b = 0; b <= count; b++) start[b] = Math.min(b * size, n);
  return { start, count };
}

/** A PassData to aggregate into, of the bins' size. */
export function binnedData(bins: PassBins): PassData {
  return passData(bins.count);
}

/** The bins' observations of one draw into out (its axis, size, speed and reference time copied). */
export function aggregate(d: PassData, bins: PassBins, out: PassData): void {
  out.axis = d.axis;
  out.L = d.L;
  out.u = d.u;
  out.tr = d.tr;
  for (let b = 0; b < bins.count; b++) {
    const from = bins.start[b]!;
    const to = bins.start[b + 1]!;
    let W = 0;
    let t = 0;
    let th = 0;
    let We = 0;
    let el = 0;
    let Wa = 0;
    let az = 0;
    let a0 = Number.NaN;
    for (let k = from; k < to && a0 !== a0; k++) a0 = d.azim[k]!;
    for (let k = from; k < to; k++) {
      const w = 1 / (d.sTheta[k]! * d.sTheta[k]!);
      W += w;
      t += w * d.t[k]!;
      th += w * d.theta[k]!;
      const e = d.elev[k]!;
      if (e === e) {
        const we = 1 / (d.sElev[k]! * d.sElev[k]!);
        We += we;
        el += we * e;
      }
      const a = d.azim[k]!;
      if (a === a) {
        // azimuths near the half turn: averaged as offsets from the bin's first
        let da = a - a0;
        if (da > Math.PI) da -= 2 * Math.PI;
        else if (da < -Math.PI) da += 2 * Math.PI;
        const wa = 1 / (d.sAzim[k]! * d.sAzim[k]!);
        Wa += wa;
        az += wa * da;
      }
    }
    out.t[b] = t / W;
    out.theta[b] = th / W;
    out.sTheta[b] = 1 / Math.sqrt(W);
    out.elev[b] = We > 0 ? el / We : Number.NaN;
    out.sElev[b] = We > 0 ? 1 / Math.sqrt(We) : Number.NaN;
    out.azim[b] = Wa > 0 ? a0 + az / Wa : Number.NaN;
    out.sAzim[b] = Wa > 0 ? 1 / Math.sqrt(Wa) : Number.NaN;
  }
}
