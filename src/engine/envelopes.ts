/*
 * The published speed envelopes the verdicts judge against: approach categories, final-approach
 * speeds, class ranges and regulatory limits, each with its source. A data table; the rules that
 * read it are in plausibility.ts. Figures are airspeeds in knots, as the sources give them.
 */
export type ObjectKind = 'fixed-wing-transport' | 'fixed-wing-light' | 'light-sport' | 'rotorcraft' | 'unknown';
export type FlightPhase = 'approach' | 'cruise' | 'unknown';

export interface SpeedBand {
  id: string;
  label: string;
  loKt: number;
  /** Upper bound in knots (see each table for open or closed); null when open-ended. */
  hiKt: number | null;
  source: string;
}

const VAT_SOURCE = 'EU Regulation 2019/1384, CAT.OP.MPA.320 Table 1; 14 CFR 97.3';

/*
 * Approach categories by Vat (knots). Published as whole-knot bands (B 91-120, C 121-140, ...); as
 * with the Beaufort scale, a speed between two bands belongs to the lower one, so each category runs
 * from its lower bound up to, not including, the next one's. Category E is closed at 210 kt.
 */
export const APPROACH_CATEGORIES_VAT: readonly SpeedBand[] = Object.freeze([
  { id: 'A', label: 'category A, Vat below 91 kt', loKt: 0, hiKt: 91, source: VAT_SOURCE },
  { id: 'B', label: 'category B, Vat 91-120 kt', loKt: 91, hiKt: 121, source: VAT_SOURCE },
  { id: 'C', label: 'category C, Vat 121-140 kt', loKt: 121, hiKt: 141, source: VAT_SOURCE },
  { id: 'D', label: 'category D, Vat 141-165 kt', loKt: 141, hiKt: 166, source: VAT_SOURCE },
  { id: 'E', label: 'category E, Vat 166-210 kt', loKt: 166, hiKt: 210, source: VAT_SOURCE },
]);

export const PANS_OPS = 'ICAO Doc 8168 (PANS-OPS) Vol II Part I-4-1 Table I-4-1-2';

/** Final approach speed ranges (knots, closed ranges). */
export const FINAL_APPROACH_RANGES: readonly SpeedBand[] = Object.freeze([
  { id: 'A', label: 'category A final approach', loKt: 70, hiKt: 100, source: PANS_OPS },
  { id: 'B', label: 'category B final approach', loKt: 85, hiKt: 130, source: `${PANS_OPS} (from memory)` },
  { id: 'C', label: 'category C final approach', loKt: 115, hiKt: 160, source: PANS_OPS },
  { id: 'D', label: 'category D final approach', loKt: 130, hiKt: 185, source: `${PANS_OPS} (from memory)` },
  { id: 'E', label: 'category E final approach', loKt: 155, hiKt: 230, source: `${PANS_OPS} (from memory)` },
  { id: 'H', label: 'helicopter final approach', loKt: 60, hiKt: 90, source: `${PANS_OPS} (from memory)` },
]);

export interface SpeedFigure {
  id: string;
  text: string;
  kt: number;
  source: string;
}

function figure(id: string, text: string, kt: number, source: string): SpeedFigure {
  return Object.freeze({ id, text, kt, source });
}

/** Published (or derived, or customary) figures the rules below use. */
export const SPEED_FIGURES = Object.freeze({
  limit250: figure(
    'limit-250',
    '250 kt indicated airspeed below 10 000 ft MSL',
    250,
    '14 CFR 91.117(a); ICAO Annex 11 App. 4 and EU SERA.6001 (250 kt IAS below 3050 m AMSL for VFR in classes C-G and IFR in D-G)',
  ),
  limit200: figure(
    'limit-200',
    '200 kt indicated airspeed at or below 2500 ft above the surface within 4 NM of a class C or D primary airport',
    200,
    '14 CFR 91.117(b)',
  ),
  singleEngineVs0: figure(
    'vs0-single-engine',
    'single-engine aeroplane stall speed in landing configuration VS0 at most 61 kt',
    61,
    'former 14 CFR 23.49(c) (to Amdt 23-64, 2016)',
  ),
  lightSportVs1: figure(
    'vs1-light-sport',
    'light-sport aeroplane stall speed VS1 at most 45 kt CAS',
    45,
    '14 CFR 1.1 (2019 text; later changes from memory)',
  ),
  lightSportVh: figure(
    'vh-light-sport',
    'light-sport aeroplane top level speed VH at most 120 kt CAS',
    120,
    '14 CFR 1.1 (from memory)',
  ),
  // Vat = 1.3 VS0 and category B starts at Vat 91 kt, so an aeroplane of category B or above has VS0 >= 70 kt
  transportFloor: figure(
    'transport-floor',
    'transport aeroplane least flying speed, from category B\u2019s lowest Vat (91 kt) over 1.3',
    91 / 1.3,
    `${VAT_SOURCE} (Vat = 1.3 VS0); transport aeroplanes fly category B or above (common practice)`,
  ),
  rotorcraftTop: figure(
    'rotorcraft-top',
    'conventional helicopters fly at up to about 180 kt',
    180,
    'common practice',
  ),
  saneMaximum: figure(
    'sane-maximum',
    'speed of sound at sea level, 661 kt (340.3 m/s): civil aircraft seen from a road fly slower',
    661,
    'ICAO standard atmosphere, Doc 7488 (from memory); subsonic civil flight (common practice)',
  ),
});

