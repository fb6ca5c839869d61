/*
 * The units layer: text a user types -> SI numbers, and SI numbers -> text in the user's unit system.
 * The only engine module that imports mathjs. It builds a lean instance from the few factories that
 * parsing and unit arithmetic need (create(all) would pull in the whole library), and never lets
 * mathjs evaluate anything itself: the parse tree is checked and walked here, so only numbers, units
 * and + - * / ^ ever run.
 */
import {
  addDependencies,
  create,
  createUnitDependencies,
  divideDependencies,
  multiplyDependencies,
  parseDependencies,
  powDependencies,
  subtractDependencies,
  unaryMinusDependencies,
  unaryPlusDependencies,
  unitDependencies,
  type FactoryFunctionMap,
  type MathNode,
  type Unit,
} from 'mathjs';
import {
  DEG,
  FOOT_M,
  KMH_MS,
  KNOT_MS,
  MAX_RANGE_M,
  MAX_SIZE_M,
  MAX_SPEED_MS,
  MAX_TIME_S,
  MPH_MS,
  NAUTICAL_MILE_M,
  STATUTE_MILE_M,
} from './constants';
import { InputError } from './errors';
import type { Estimate } from './stats';
import { finite, integer } from './validate';

export type Quantity = 'speed' | 'distance' | 'length' | 'angle' | 'time';
export type UnitSystem = 'metric' | 'imperial' | 'aviation';

interface KindInfo {
  si: string;
  example: string;
  /** Inclusive magnitude bound: beyond it the entry is a typo, not a measurement. */
  max: number;
  signed: boolean;
}

const KINDS: Record<Quantity, KindInfo> = {
  speed: { si: 'm/s', example: 'a speed such as 100 km/h, 55 kn or 30 m/s', max: MAX_SPEED_MS, signed: true },
  distance: { si: 'm', example: 'a distance such as 2.5 km, 3 NM or 8000 ft', max: MAX_RANGE_M, signed: true },
  length: { si: 'm', example: 'a length such as 35 m or 110 ft', max: MAX_SIZE_M, signed: false },
  angle: { si: 'rad', example: 'an angle such as 12.5 deg or 0.2 rad', max: 2 * Math.PI, signed: true },
  time: { si: 's', example: 'a time such as 12.5 s, 2 min or 1:30', max: MAX_TIME_S, signed: false },
};

/*
 * The mathjs instance is made on the first entry parsed, not when this module loads: making it
 * builds every typed function it holds, a quarter of a second of a page's thread on this machine,
 * and a page that only shows figures (formatting needs no mathjs) would pay it for nothing.
 */
let made: { math: ReturnType<typeof create>; reference: Record<Quantity, Unit> } | null = null;

function mathjs(): { math: ReturnType<typeof create>; reference: Record<Quantity, Unit> } {
  if (made) return made;
  // mathjs types its dependency maps as Record lookups, hence possibly undefined under
  // noUncheckedIndexedAccess; each one exists at run time (a missing one would throw right here).
  const math = create({
    parseDependencies,
    unitDependencies,
    createUnitDependencies,
    addDependencies,
    subtractDependencies,
    multiplyDependencies,
    divideDependencies,
    unaryMinusDependencies,
    unaryPlusDependencies,
    powDependencies,
  } as FactoryFunctionMap);
  /*
   * mathjs 15 knows neither the knot nor the nautical mile, and reads `kt` as kilo-tonne (prefix k on
   * the tonne). We define them exactly (NIST SP 811 (2008) App. B.8: 1 kn = 1852/3600 m/s, 1 NM = 1852 m)
   * under every spelling people use; an exact unit name is matched before prefix + unit, so `kt` now
   * means the knot. `override` removes any earlier unit of the same name. Lower-case `nm` stays the
   * nanometre: the nautical mile is `NM` or `nmi`. mathjs has no `mph` either (only mi/h), so it is
   * added from the same table (1 mph = 0.44704 m/s). The foot and mile are mathjs's own (0.3048 m,
   * 1609.344 m), checked in the tests.
   */
  math.createUnit(
    {
      kn: { definition: new math.Unit(KNOT_MS, 'm/s'), aliases: ['kt', 'kts', 'knot', 'knots'] },
      NM: { definition: new math.Unit(NAUTICAL_MILE_M, 'm'), aliases: ['nmi'] },
      mph: { definition: new math.Unit(MPH_MS, 'm/s') },
    },
    { override: true },
  );
  const reference: Record<Quantity, Unit> = {
    speed: math.unit(KINDS.speed.si),
    distance: math.unit(KINDS.distance.si),
    length: math.unit(KINDS.length.si),
    angle: math.unit(KINDS.angle.si),
    time: math.unit(KINDS.time.si),
  };
  made = { math, reference };
  return made;
}

