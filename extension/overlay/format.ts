import { FOOT_M, KNOT_MS, MPH_MS, NAUTICAL_MILE_M, STATUTE_MILE_M } from '../../src/case';
import type { Estimate, UnitSystem } from '../../src/case';

/*
 * Plain-number formatting for the overlay's live readout, in the unit system chosen in the
 * settings. The popup formats through the units layer (mathjs); the overlay bundle must stay free
 * of it, so the few conversions it needs are written out here from the exact constants
 * (NIST SP 811 App. B.8, in constants.ts), with 3 significant figures.
 */

export function sig3(v: number): string {
  if (!Number.isFinite(v)) return '–';
  const a = Math.abs(v);
  if (a >= 100) return v.toFixed(0);
  if (a >= 10) return v.toFixed(1);
  if (a >= 1) return v.toFixed(2);
  return v.toPrecision(3);
}

/** The unit a distance of this size is shown in, per system: [name, metres per unit]. */
function distanceUnit(m: number, system: UnitSystem): [string, number] {
  if (system === 'metric') return m >= 1000 ? ['km', 1000] : ['m', 1];
  if (system === 'imperial') return m >= STATUTE_MILE_M ? ['mi', STATUTE_MILE_M] : ['ft', FOOT_M];
  return m >= NAUTICAL_MILE_M ? ['NM', NAUTICAL_MILE_M] : ['ft', FOOT_M];
}

const SPEED_UNITS: Record<UnitSystem, [string, number]> = { metric: ['km/h', 1 / 3.6], imperial: ['mph', MPH_MS], aviation: ['kt', KNOT_MS] };

export function distance(m: number, system: UnitSystem = 'metric'): string {
  const [u, k] = distanceUnit(m, system);
  return `${sig3(m / k)} ${u}`;
}

/** "2.41 km (1.98–2.90 km, 5–95 %)": the interval in the median's unit. */
export function distanceEstimate(e: Estimate, system: UnitSystem = 'metric'): string {
  const [u, k] = distanceUnit(e.median, system);
  return `${sig3(e.median / k)} ${u} (${sig3(e.p05 / k)}–${sig3(e.p95 / k)} ${u}, 5–95 %)`;
}

/** "2.87° (2.70–3.05°, 5–95 %)": an angle with its interval. */
export function degreesEstimate(e: Estimate): string {
  const d = (rad: number) => sig3((rad * 180) / Math.PI);
  return `${d(e.median)}° (${d(e.p05)}–${d(e.p95)}°, 5–95 %)`;
}

export function speedEstimate(e: Estimate, system: UnitSystem = 'metric'): string {
  const [u, k] = SPEED_UNITS[system];
  return `${sig3(e.median / k)} ${u} (${sig3(e.p05 / k)}–${sig3(e.p95 / k)} ${u}, 5–95 %)`;
}

/** Seconds as m:ss.sss, as the summary shows timestamps. */
export function timestamp(t: number): string {
  const m = Math.floor(t / 60);
  const s = t - 60 * m;
  return `${m}:${s.toFixed(3).padStart(6, '0')}`;
}