/*
 * A published stall-speed cap is an upper bound: some aircraft of a class stall slower. So that slow
 * but real aircraft are never called out of envelope, the floor for light and light-sport aeroplanes
 * is half the cap (common practice margin; stall speed goes with the square root of wing loading, and
 * a quarter of the class's wing loading is far outside it).
 */
const FLOOR_FRACTION = 0.5;

/** A ground-speed interval whose low end is at or below this counts as a hovering claim (our choice). */
export const HOVER_GROUND_SPEED_KT = 5;

interface Range {
  loKt: number;
  hiKt: number;
  text: string;
  source: string;
}

export interface ClassEnvelope {
  kind: Exclude<ObjectKind, 'unknown'>;
  label: string;
  canHover: boolean;
  /** The speed the class is sure to fly at (stall-speed cap, or derived floor); hover headwinds aim at it. */
  minFlyingKt: number;
  /** Below this over the whole interval: out of envelope. Null when the class can hover. */
  floorKt: number | null;
  floorSource: string;
  approach: Range;
  other: Range;
}

const F = SPEED_FIGURES;

export const CLASS_ENVELOPES: Readonly<Record<Exclude<ObjectKind, 'unknown'>, ClassEnvelope>> = Object.freeze({
  'fixed-wing-transport': {
    kind: 'fixed-wing-transport',
    label: 'transport aeroplane',
    canHover: false,
    minFlyingKt: F.transportFloor.kt,
    floorKt: F.transportFloor.kt,
    floorSource: F.transportFloor.source,
    approach: { loKt: 70, hiKt: 230, text: 'Final approach speeds of categories A-E span 70-230 kt', source: PANS_OPS },
    other: {
      loKt: F.transportFloor.kt,
      hiKt: F.saneMaximum.kt,
      text: 'A transport aeroplane flies from 70 kt (category B\u2019s lowest Vat over 1.3) to below 661 kt (sound at sea level)',
      source: `${F.transportFloor.source}; ${F.saneMaximum.source}`,
    },
  },
  'fixed-wing-light': {
    kind: 'fixed-wing-light',
    label: 'light aeroplane',
    canHover: false,
    minFlyingKt: F.singleEngineVs0.kt,
    floorKt: F.singleEngineVs0.kt * FLOOR_FRACTION,
    floorSource: `${F.singleEngineVs0.source}; half of it as floor (common practice)`,
    approach: {
      loKt: F.singleEngineVs0.kt,
      hiKt: 100,
      text: 'A light aeroplane stalls at no more than 61 kt and approaches at up to 100 kt (category A)',
      source: `${F.singleEngineVs0.source}; ${PANS_OPS}`,
    },
    other: {
      loKt: F.singleEngineVs0.kt,
      hiKt: F.limit250.kt,
      text: 'A light aeroplane flies between its 61 kt stall-speed cap and 250 kt',
      source: `${F.singleEngineVs0.source}; ${F.limit250.source}`,
    },
  },
  'light-sport': {
    kind: 'light-sport',
    label: 'light-sport aeroplane',
    canHover: false,
    minFlyingKt: F.lightSportVs1.kt,
    floorKt: F.lightSportVs1.kt * FLOOR_FRACTION,
    floorSource: `${F.lightSportVs1.source}; half of it as floor (common practice)`,
    approach: {
      loKt: F.lightSportVs1.kt,
      hiKt: 100,
      text: 'A light-sport aeroplane stalls at no more than 45 kt and approaches at up to 100 kt (category A)',
      source: `${F.lightSportVs1.source}; ${PANS_OPS}`,
    },
    other: {
      loKt: F.lightSportVs1.kt,
      hiKt: F.lightSportVh.kt,
      text: 'A light-sport aeroplane flies between its 45 kt stall-speed cap and its 120 kt top level speed',
      source: `${F.lightSportVs1.source}; ${F.lightSportVh.source}`,
    },
  },
  rotorcraft: {
    kind: 'rotorcraft',
    label: 'helicopter',
    canHover: true,
    minFlyingKt: 0,
    floorKt: null,
    floorSource: 'helicopters can hover: ground speed 0 is within their envelope',
    approach: {
      loKt: 0,
      hiKt: 90,
      text: 'A helicopter hovers or approaches at up to 90 kt (category H)',
      source: `${PANS_OPS} (from memory); helicopters can hover`,
    },
    other: {
      loKt: 0,
      hiKt: F.rotorcraftTop.kt,
      text: 'A helicopter hovers or flies at up to about 180 kt',
      source: `helicopters can hover; ${F.rotorcraftTop.source}`,
    },
  },
});