const ALLOWED_OPERATORS = new Set(['add', 'subtract', 'multiply', 'divide', 'unaryMinus', 'unaryPlus', 'pow']);
const MAX_TEXT = 200;

function checkKind(kind: Quantity): KindInfo {
  const info = (KINDS as Record<string, KindInfo | undefined>)[kind];
  if (!info) throw new InputError('quantity', kind, Object.keys(KINDS).join(', '));
  return info;
}

/** Rejection of anything that is not plain arithmetic on numbers and units. */
class NotArithmetic extends Error {}

/*
 * Walks a parse tree that has been checked node by node. Symbols are only ever unit names: a name
 * that mathjs would resolve to a function or constant (evaluate, import, pi) is not a unit and is
 * refused, as are assignments, function calls and definitions, accessors, arrays, objects, ranges,
 * conditionals, comparisons, conversions (`to`) and strings.
 */
function walk(node: MathNode): number | Unit {
  switch (node.type) {
    case 'ConstantNode': {
      const v = (node as unknown as { value: unknown }).value;
      if (typeof v !== 'number') throw new NotArithmetic('only numbers may appear as values');
      return v;
    }
    case 'ParenthesisNode':
      return walk((node as unknown as { content: MathNode }).content);
    case 'SymbolNode': {
      const name = (node as unknown as { name: string }).name;
      const { math } = mathjs();
      if (!math.Unit.isValuelessUnit(name)) throw new NotArithmetic(`"${name}" is not a unit`);
      return math.unit(name);
    }
    case 'OperatorNode': {
      const op = node as unknown as { fn: string; op: string; args: MathNode[] };
      if (!ALLOWED_OPERATORS.has(op.fn)) throw new NotArithmetic(`the operator "${op.op}" is not allowed`);
      const args = op.args.map(walk);
      if (op.fn === 'pow' && typeof args[1] !== 'number') throw new NotArithmetic('an exponent must be a plain number');
      const { math } = mathjs();
      const f = (math as unknown as Record<string, (...a: (number | Unit)[]) => unknown>)[op.fn]!;
      const r = f(...args);
      if (typeof r !== 'number' && !math.isUnit(r)) throw new NotArithmetic('the result is not a real number');
      return r as number | Unit;
    }
    default:
      throw new NotArithmetic(`${node.type} is not allowed`);
  }
}

/** mm:ss or h:mm:ss, seconds possibly fractional. */
function clockTime(text: string): number | null {
  const m = /^\s*(?:(\d+):)?(\d+):(\d{1,2}(?:\.\d+)?)\s*$/.exec(text);
  if (!m) return null;
  const h = m[1] === undefined ? 0 : Number(m[1]);
  const min = Number(m[2]);
  const s = Number(m[3]);
  if (s >= 60 || (m[1] !== undefined && min >= 60)) return null;
  return h * 3600 + min * 60 + s;
}

/** Display and input habits: a degree sign means deg. */
function normalise(text: string): string {
  return text.replace(/\u00b0/g, ' deg ');
}

