/*
 * Plausibility of an implied speed against published envelopes. The verdict says whether the
 * picture, as measured, is consistent with ordinary flight of the stated kind of object; it is a
 * statement about figures and assumptions, never about a person.
 *
 * All figures here are airspeeds: airspeed = ground speed + headwind component. Envelope tables are
 * indicated airspeeds; near the ground the true airspeed differs by about 2 % per 1000 ft (common
 * practice), within the spread of a measurement from a picture, so class ranges are compared as they
 * are. Only the regulatory limits, where that margin can decide the verdict, are converted to true
 * airspeed at the highest altitude the interval allows, which favours the aircraft.
 */
import { beaufortForce } from './beaufort';
import { APPROACH_CATEGORIES_VAT, CLASS_ENVELOPES, HOVER_GROUND_SPEED_KT, PANS_OPS, SPEED_FIGURES, type ClassEnvelope, type FlightPhase, type ObjectKind } from './envelopes';
import { FOOT_M, KNOT_MS, MAX_SPEED_MS } from './constants';
import { InputError } from './errors';
import type { Estimate } from './stats';
import { inRange } from './validate';

// the tables were here; their names are still reached through this module
export {
  APPROACH_CATEGORIES_VAT,
  CLASS_ENVELOPES,
  FINAL_APPROACH_RANGES,
  HOVER_GROUND_SPEED_KT,
  SPEED_FIGURES,
  type ClassEnvelope,
  type FlightPhase,
  type ObjectKind,
  type SpeedBand,
  type SpeedFigure,
} from './envelopes';

export type VerdictLevel = 'ordinary' | 'stretched' | 'out-of-envelope' | 'undecided';

/** One plain sentence per level, for display beside the rule. */
export const VERDICT_SENTENCES: Readonly<Record<VerdictLevel, string>> = Object.freeze({
  ordinary: 'The implied speed is consistent with ordinary flight for this kind of object.',
  stretched:
    'The implied speed is unusual for this kind of object: ordinary flight fits only toward one end of the measured interval, so the assumptions (size, field of view, observer speed) deserve a second look.',
  'out-of-envelope':
    'The implied speed lies outside the published envelope for this kind of object over the whole measured interval: as measured, the picture is not consistent with ordinary flight, which usually means one of the assumptions (which object, its size, the field of view, the observer speed) is off.',
  undecided: 'The figures do not settle it: without the kind of object there is no envelope to compare with.',
});

/** Approach category of a threshold speed (m/s), or null above category E's 210 kt. */
export function approachCategory(vatMs: number): 'A' | 'B' | 'C' | 'D' | 'E' | null {
  inRange('speed at threshold', vatMs, 0, MAX_SPEED_MS, ' m/s');
  const cats = APPROACH_CATEGORIES_VAT;
  const e = cats[cats.length - 1]!;
  if (vatMs > e.hiKt! * KNOT_MS) return null;
  // thresholds compared in m/s so that n * KNOT_MS lands exactly on its band
  for (let i = cats.length - 1; i > 0; i--) {
    if (vatMs >= cats[i]!.loKt * KNOT_MS) return cats[i]!.id as 'B' | 'C' | 'D' | 'E';
  }
  return 'A';
}

export interface Verdict {
  level: VerdictLevel;
  rule: { id: string; text: string; source: string };
  /** The values behind the decision, SI (m/s, m), named with their unit. */
  numbers: Record<string, number>;
  hover: { headwindNeededMs: number; beaufort: { force: number; description: string } } | null;
  notes: string[];
}

export interface JudgeInput {
  /** Ground speed magnitude (m/s, >= 0) with its interval. */
  groundSpeed: Estimate;
  kind: ObjectKind;
  /** Height above mean sea level in feet, as near as known (height above a low-lying road will do). */
  altitudeFt?: Estimate | number;
  /** Wind component against the object's motion (m/s; negative for a tailwind). */
  headwind?: number;
  phase?: FlightPhase;
  /** The clip is claimed to show the object hovering, whatever the measured interval. */
  hovering?: boolean;
}

interface Interval {
  lo: number;
  med: number;
  hi: number;
}

