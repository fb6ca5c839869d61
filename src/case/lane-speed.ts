import { laneCycleById, observerSpeedFromDashes } from '../engine/lanes';
import type { EngineAssumptions } from './assumptions';
import type { Mark } from './schema';

/*
 * The observer's speed measured from the clip: lane dashes passing a reference, on a published
 * marking cycle the user chooses.
 */

/** The observer's speed measured from lane-dash passes, when a cycle is chosen and passes are marked. */
export interface LaneSpeed {
  cycleLabel: string;
  cycleM: number;
  source: string;
  passes: number;
  t1: number;
  t2: number;
  speed: { lo: number; median: number; hi: number };
}

/*
 * Each lane-dash mark is the moment a dash's leading edge meets the user's reference, one per
 * dash in a row, so n passes span n - 1 cycles. A quarter of a cycle of tolerance covers placing
 * the edge on the frame nearest to it (common practice: frame steps at road speed are a few metres).
 */
const PASS_TOLERANCE_CYCLES = 0.25;

export function measuredObserverSpeed(c: { marks: readonly Mark[] }, cycleId: string | null): { speed: LaneSpeed | null; missing: string | null } {
  const passes = c.marks.filter((m) => m.kind === 'lane-dash').sort((x, y) => x.t - y.t);
  if (!cycleId) return { speed: null, missing: passes.length ? 'Lane-dash passes are marked: choose the road’s lane-line cycle to measure the observer’s speed from them.' : null };
  if (passes.length < 2) return { speed: null, missing: `Measuring the observer’s speed needs 2 or more lane-dash passes (${passes.length} so far).` };
  const cycle = laneCycleById(cycleId);
  const t1 = passes[0]!.t;
  const t2 = passes[passes.length - 1]!.t;
  try {
    const v = observerSpeedFromDashes(passes.length - 1, cycle.cycleM, t1, t2, PASS_TOLERANCE_CYCLES);
    return { speed: { cycleLabel: cycle.label, cycleM: cycle.cycleM, source: cycle.source, passes: passes.length, t1, t2, speed: { lo: v.lo, median: v.speed, hi: v.hi } }, missing: null };
  } catch (err) {
    return { speed: null, missing: `No observer speed from the lane dashes: ${(err as Error).message}` };
  }
}


/**
 * The assumptions a case's figures rest on: a speed measured from the clip's lane dashes stands in
 * for the observer's speed given. The popup's analysis and the overlay's live readout both start here.
 */
export function workingAssumptions(given: EngineAssumptions, c: { marks: readonly Mark[] }): { a: EngineAssumptions; lanes: ReturnType<typeof measuredObserverSpeed> } {
  const lanes = measuredObserverSpeed(c, given.laneCycleId);
  return { a: lanes.speed ? { ...given, observerSpeed: { lo: lanes.speed.speed.lo, hi: lanes.speed.speed.hi } } : given, lanes };
}
