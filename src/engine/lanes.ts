import { FOOT_M, MAX_SPEED_MS, MAX_TIME_S } from './constants';
import { InputError } from './errors';
import { finite, inRange, positive } from './validate';

/**
 * One published broken lane-line pattern: a painted segment followed by a gap. Counting whole
 * cycles that pass a fixed point of the windscreen gives the observer's own speed.
 */
export interface LaneCycle {
  id: string;
  label: string;
  segmentM: number;
  gapM: number;
  cycleM: number;
  source: string;
}

function row(id: string, label: string, segmentM: number, gapM: number, source: string): LaneCycle {
  return Object.freeze({ id, label, segmentM, gapM, cycleM: segmentM + gapM, source });
}

/*
 * Source strings are kept word for word from REFERENCES.md, remarks included, so that a reviewer
 * sees how firm each figure is. US values are stored from feet through the exact international foot.
 */
export const LANE_CYCLES: readonly LaneCycle[] = Object.freeze([
  row('us-broken', 'United States, broken lane line', 10 * FOOT_M, 30 * FOOT_M, 'MUTCD 2009, section 3A.06'),
  row(
    'uk-lane-fast',
    'United Kingdom, lane line, limit > 40 mph',
    2,
    7,
    'Traffic Signs Manual ch. 5 (2003), Table 4-2, diagram 1005.1',
  ),
  row('uk-lane-slow', 'United Kingdom, lane line, limit <= 40 mph', 1, 5, 'Traffic Signs Manual ch. 5, Table 4-2, diagram 1005'),
  row(
    'uk-centre-fast',
    'United Kingdom, centre line, limit > 40 mph',
    3,
    6,
    'Traffic Signs Manual ch. 5, Table 4-1, diagram 1008.1',
  ),
  row('nz-lane', 'New Zealand, lane line', 3, 7, 'Traffic Control Devices Manual Part 5, Table 2-28'),
  row('de-motorway', 'Germany, motorway', 6, 12, 'RMS, from secondary sources'),
  row('au-broken', 'Australia', 3, 9, 'AS 1742.2 (from memory)'),
]);

export function laneCycleById(id: string): LaneCycle {
  const found = LANE_CYCLES.find((c) => c.id === id);
  if (!found) throw new InputError('lane pattern', id, `one of ${LANE_CYCLES.map((c) => c.id).join(', ')}`);
  return found;
}

/** Road markings outside the table (works zones, other countries) measured or looked up by the user. */
export function customLaneCycle(segmentM: number, gapM: number): LaneCycle {
  inRange('lane segment length', segmentM, 0.1, 100, ' m');
  inRange('lane gap length', gapM, 0.1, 100, ' m');
  return row('custom', `Custom, ${segmentM} m segment + ${gapM} m gap`, segmentM, gapM, 'entered by the user');
}

/**
 * Observer speed from lane dashes: v = n x cycle / dt, with a band from n +/- countToleranceCycles.
 * A count of "whole" cycles starts and ends on a dash edge only roughly, so by default the count is
 * trusted to half a cycle (common practice). The band's low end is floored at 0.
 */
export function observerSpeedFromDashes(
  cycles: number,
  cycleM: number,
  t1: number,
  t2: number,
  countToleranceCycles = 0.5,
): { speed: number; lo: number; hi: number } {
  positive('cycles counted', cycles, 1e6);
  // a cycle is a segment plus a gap, each 0.1..100 m (as customLaneCycle accepts)
  inRange('lane cycle length', cycleM, 0.2, 200, ' m');
  inRange('first timestamp', t1, 0, MAX_TIME_S, ' s');
  inRange('second timestamp', t2, 0, MAX_TIME_S, ' s');
  if (!(t2 > t1)) throw new InputError('second timestamp', t2, `later than the first timestamp (${t1} s)`);
  inRange('count tolerance', countToleranceCycles, 0, 10, ' cycles');
  const dt = t2 - t1;
  const speed = (cycles * cycleM) / dt;
  if (speed > MAX_SPEED_MS) {
    throw new InputError('observer speed (cycles x cycle length / time)', speed, `at most ${MAX_SPEED_MS} m/s`);
  }
  const lo = Math.max(0, ((cycles - countToleranceCycles) * cycleM) / dt);
  const hi = finite('observer speed high end', ((cycles + countToleranceCycles) * cycleM) / dt);
  return { speed, lo, hi };
}