interface Outcome {
  level: 'ordinary' | 'stretched' | 'out-of-envelope';
  id: string;
  text: string;
  source: string;
  /** Worth a note when it does not decide: anything but a plain "well inside". */
  telling: boolean;
}

/** Lenient true-airspeed equivalent of an indicated limit: +2 % per 1000 ft (common practice). */
const TAS_PER_FT = 0.02 / 1000;
const F = SPEED_FIGURES;

const SEVERITY = { ordinary: 1, stretched: 2, 'out-of-envelope': 3 } as const;
const KINDS: readonly ObjectKind[] = ['fixed-wing-transport', 'fixed-wing-light', 'light-sport', 'rotorcraft', 'unknown'];
const PHASES: readonly FlightPhase[] = ['approach', 'cruise', 'unknown'];
const TEN_THOUSAND_FT = 10000;
const ALT_MIN_FT = -2000;
const ALT_MAX_FT = 100000;

const kt = (ms: number): string => String(Math.round(ms / KNOT_MS));
function ivText(a: Interval): string {
  const lo = kt(a.lo);
  const hi = kt(a.hi);
  return lo.startsWith('-') || hi.startsWith('-') ? `${lo} to ${hi} kt` : `${lo}-${hi} kt`;
}

function checkEstimate(field: string, e: Estimate, min: number, max: number, unit: string): Estimate {
  if (typeof e !== 'object' || e === null) throw new InputError(field, e, 'a median with its 5 % and 95 % values');
  inRange(`${field} (5 %)`, e.p05, min, max, unit);
  inRange(`${field} (median)`, e.median, min, max, unit);
  inRange(`${field} (95 %)`, e.p95, min, max, unit);
  if (!(e.p05 <= e.median && e.median <= e.p95)) {
    throw new InputError(field, `${e.p05} / ${e.median} / ${e.p95}`, '5 % value <= median <= 95 % value');
  }
  return e;
}

/** |interval| for objects that may hover or move either way through the air. */
function magnitude(a: Interval): Interval {
  if (a.lo >= 0) return a;
  if (a.hi <= 0) return { lo: -a.hi, med: -a.med, hi: -a.lo };
  return { lo: 0, med: Math.abs(a.med), hi: Math.max(-a.lo, a.hi) };
}

/** The class's own envelope: floor over the whole interval, then the median against the normal range. */
function classRule(env: ClassEnvelope, phase: FlightPhase, a: Interval, numbers: Record<string, number>): Outcome {
  const range = phase === 'approach' ? env.approach : env.other;
  const nLo = range.loKt * KNOT_MS;
  const nHi = range.hiKt * KNOT_MS;
  numbers.normalLoMs = nLo;
  numbers.normalHiMs = nHi;
  const iv = ivText(a);
  if (env.floorKt !== null) {
    const floor = env.floorKt * KNOT_MS;
    numbers.floorMs = floor;
    if (a.hi < floor) {
      return {
        level: 'out-of-envelope',
        id: 'stall-floor',
        text: `A ${env.label} cannot fly slower than about ${kt(floor)} kt; the implied airspeed ${iv} lies entirely below`,
        source: env.floorSource,
        telling: true,
      };
    }
  }
  const id = `${env.kind}-${phase === 'approach' ? 'approach' : 'flight'}-range`;
  if (a.med >= nLo && a.med <= nHi) {
    const where = a.lo >= nLo && a.hi <= nHi ? 'lies inside' : `has its median (${kt(a.med)} kt) inside`;
    return {
      level: 'ordinary',
      id,
      text: `${range.text}; the implied airspeed ${iv} ${where}`,
      source: range.source,
      telling: where !== 'lies inside',
    };
  }
  const side = a.med < nLo ? 'below' : 'above';
  const reach = (side === 'below' ? a.hi >= nLo : a.lo <= nHi) ? 'only its tail reaches that range' : 'none of it reaches that range';
  return {
    level: 'stretched',
    id,
    text: `${range.text}; the implied airspeed ${iv} has its median (${kt(a.med)} kt) ${side}, and ${reach}`,
    source: range.source,
    telling: true,
  };
}

