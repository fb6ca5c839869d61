import { MAX_SIZE_M } from './constants';
import { InputError } from './errors';
import { inRange } from './validate';

/*
 * True-size bands for the object being measured. The range estimate scales with the true size, so the
 * band's width is usually the largest term in the final interval: every band says where it came from.
 */

export interface SizeBand {
  /** Metres. */
  lo: number;
  hi: number;
  source: string;
}

export type CodeLetter = 'A' | 'B' | 'C' | 'D' | 'E' | 'F';
export type AircraftDimension = 'wingspan' | 'length';

export interface CodeLetterClass {
  letter: CodeLetter;
  label: string;
  wingspan: SizeBand;
  length: SizeBand;
}

const ANNEX14 = 'ICAO Annex 14 Vol I, 8th ed. (2018), Table 1-1 (up to but not including the upper value)';
const LENGTH_FROM_MEMORY = 'typical fuselage length for the letter (from memory)';

function frozenBand(lo: number, hi: number, source: string): SizeBand {
  return Object.freeze({ lo, hi, source });
}

/** Aerodrome reference code letters by wingspan, with typical overall lengths. */
export const CODE_LETTERS: readonly CodeLetterClass[] = Object.freeze(([
  {
    letter: 'A',
    label: 'light aircraft, code letter A',
    wingspan: frozenBand(8, 15, `${ANNEX14}; lower bound 8 m: common practice`),
    length: frozenBand(6, 16, 'light singles and twins, small business jets: common practice'),
  },
  {
    letter: 'B',
    label: 'business jet or commuter turboprop, code letter B',
    wingspan: frozenBand(15, 24, ANNEX14),
    length: frozenBand(12, 30, 'business jets, commuter turboprops, small regional jets: common practice'),
  },
  {
    letter: 'C',
    label: 'narrow-body transport jet or regional aircraft, code letter C',
    wingspan: frozenBand(24, 36, ANNEX14),
    length: frozenBand(26, 45, LENGTH_FROM_MEMORY),
  },
  {
    letter: 'D',
    label: 'wide-body transport jet, code letter D',
    wingspan: frozenBand(36, 52, ANNEX14),
    length: frozenBand(40, 55, LENGTH_FROM_MEMORY),
  },
  {
    letter: 'E',
    label: 'large wide-body transport jet, code letter E',
    wingspan: frozenBand(52, 65, ANNEX14),
    length: frozenBand(55, 76, LENGTH_FROM_MEMORY),
  },
  {
    letter: 'F',
    label: 'very large transport jet, code letter F',
    wingspan: frozenBand(65, 80, ANNEX14),
    length: frozenBand(70, 85, LENGTH_FROM_MEMORY),
  },
] satisfies CodeLetterClass[]).map((c) => Object.freeze(c)));

/** Upper wingspan bound of code letter F; Table 1-1 has no letter beyond it. */
const MAX_CODED_WINGSPAN_M = 80;

/** The code letter whose band holds this wingspan; each band excludes its upper value. */
export function codeLetterForWingspan(m: number): CodeLetter {
  inRange('wingspan', m, 0, MAX_CODED_WINGSPAN_M, ' m', true, true);
  for (const c of CODE_LETTERS) {
    if (m < c.wingspan.hi) return c.letter;
  }
  // Unreachable: the last band ends at MAX_CODED_WINGSPAN_M, which the check above excludes.
  throw new InputError('wingspan', m, `less than ${MAX_CODED_WINGSPAN_M} m`);
}

export function sizeBandForLetter(letter: CodeLetter, dimension: AircraftDimension): SizeBand {
  const c = CODE_LETTERS.find((x) => x.letter === letter);
  if (!c) throw new InputError('code letter', letter, `one of ${CODE_LETTERS.map((x) => x.letter).join(', ')}`);
  if (dimension === 'wingspan') return c.wingspan;
  if (dimension === 'length') return c.length;
  throw new InputError('dimension', dimension, '"wingspan" or "length"');
}

/** A band the user typed in; 0 < lo <= hi <= MAX_SIZE_M. */
export function customSizeBand(lo: number, hi: number): { lo: number; hi: number; source: 'user' } {
  inRange('size (low end)', lo, 0, MAX_SIZE_M, ' m', true);
  inRange('size (high end)', hi, 0, MAX_SIZE_M, ' m', true);
  if (hi < lo) throw new InputError('size', `${lo} to ${hi}`, 'a low end not above the high end');
  return { lo, hi, source: 'user' };
}

export interface OtherSizeClass extends SizeBand {
  id: string;
  label: string;
  /** Which dimension of the object the band describes, so the user marks the same one. */
  dimension: string;
}

/** Objects that are not fixed-wing aircraft but turn up in the same clips. All common practice. */
export const OTHER_SIZE_CLASSES: readonly OtherSizeClass[] = Object.freeze(
  [
    {
      id: 'helicopter',
      label: 'helicopter',
      dimension: 'main rotor diameter',
      lo: 7,
      hi: 22,
      source: 'light to heavy helicopters: common practice',
    },
    {
      id: 'small-multirotor',
      label: 'small multirotor drone',
      dimension: 'overall width including propellers',
      lo: 0.15,
      hi: 1.2,
      source: 'consumer to small professional multirotors: common practice',
    },
    {
      id: 'party-balloon',
      label: 'party balloon (latex or foil)',
      dimension: 'diameter',
      lo: 0.25,
      hi: 1,
      source: 'common practice',
    },
    {
      id: 'weather-balloon-low',
      label: 'weather balloon, low altitude (shortly after launch)',
      dimension: 'diameter',
      lo: 1.5,
      hi: 3,
      source: 'common practice',
    },
    {
      id: 'weather-balloon-high',
      label: 'weather balloon, high altitude (expanded)',
      dimension: 'diameter',
      lo: 3,
      hi: 12,
      source: 'common practice',
    },
  ].map((c) => Object.freeze(c)),
);

export function otherSizeClassById(id: string): OtherSizeClass {
  const found = typeof id === 'string' ? OTHER_SIZE_CLASSES.find((c) => c.id === id) : undefined;
  if (!found) throw new InputError('size class', id, `one of ${OTHER_SIZE_CLASSES.map((c) => c.id).join(', ')}`);
  return found;
}
