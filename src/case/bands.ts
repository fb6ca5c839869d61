import { InputError } from '../engine/errors';
import { parseQuantity, type Quantity } from '../engine/units';

/**
 * A range typed by a user, with units: "39 to 41 deg", "24-36 m", "90 km/h ± 5", "55 kn", or one
 * value for an exact input. Both ends go through the units layer, so each may carry its own unit
 * ("80 ft to 30 m"); a bare number takes the field's unit. Returns SI, low end first.
 */
export function parseBand(text: string, kind: Quantity, field: string, defaultUnit: string): { lo: number; hi: number } {
  const s = text.trim();
  if (s === '') throw new InputError(field, text, 'a value or a range such as "24 to 36"');
  const pm = /^(.*?)\s*(?:±|\+\/-|\+-)\s*(.+)$/.exec(s);
  if (pm) {
    const centre = parseQuantity(pm[1]!, kind, field, defaultUnit);
    const spread = Math.abs(parseQuantity(pm[2]!, kind, field, unitOf(pm[1]!) ?? defaultUnit));
    return { lo: centre - spread, hi: centre + spread };
  }
  // "a to b", "a – b", "a .. b", or "a-b" between two numbers (a leading minus stays a sign)
  const range = /^(.+?)\s*(?:\bto\b|–|—|\.\.)\s*(.+)$/.exec(s) ?? /^(.*\d[^-]*?)\s*-\s*(\d.*)$/.exec(s);
  if (range) {
    // "24-36 m": the unit written after the second end serves the first too
    const hiUnit = unitOf(range[2]!);
    const lo = parseQuantity(unitOf(range[1]!) ? range[1]! : `${range[1]} ${hiUnit ?? defaultUnit}`, kind, field, defaultUnit);
    const hi = parseQuantity(range[2]!, kind, field, defaultUnit);
    if (hi < lo) throw new InputError(field, text, 'a low end not above the high end');
    return { lo, hi };
  }
  const v = parseQuantity(s, kind, field, defaultUnit);
  return { lo: v, hi: v };
}

/** The unit written after a number, if any ("36 m" -> "m"; "36" -> null). */
function unitOf(part: string): string | null {
  const m = /^\s*[-+]?[\d.]+(?:e[-+]?\d+)?\s*(.*?)\s*$/i.exec(part);
  return m && m[1] ? m[1] : null;
}
