import { profileById, profileHfovRad } from '../engine/profiles';
import { defaultAssumptions } from './assumptions';
import type { CaseAssumptions } from './schema';

/*
 * A new case's assumptions from the user's settings: the camera class they chose and the observer's
 * speed they usually drive at, over the tool's defaults. Kept apart from assumptions.ts so that the
 * overlay, which never makes a case, does not carry every camera class.
 */
export function assumptionsFromSettings(settings: { cameraProfile: string; observerSpeedMs?: { lo: number; hi: number } }): CaseAssumptions {
  const profile = profileById(settings.cameraProfile);
  const hf = profileHfovRad(profile);
  const deg = 180 / Math.PI;
  return {
    ...defaultAssumptions(),
    cameraLabel: profile.label,
    hfovDeg: { lo: hf.lo * deg, hi: hf.hi * deg },
    ...(settings.observerSpeedMs ? { observerSpeedMs: { ...settings.observerSpeedMs } } : {}),
  };
}