function bounded(value: number, info: KindInfo, field: string, text: string): number {
  const lo = info.signed ? -info.max : 0;
  if (!Number.isFinite(value) || value < lo || value > info.max) {
    throw new InputError(field, text, `${info.example}, from ${lo} to ${info.max} ${info.si}`);
  }
  return value;
}

/**
 * Parse a user's entry into SI (m, m/s, rad, s). Accepts unit-bearing arithmetic such as `100 km/h`,
 * `55 kn`, `0.4*1852 m`, `3 NM`, `12.5 deg`, and for time also `1:30` (mm:ss) or `1:02:03`.
 * A bare number takes defaultUnit; without one it is refused.
 */
export function parseQuantity(text: string, kind: Quantity, field: string, defaultUnit?: string): number {
  const info = checkKind(kind);
  if (typeof field !== 'string' || field.length === 0) throw new InputError('field name', field, 'a non-empty name');
  if (typeof text !== 'string' || text.trim() === '') throw new InputError(field, text, `${info.example} (nothing was entered)`);
  if (text.length > MAX_TEXT) throw new InputError(field, text, `${info.example} (at most ${MAX_TEXT} characters)`);
  if (kind === 'time') {
    const t = clockTime(text);
    if (t !== null) return bounded(t, info, field, text);
  }
  let result: number | Unit;
  try {
    result = walk(mathjs().math.parse(normalise(text)));
  } catch (e) {
    const why = e instanceof NotArithmetic ? e.message : 'not understood';
    throw new InputError(field, text, `${info.example} (${why})`);
  }
  if (typeof result === 'number') {
    if (defaultUnit === undefined) throw new InputError(field, text, `${info.example}: a unit is needed`);
    return bounded(result * unitFactor(defaultUnit, kind, 'default unit'), info, field, text);
  }
  if (result.value === null) throw new InputError(field, text, `${info.example}: a number is needed`);
  if (!result.equalBase(mathjs().reference[kind])) throw new InputError(field, text, `${info.example}: wrong kind of unit`);
  return bounded(result.toNumber(info.si), info, field, text);
}

/** SI value of one of `unit`, checked to measure `kind`. */
function unitFactor(unit: string, kind: Quantity, field: string): number {
  const info = checkKind(kind);
  let u: Unit;
  try {
    if (typeof unit !== 'string' || unit.length > MAX_TEXT) throw new Error('not text');
    u = mathjs().math.unit(normalise(unit).trim());
  } catch {
    throw new InputError(field, unit, `a unit of ${kind}, e.g. ${info.example}`);
  }
  if (u.value !== null || !u.equalBase(mathjs().reference[kind])) {
    throw new InputError(field, unit, `a unit of ${kind} without a number, e.g. ${info.example}`);
  }
  return u.toNumber(info.si);
}

/** valueSI expressed in `unit` (any mathjs unit of the right dimension, plus kn/kt/NM/nmi/mph). */
export function convert(valueSI: number, kind: Quantity, unit: string): number {
  finite('value', valueSI);
  return valueSI / unitFactor(unit, kind, 'unit');
}

interface DisplayUnit {
  label: string;
  factor: number;
  /** Separator between number and label. */
  sep: string;
}

const U = {
  ms: { label: 'm/s', factor: 1, sep: ' ' },
  kmh: { label: 'km/h', factor: KMH_MS, sep: ' ' },
  mph: { label: 'mph', factor: MPH_MS, sep: ' ' },
  kt: { label: 'kt', factor: KNOT_MS, sep: ' ' },
  m: { label: 'm', factor: 1, sep: ' ' },
  km: { label: 'km', factor: 1000, sep: ' ' },
  ft: { label: 'ft', factor: FOOT_M, sep: ' ' },
  mi: { label: 'mi', factor: STATUTE_MILE_M, sep: ' ' },
  NM: { label: 'NM', factor: NAUTICAL_MILE_M, sep: ' ' },
  deg: { label: '\u00b0', factor: DEG, sep: '' },
  s: { label: 's', factor: 1, sep: ' ' },
  min: { label: 'min', factor: 60, sep: ' ' },
  h: { label: 'h', factor: 3600, sep: ' ' },
} satisfies Record<string, DisplayUnit>;