/** An upper limit judged with the interval: all above -> out, median above -> stretched. */
function ceilingRule(id: string, what: string, limitMs: number, a: Interval, source: string): Outcome {
  const iv = ivText(a);
  if (a.lo > limitMs) {
    return { level: 'out-of-envelope', id, text: `${what}; the implied airspeed ${iv} lies entirely above`, source, telling: true };
  }
  if (a.med > limitMs) {
    const text = `${what}; the implied airspeed ${iv} has its median (${kt(a.med)} kt) above`;
    return { level: 'stretched', id, text, source, telling: true };
  }
  const tail = a.hi > limitMs;
  const text = `${what}; the implied airspeed ${iv} ${tail ? 'only reaches above with its tail' : 'lies below'}`;
  return { level: 'ordinary', id, text, source, telling: tail };
}

/**
 * Judge an implied ground speed against the envelope of a kind of object. Decisions use the whole
 * 5-95 % interval: out of envelope only when all of it is beyond a hard limit (below the least flying
 * speed, above a regulatory ceiling that applies, above the speed of sound); ordinary when the median
 * lies in the class's normal range; stretched in between. The most severe rule decides; the others
 * become notes.
 */
export function judgeSpeed(input: JudgeInput): Verdict {
  if (typeof input !== 'object' || input === null) throw new InputError('speed judgement input', input, 'an object');
  const gs = checkEstimate('ground speed', input.groundSpeed, 0, MAX_SPEED_MS, ' m/s');
  const kind = input.kind;
  if (!KINDS.includes(kind)) throw new InputError('kind of object', kind, KINDS.join(', '));
  const phase = input.phase ?? 'unknown';
  if (!PHASES.includes(phase)) throw new InputError('flight phase', phase, PHASES.join(', '));
  const headwind = input.headwind ?? 0;
  inRange('headwind', headwind, -MAX_SPEED_MS, MAX_SPEED_MS, ' m/s');
  if (input.hovering !== undefined && typeof input.hovering !== 'boolean') {
    throw new InputError('hovering claim', input.hovering, 'true or false');
  }
  let alt: Estimate | null = null;
  if (typeof input.altitudeFt === 'number') {
    inRange('altitude', input.altitudeFt, ALT_MIN_FT, ALT_MAX_FT, ' ft');
    alt = { p05: input.altitudeFt, median: input.altitudeFt, p95: input.altitudeFt };
  } else if (input.altitudeFt !== undefined) {
    alt = checkEstimate('altitude', input.altitudeFt, ALT_MIN_FT, ALT_MAX_FT, ' ft');
  }

  const fixedWing = kind === 'fixed-wing-transport' || kind === 'fixed-wing-light' || kind === 'light-sport';
  const signed: Interval = { lo: gs.p05 + headwind, med: gs.median + headwind, hi: gs.p95 + headwind };
  // an aeroplane must move forward through the air; anything else may hover or drift either way
  const air = fixedWing ? signed : magnitude(signed);

  const numbers: Record<string, number> = {
    groundSpeedP05Ms: gs.p05,
    groundSpeedMedianMs: gs.median,
    groundSpeedP95Ms: gs.p95,
    headwindMs: headwind,
    airspeedP05Ms: air.lo,
    airspeedMedianMs: air.med,
    airspeedP95Ms: air.hi,
  };
  if (alt) {
    numbers.altitudeP05M = alt.p05 * FOOT_M;
    numbers.altitudeMedianM = alt.median * FOOT_M;
    numbers.altitudeP95M = alt.p95 * FOOT_M;
  }
  const notes: string[] = [];
  const outcomes: Outcome[] = [];

  const env = kind === 'unknown' ? null : CLASS_ENVELOPES[kind];
  if (env) outcomes.push(classRule(env, phase, air, numbers));

  const tasAt = (ft: number) => 1 + TAS_PER_FT * Math.max(0, ft);
  if (phase === 'approach') {
    // approaches are flown below 10 000 ft, under the 250 kt limit, and no category goes past 230 kt
    const ceiling = F.limit250.kt * KNOT_MS * (alt ? tasAt(Math.min(alt.p95, TEN_THOUSAND_FT)) : 1);
    numbers.approachCeilingMs = ceiling;
    outcomes.push(
      ceilingRule(
        'approach-ceiling',
        `No approach category reaches past 230 kt, and approaches are flown below 10 000 ft where ${kt(ceiling)} kt true airspeed is the limit`,
        ceiling,
        air,
        `${PANS_OPS} (from memory for category E); ${F.limit250.source}`,
      ),
    );
  }

  if (alt && alt.p95 < TEN_THOUSAND_FT) {
    const limit = F.limit250.kt * KNOT_MS * tasAt(alt.p95);
    numbers.limit250TasMs = limit;
    outcomes.push(
      ceilingRule(
        'limit-250',
        `Below 10 000 ft aircraft fly at most 250 kt indicated, about ${kt(limit)} kt true airspeed at ${Math.round(alt.p95)} ft`,
        limit,
        air,
        F.limit250.source,
      ),
    );
  } else if (alt && alt.p05 < TEN_THOUSAND_FT) {
    notes.push('The altitude interval straddles 10 000 ft, so the 250 kt limit below it may or may not apply; it was not used.');
  } else if (!alt && air.med > F.limit250.kt * KNOT_MS) {
    notes.push(
      `No altitude was given, so the 250 kt limit below 10 000 ft was not applied; the implied airspeed ${ivText(air)} would exceed it near the ground.`,
    );
  }
  if (alt && alt.p05 <= 2500 && air.med > F.limit200.kt * KNOT_MS) {
    notes.push(
      `If the aircraft was within 4 NM of a class C or D primary airport at or below 2500 ft above the surface, the limit there is 200 kt (${F.limit200.source}); the implied airspeed is ${ivText(air)}.`,
    );
  }

  numbers.saneMaximumMs = F.saneMaximum.kt * KNOT_MS;
  outcomes.push(
    ceilingRule('sane-maximum', 'Civil aircraft near the ground fly slower than sound, 661 kt at sea level', numbers.saneMaximumMs, air, F.saneMaximum.source),
  );

  // the first of the most severe outcomes decides (class envelope first, then ceilings)
  let decisive = outcomes[0]!;
  for (const o of outcomes) if (SEVERITY[o.level] > SEVERITY[decisive.level]) decisive = o;
  for (const o of outcomes) if (o !== decisive && o.telling) notes.push(`${o.text} (${o.source}).`);

  let level: VerdictLevel = decisive.level;
  let rule = { id: decisive.id, text: decisive.text, source: decisive.source };
  if (!env && level === 'ordinary') {
    level = 'undecided';
    rule = {
      id: 'no-class',
      text: `With the kind of object unknown there is no class envelope; the implied airspeed ${ivText(air)} breaks no general ceiling`,
      source: 'ordinary flight envelopes need the kind of object',
    };
  }

  let hover: Verdict['hover'] = null;
  const hoverClaim = input.hovering === true || gs.p05 <= HOVER_GROUND_SPEED_KT * KNOT_MS;
  if (hoverClaim) {
    // an unknown object is held to the slowest aeroplane class: a helicopter, balloon or drone needs no wind
    const minKt = env ? env.minFlyingKt : F.lightSportVs1.kt;
    const need = Math.max(0, minKt * KNOT_MS - gs.median);
    const b = beaufortForce(need);
    hover = { headwindNeededMs: need, beaufort: { force: b.force, description: b.description } };
    numbers.headwindNeededMs = need;
    if (env?.canHover) {
      notes.push(`A ${env.label} can hover in calm air: no headwind is needed.`);
    } else {
      const who = env
        ? `a ${env.label}, flying at the ${kt(minKt * KNOT_MS)} kt it needs,`
        : 'even a light-sport aeroplane, flying at its 45 kt stall-speed cap,';
      notes.push(
        `To show this ground speed, ${who} would need a headwind of about ${kt(need)} kt (Beaufort ${b.force}, ${b.description}); the headwind given is ${kt(headwind)} kt. Beaufort describes wind at 10 m; wind aloft is usually stronger (common practice).`,
      );
      if (!env) notes.push('A helicopter, balloon or drone can hover; an aeroplane cannot: the kind of object decides.');
    }
  }

  return { level, rule, numbers, hover, notes };
}
