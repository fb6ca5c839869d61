import { MAX_SPEED_MS } from './constants';
import { InputError } from './errors';
import { Rng } from './rng';
import { summarize, type Estimate } from './stats';
import { fixedCameraTrack, type TrackSample } from './track';
import {
  checkMarkedPass,
  checkOptions,
  Columns,
  fillSinAspect,
  fillSpanRangeRows,
  fillTanHalf,
  fillUniform,
  type Band,
  type SolveOptions,
  type SpanMark,
} from './uncertainty';
import { band } from './validate';

/*
 * The fixed-camera ground track with its uncertainty (DESIGN.md "Fixed camera"): every draw redraws
 * the field of view, the object's size and aspect, each marked end, the camera's aim and the
 * observer's speed, places the object at each timestamp from its bearing and range, and fits the
 * straight track (track.ts). A module of its own, like series.ts, so the overlay does not carry it.
 */
export interface TrackScene {
  frame: { widthPx: number; heightPx: number };
  hfov: Band;
  object: { size: Band; aspect: Band };
  /** The object's ends at each timestamp (its bearing is the span's midpoint, its range from the span). */
  marks: { t: number; span: SpanMark }[];
  /** The optical axis against the observer's direction of travel, radians (0 ahead, + to the right). */
  axisHeading: Band;
  /** The camera's ground speed along its road, m/s; {0, 0} for a tripod. */
  cameraSpeed: Band;
}

export interface TrackResult {
  /** The object's ground speed. */
  speed: Estimate;
  /**
   * The object's heading against the observer's direction of travel, radians, + to the right, in
   * (-pi, pi], unwrapped around the median draw's so that an interval through 180 degrees stays whole.
   */
  heading: Estimate;
  /** Least horizontal distance between camera and object on the fitted tracks. */
  closestApproach: Estimate;
  /** The positions' RMS distance from the straight fit, over the draws (null for 2 timestamps). */
  residualRms: Estimate | null;
  draws: number;
  seed: number;
}

const trackColumns = new Columns();

/**
 * Monte Carlo through the fixed-camera track. The camera is assumed to keep its aim and to move
 * straight and steadily; the object to fly straight and steadily. Bearings are taken at each span's
 * midpoint with the draw's field of view; the ends' noise is carried through the range only (a
 * shift of both ends together moves the bearing by far less than the field of view's spread does).
 */
export function solveTrack(scene: TrackScene, options: SolveOptions = {}): TrackResult {
  const { draws, seed } = checkOptions(options, 1_000);
  const { W, H } = checkMarkedPass(scene, 2, 'a ground track');
  if (!scene.axisHeading) throw new InputError('camera aim', scene.axisHeading, 'a band of degrees between -180 and 180');
  band('camera aim', (scene.axisHeading.lo * 180) / Math.PI, (scene.axisHeading.hi * 180) / Math.PI, -180, 180, ' deg');
  if (!scene.cameraSpeed) throw new InputError('camera speed', scene.cameraSpeed, `a band of m/s between 0 and ${MAX_SPEED_MS}`);
  band('camera speed', scene.cameraSpeed.lo, scene.cameraSpeed.hi, 0, MAX_SPEED_MS, ' m/s');
  const marks = scene.marks;

  const n = marks.length;
  const col = (k: number) => trackColumns.get(k, draws);
  const tanHalf = col(0);
  const scale = col(1);
  const sinA = col(2);
  const normals = col(3);
  const aim = col(4);
  const speedCam = col(5);
  const speed = col(6);
  const heading = col(7);
  const closest = col(8);
  const residual = col(9);
  const rows = trackColumns.get(10, draws * n);
  const rng = new Rng(seed);
  fillTanHalf(rng, scene.hfov, tanHalf, draws);
  fillUniform(rng, scene.object.size, scale, draws);
  fillSinAspect(rng, scene.object.aspect, sinA, draws);
  for (let i = 0; i < draws; i++) scale[i] = scale[i]! * sinA[i]!;
  for (let k = 0; k < n; k++) fillSpanRangeRows(rng, marks[k]!.span, W, H, tanHalf, scale, normals, rows, k, n, draws);
  fillUniform(rng, scene.axisHeading, aim, draws);
  fillUniform(rng, scene.cameraSpeed, speedCam, draws);

  // the midpoints in frame-centred pixels: the bearing's tangent is x k, the elevation's y k / hypot
  const mx = marks.map((m) => (m.span.x1 + m.span.x2) / 2 - W / 2);
  const my = marks.map((m) => H / 2 - (m.span.y1 + m.span.y2) / 2);
  let kept = 0;
  let residualCount = 0;
  const samples: TrackSample[] = marks.map((m) => ({ t: m.t, bearing: 0, range: 1, elevation: 0 }));
  for (let i = 0; i < draws; i++) {
    const k = (2 * tanHalf[i]!) / W;
    let ok = true;
    for (let j = 0; j < n; j++) {
      const R = rows[i * n + j]!;
      if (!(R > 0)) ok = false;
      const s = samples[j]!;
      s.range = R;
      s.bearing = Math.atan(mx[j]! * k);
      s.elevation = Math.atan2(my[j]! * k, Math.hypot(1, mx[j]! * k));
    }
    if (!ok) {
      speed[i] = heading[i] = closest[i] = Number.NaN;
      continue;
    }
    const track = fixedCameraTrack(samples, { axisHeading: aim[i]!, velocity: { x: speedCam[i]!, y: 0 }, t0: marks[0]!.t });
    speed[i] = track.speed;
    heading[i] = track.heading;
    closest[i] = track.closestApproach;
    if (track.residualRms !== null) residual[residualCount++] = track.residualRms;
    kept++;
  }
  if (kept === 0) throw new InputError('timestamps', `${n} marks`, 'spans that give a range in at least one draw');
  unwrapAround(heading, draws);
  return {
    speed: summarize(speed, draws),
    heading: summarize(heading, draws),
    closestApproach: summarize(closest, draws),
    residualRms: residualCount > 0 ? summarize(residual, residualCount) : null,
    draws,
    seed,
  };
}

/**
 * Headings are angles: a spread through +/-180 degrees would split into two far-apart clusters.
 * Shift every draw into the half-turn either side of a reference (the circular mean of the draws,
 * from the summed unit vectors), then back into (-pi, pi] only if the whole set allows it.
 */
function unwrapAround(h: Float64Array, n: number): void {
  let sx = 0;
  let sy = 0;
  for (let i = 0; i < n; i++) {
    const v = h[i]!;
    if (v === v) {
      sx += Math.cos(v);
      sy += Math.sin(v);
    }
  }
  const ref = Math.atan2(sy, sx);
  for (let i = 0; i < n; i++) {
    const v = h[i]!;
    if (v !== v) continue;
    let d = v - ref;
    while (d > Math.PI) d -= 2 * Math.PI;
    while (d <= -Math.PI) d += 2 * Math.PI;
    h[i] = ref + d;
  }
}
