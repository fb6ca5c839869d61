import { KNOT_MS, MAX_SPEED_MS } from './constants';
import { inRange } from './validate';

export interface BeaufortRow {
  force: number;
  /** Lower bound, inclusive (knots). */
  loKt: number;
  /** The next force's lower bound, exclusive (knots); null for the open top row. */
  hiKt: number | null;
  /** The band as the Met Office prints it, e.g. "1-3". */
  published: string;
  description: string;
}

/*
 * Met Office Beaufort scale, wind at 10 m, in knots. The published knot bands are whole numbers
 * (1-3, 4-6, ...), which leaves gaps for a measured speed such as 3.6 kt. We close them by letting
 * each force run from its own lower bound up to, not including, the next force's lower bound, so
 * 3.6 kt is force 1 (the lower force) and force 12 is [64, infinity). The m/s columns of the scale
 * are rounded separately, so we work from the knot column only. Descriptions use the customary
 * English wording (common practice).
 */
export const BEAUFORT_SCALE: readonly BeaufortRow[] = Object.freeze(
  (
    [
      [0, 'below 1', 'calm'],
      [1, '1-3', 'light air'],
      [4, '4-6', 'light breeze'],
      [7, '7-10', 'gentle breeze'],
      [11, '11-16', 'moderate breeze'],
      [17, '17-21', 'fresh breeze'],
      [22, '22-27', 'strong breeze'],
      [28, '28-33', 'near gale'],
      [34, '34-40', 'gale'],
      [41, '41-47', 'severe gale'],
      [48, '48-55', 'storm'],
      [56, '56-63', 'violent storm'],
      [64, '64 or more', 'hurricane force'],
    ] as const
  ).map(([loKt, published, description], force, all) =>
    Object.freeze({ force, loKt, hiKt: all[force + 1]?.[0] ?? null, published, description }),
  ),
);

export const BEAUFORT_SOURCE = 'Met Office Beaufort wind force scale (knots); WMO-No. 8 Table 5.1 as its origin (from memory)';

/**
 * Index into BEAUFORT_SCALE. Thresholds are compared in m/s (loKt x KNOT_MS) rather than by
 * dividing the speed by KNOT_MS, so that exactly 4 kt expressed as 4 * KNOT_MS lands on force 2.
 */
function forceIndex(speedMs: number): number {
  let i = BEAUFORT_SCALE.length - 1;
  while (i > 0 && speedMs < BEAUFORT_SCALE[i]!.loKt * KNOT_MS) i--;
  return i;
}

/** Beaufort force of a wind speed (m/s, >= 0) on the Met Office knot scale. */
export function beaufortForce(speedMs: number): { force: number; description: string; loKt: number; hiKt: number | null } {
  inRange('wind speed', speedMs, 0, MAX_SPEED_MS, ' m/s');
  const r = BEAUFORT_SCALE[forceIndex(speedMs)]!;
  return { force: r.force, description: r.description, loKt: r.loKt, hiKt: r.hiKt };
}

/*
 * Some national services (China, Taiwan) extend the scale past 12 for tropical cyclones, up to force 17
 * at 56.1-61.2 m/s. The lower bounds of forces 13-16 below (37.0, 41.5, 46.2, 51.0 m/s) are
 * (from memory). That extension is defined in m/s; its force 12 starts at 32.7 m/s, a little below
 * the Met Office's 64 kt (32.9 m/s): we keep the knot scale for 0-12 and start force 13 at 37.0 m/s.
 * Above 61.2 m/s the extended scale has no higher force; we report 17 with hiMs null.
 */
const EXTENDED: readonly { force: number; loMs: number }[] = [
  { force: 13, loMs: 37.0 },
  { force: 14, loMs: 41.5 },
  { force: 15, loMs: 46.2 },
  { force: 16, loMs: 51.0 },
  { force: 17, loMs: 56.1 },
];

export const BEAUFORT_EXTENDED_SOURCE =
  'extended national scales (China, Taiwan): force 17 at 56.1-61.2 m/s; bounds of forces 13-16 (from memory)';

/** Beaufort force on the extended scale (0-17). Bounds in m/s; hiMs is exclusive, null at the top. */
export function beaufortForceExtended(speedMs: number): {
  force: number;
  description: string;
  loMs: number;
  hiMs: number | null;
} {
  inRange('wind speed', speedMs, 0, MAX_SPEED_MS, ' m/s');
  for (let i = EXTENDED.length - 1; i >= 0; i--) {
    const e = EXTENDED[i]!;
    if (speedMs >= e.loMs) {
      return {
        force: e.force,
        description: `force ${e.force} (extended scale)`,
        loMs: e.loMs,
        hiMs: EXTENDED[i + 1]?.loMs ?? null,
      };
    }
  }
  const r = BEAUFORT_SCALE[forceIndex(speedMs)]!;
  return {
    force: r.force,
    description: r.description,
    loMs: r.loKt * KNOT_MS,
    hiMs: r.hiKt === null ? EXTENDED[0]!.loMs : r.hiKt * KNOT_MS,
  };
}
