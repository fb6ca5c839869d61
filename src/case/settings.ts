import { CAMERA_PROFILE_IDS } from './defaults';
import type { UnitSystem } from '../engine/units';
import type { Range } from './schema';

/**
 * The user's settings, one storage key of their own, versioned like cases. New cases start from
 * these defaults; a case keeps its own assumptions once set.
 */
export const SETTINGS_KEY = 'settings';
export const SETTINGS_VERSION = 1;

export interface Settings {
  version: number;
  /** How every figure is shown: metric (m, km, km/h), imperial (ft, mi, mph), aviation (ft, NM, kt). */
  system: UnitSystem;
  /** The camera profile new cases assume (profiles.ts id). */
  cameraProfile: string;
  /** The observer speed new cases assume, m/s; absent: unknown until given. */
  observerSpeedMs?: Range;
  /** The user's name for marks, if they give one (no account: just a name). */
  markerName?: string;
}

/** Longest name kept beside a mark (the case validation allows as much for a mark's `by`). */
export const MAX_MARKER_NAME = 100;

export const DEFAULT_SETTINGS: Settings = { version: SETTINGS_VERSION, system: 'metric', cameraProfile: 'phone-main-landscape-stabilised' };

const SYSTEMS: readonly UnitSystem[] = ['metric', 'imperial', 'aviation'];

/** Reads stored settings, falling back field by field to the defaults (nothing stored is lost). */
export function readSettings(raw: unknown): Settings {
  if (typeof raw !== 'object' || raw === null) return { ...DEFAULT_SETTINGS };
  const o = raw as Partial<Settings>;
  const s: Settings = { ...DEFAULT_SETTINGS };
  if (SYSTEMS.includes(o.system as UnitSystem)) s.system = o.system as UnitSystem;
  if (CAMERA_PROFILE_IDS.includes(o.cameraProfile as string)) s.cameraProfile = o.cameraProfile as string;
  const r = o.observerSpeedMs;
  if (r && Number.isFinite(r.lo) && Number.isFinite(r.hi) && r.lo >= 0 && r.hi >= r.lo && r.hi <= 1000) s.observerSpeedMs = { lo: r.lo, hi: r.hi };
  if (typeof o.markerName === 'string' && o.markerName.trim()) s.markerName = o.markerName.trim().slice(0, MAX_MARKER_NAME);
  return s;
}