/*
 * A small unit and the larger one it switches to once the rounded figure reaches one large unit
 * (so 999.7 m shows as 1.00 km, not 1000 m). Distances switch at 1 km, 1 statute mile and 1 NM.
 */
const DISPLAY: Record<Quantity, Record<UnitSystem, readonly DisplayUnit[]>> = {
  speed: { metric: [U.kmh], imperial: [U.mph], aviation: [U.kt] },
  distance: { metric: [U.m, U.km], imperial: [U.ft, U.mi], aviation: [U.ft, U.NM] },
  length: { metric: [U.m], imperial: [U.ft], aviation: [U.ft] },
  angle: { metric: [U.deg], imperial: [U.deg], aviation: [U.deg] },
  time: { metric: [U.s, U.min, U.h], imperial: [U.s, U.min, U.h], aviation: [U.s, U.min, U.h] },
};

function checkSystem(system: UnitSystem): UnitSystem {
  if (system !== 'metric' && system !== 'imperial' && system !== 'aviation') {
    throw new InputError('unit system', system, 'metric, imperial or aviation');
  }
  return system;
}

/** Significant-digit text that stays plain decimal for large numbers (no 1.23e+3). */
function sig(x: number, digits: number): string {
  const s = x.toPrecision(digits);
  if (s.includes('e+')) return String(Math.round(x));
  return Object.is(Number(s), -0) ? s.replace('-', '') : s;
}

function pickUnit(valueSI: number, kind: Quantity, system: UnitSystem, digits: number): DisplayUnit {
  const ladder = DISPLAY[kind][system];
  let chosen = ladder[0]!;
  for (let i = 1; i < ladder.length; i++) {
    const next = ladder[i]!;
    if (Math.abs(Number(sig(valueSI / chosen.factor, digits))) * chosen.factor >= next.factor) chosen = next;
  }
  return chosen;
}

function checkDigits(digits: number): number {
  return integer('significant digits', digits, 1, 15);
}

/** valueSI as text in the unit system, e.g. "2.41 km", "55.0 kt", "12.5°". Parses back with parseQuantity. */
export function formatQuantity(valueSI: number, kind: Quantity, system: UnitSystem, digits = 3): string {
  finite('value', valueSI);
  checkKind(kind);
  checkSystem(system);
  checkDigits(digits);
  const u = pickUnit(valueSI, kind, system, digits);
  return `${sig(valueSI / u.factor, digits)}${u.sep}${u.label}`;
}

/** "2.41 km (1.98-2.90 km, 5-95 %)": all three figures in the unit the median calls for. */
export function formatEstimate(e: Estimate, kind: Quantity, system: UnitSystem, digits = 3): string {
  if (typeof e !== 'object' || e === null) throw new InputError('estimate', e, 'a median with its 5 % and 95 % values');
  finite('estimate median', e.median);
  finite('estimate 5 % value', e.p05);
  finite('estimate 95 % value', e.p95);
  if (!(e.p05 <= e.median && e.median <= e.p95)) {
    throw new InputError('estimate', `${e.p05} / ${e.median} / ${e.p95}`, '5 % value <= median <= 95 % value');
  }
  checkKind(kind);
  checkSystem(system);
  checkDigits(digits);
  const u = pickUnit(e.median, kind, system, digits);
  const f = (v: number) => sig(v / u.factor, digits);
  const lo = f(e.p05);
  const hi = f(e.p95);
  // a hyphen between two negative numbers would read as minus signs
  const between = lo.startsWith('-') || hi.startsWith('-') ? ' to ' : '-';
  return `${f(e.median)}${u.sep}${u.label} (${lo}${between}${hi}${u.sep}${u.label}, 5-95 %)`;
}
