import type { Estimate } from '../../src/engine/stats';

/*
 * Plain-number formatting for the overlay's live readout. The popup formats through the units
 * layer (mathjs); the overlay bundle must stay free of it, so it prints metric with 3 significant
 * figures.
 */

export function sig3(v: number): string {
  if (!Number.isFinite(v)) return '–';
  const a = Math.abs(v);
  if (a >= 100) return v.toFixed(0);
  if (a >= 10) return v.toFixed(1);
  if (a >= 1) return v.toFixed(2);
  return v.toPrecision(3);
}

export function distance(m: number, unitKm = m >= 1000): string {
  return unitKm ? `${sig3(m / 1000)} km` : `${sig3(m)} m`;
}

export function distanceEstimate(e: Estimate): string {
  const km = e.median >= 1000;
  return `${distance(e.median, km)} (${distance(e.p05, km).replace(/ k?m$/, '')}–${distance(e.p95, km)}, 5–95 %)`;
}

export function degrees(rad: number): string {
  return `${sig3((rad * 180) / Math.PI)}°`;
}

export function speedKmh(ms: number): string {
  return `${sig3(ms * 3.6)} km/h`;
}

export function speedEstimate(e: Estimate): string {
  return `${speedKmh(e.median)} (${sig3(e.p05 * 3.6)}–${speedKmh(e.p95)}, 5–95 %)`;
}

/** Seconds as m:ss.sss, as the summary shows timestamps. */
export function timestamp(t: number): string {
  const m = Math.floor(t / 60);
  const s = t - 60 * m;
  return `${m}:${s.toFixed(3).padStart(6, '0')}`;
}
