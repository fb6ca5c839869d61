import { InputError } from './errors';

/*
 * Validators used at the top of every engine function. They allocate nothing on the success path,
 * because they run inside Monte Carlo loops.
 */

export function finite(field: string, v: number): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) throw new InputError(field, v, 'a finite number');
  return v;
}

/** v in the open interval (0, max]; max defaults to no bound. */
export function positive(field: string, v: number, max = Infinity, unit = ''): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0 || v > max) {
    throw new InputError(field, v, max === Infinity ? `a number > 0${unit}` : `more than 0 and at most ${max}${unit}`);
  }
  return v;
}

/** v in [min, max] (closed); set open flags to exclude an end. */
export function inRange(
  field: string,
  v: number,
  min: number,
  max: number,
  unit = '',
  minOpen = false,
  maxOpen = false,
): number {
  const ok =
    typeof v === 'number' &&
    Number.isFinite(v) &&
    (minOpen ? v > min : v >= min) &&
    (maxOpen ? v < max : v <= max);
  if (!ok) {
    const lo = minOpen ? `more than ${min}` : `at least ${min}`;
    const hi = maxOpen ? `less than ${max}` : `at most ${max}`;
    throw new InputError(field, v, `${lo} and ${hi}${unit}`);
  }
  return v;
}

/** An integer in [min, max]. */
export function integer(field: string, v: number, min: number, max: number): number {
  if (typeof v !== 'number' || !Number.isInteger(v) || v < min || v > max) {
    throw new InputError(field, v, `a whole number from ${min} to ${max}`);
  }
  return v;
}

/** A [lo, hi] band with lo <= hi, both within [min, max]. */
export function band(field: string, lo: number, hi: number, min: number, max: number, unit = ''): void {
  inRange(`${field} (low end)`, lo, min, max, unit);
  inRange(`${field} (high end)`, hi, min, max, unit);
  if (hi < lo) throw new InputError(field, `${lo} to ${hi}`, 'a low end not above the high end');
}
