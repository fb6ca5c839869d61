import type { LandmarkFigures } from '../engine/pass-series';
import type { RegimeShares } from '../engine/uncertainty';
import type { EngineAssumptions } from './assumptions';
import { allowedReadings } from './pass-scene';
import type { Mark, Point } from './schema';

/*
 * Can this landmark be the motionless point? A landmark the object seems pinned over answers the
 * whole case by itself (its range fixes where the sight lines cross), so a decoy, a mast that only
 * happens to line up on one frame, gives a confident wrong answer. Each check here weighs it against
 * other evidence and says, in words, why it cannot be the point:
 * - it must stand on the object's sight line: under the object's centre on the frame;
 * - it must stay there: marked on several frames, its column must follow the object's;
 * - it must lie where the direction the user gave puts the point (between road and track for the
 *   other way, beyond the track for the same way slower, nowhere in view for the same way faster);
 * - the ranges over time must agree with it: the fit puts the point at the landmark's distance.
 */

export type LandmarkCheckCode = 'off-sight-line' | 'leaves-sight-line' | 'against-direction' | 'disagrees-with-fit';

export interface LandmarkProblem {
  code: LandmarkCheckCode;
  text: string;
}

export interface LandmarkCheck {
  /** the mark checked */
  mark: Mark;
  problems: LandmarkProblem[];
}

/** How far a landmark's column may stray from the object's, px: placement, plus a roll of about 1.7 deg over their height apart (common practice for a hand-held camera). */
export function sightLineTolerancePx(object: Mark, landmark: Mark): number {
  const [a, b] = object.points as [Point, Point];
  const [c, d] = landmark.points as [Point, Point];
  const rise = Math.abs((a.y + b.y) / 2 - (c.y + d.y) / 2);
  return 2 + 3 * Math.hypot(object.edgeSigmaPx, landmark.edgeSigmaPx) + 0.03 * rise;
}

/** The landmark's column less the object centre's column, px. */
export function columnOffsetPx(object: Mark, landmark: Mark): number {
  const [a, b] = object.points as [Point, Point];
  const [c, d] = landmark.points as [Point, Point];
  return (c.x + d.x) / 2 - (a.x + b.x) / 2;
}

/** Where each reading of the direction puts the motionless point. */
const READING_REGIME = { opposite: 'between', 'same-slower': 'beyond', 'same-faster': 'behind' } as const;

/** Where the user's direction puts the motionless point; null when it is not said. */
function expectedRegimes(direction: EngineAssumptions['direction']): (keyof RegimeShares)[] | null {
  return direction === 'unknown' ? null : allowedReadings(direction).map((r) => READING_REGIME[r]);
}

const REGIME_WORDS: Record<keyof RegimeShares, string> = {
  between: 'between the road and the object',
  beyond: 'beyond the object',
  behind: 'behind the observer',
  none: 'nowhere (constant bearing)',
};

const DIRECTION_WORDS: Record<EngineAssumptions['direction'], string> = {
  opposite: 'the other way',
  same: 'the same way',
  'same-slower': 'the same way, slower',
  'same-faster': 'the same way, faster',
  unknown: 'either way',
};

export interface LandmarkAtFrame {
  landmark: Mark;
  object: Mark;
  /** single-frame regime shares with this landmark taken as the point, when computed */
  regimeShares?: RegimeShares;
  /** the fit's figures for this landmark, when there is a fit */
  fit?: LandmarkFigures;
}

export function checkLandmarks(items: readonly LandmarkAtFrame[], direction: EngineAssumptions['direction']): LandmarkCheck[] {
  const byKey = new Map<string, LandmarkAtFrame[]>();
  for (const it of items) {
    const k = it.landmark.landmarkId ?? '';
    byKey.set(k, [...(byKey.get(k) ?? []), it]);
  }
  return items.map((it) => {
    const problems: LandmarkProblem[] = [];
    const off = columnOffsetPx(it.object, it.landmark);
    const tol = sightLineTolerancePx(it.object, it.landmark);
    if (Math.abs(off) > tol) {
      problems.push({
        code: 'off-sight-line',
        text: `It stands ${Math.abs(off).toFixed(1)} px ${off > 0 ? 'right' : 'left'} of the object's centre at ${it.landmark.t.toFixed(3)} s (more than ${tol.toFixed(1)} px allowed): it is not on the object's sight line.`,
      });
    }
    const same = byKey.get(it.landmark.landmarkId ?? '')!;
    for (const other of same) {
      if (other === it) continue;
      const drift = columnOffsetPx(other.object, other.landmark) - off;
      const allowed = Math.max(tol, sightLineTolerancePx(other.object, other.landmark));
      if (Math.abs(drift) > allowed) {
        problems.push({
          code: 'leaves-sight-line',
          text: `Between ${Math.min(it.landmark.t, other.landmark.t).toFixed(3)} s and ${Math.max(it.landmark.t, other.landmark.t).toFixed(3)} s it moves ${Math.abs(drift).toFixed(1)} px against the object (more than ${allowed.toFixed(1)} px allowed): the motionless point would stay on the object's sight line.`,
        });
        break;
      }
    }
    const expected = expectedRegimes(direction);
    if (expected && it.regimeShares) {
      const s = it.regimeShares;
      const majority = (Object.keys(s) as (keyof RegimeShares)[]).reduce((a, b) => (s[b] > s[a] ? b : a));
      const agreeing = expected.reduce((sum, r) => sum + s[r], 0);
      if (agreeing < 0.05) {
        problems.push({
          code: 'against-direction',
          text: `Taken as the motionless point it lies ${REGIME_WORDS[majority]}, which means the object flies ${majority === 'between' ? 'the other way' : majority === 'beyond' ? 'the same way, slower' : 'the same way, faster'}; you said it flies ${DIRECTION_WORDS[direction]}.`,
        });
      }
    }
    const below = it.fit?.ratioBelowOne;
    if (below !== null && below !== undefined && (below > 0.99 || below < 0.01)) {
      const r = it.fit!.ratio!;
      problems.push({
        code: 'disagrees-with-fit',
        text: `The ranges over time put the motionless point ${r.median > 0 ? `${(1 / r.median).toFixed(2)} times as far as the landmark` : 'behind the observer'} (the landmark's distance over the point's: ${r.median.toFixed(2)}, 5-95 % ${r.p05.toFixed(2)} to ${r.p95.toFixed(2)}, where 1 would mean it is the point).`,
      });
    }
    return { mark: it.landmark, problems };
  });
}
