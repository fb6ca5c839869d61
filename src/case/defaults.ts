/*
 * The few defaults the injected overlay needs, written out: the default camera class's field of view
 * (profiles.ts derives it from a band of equivalent focal lengths and crops), the ids of the camera
 * classes a setting may name, and code letter C's bands (size.ts: ICAO Annex 14 Vol I Table 1-1 for
 * the wingspan; the length from memory). Carrying the derivations and every class's text would cost
 * the overlay about 2 KB gzipped of its 30 KB; test/case/defaults.test.ts holds each value to its
 * derivation, so they cannot drift apart.
 */

export const DEFAULT_CAMERA = {
  id: 'phone-main-landscape-stabilised',
  label: 'Phone main camera, landscape video, stabilisation on',
  hfovDeg: { lo: 52.6225447193624, hi: 66.49407312775733 },
} as const;

export const CAMERA_PROFILE_IDS: readonly string[] = [
  'phone-main-landscape-stabilised',
  'phone-main-landscape',
  'phone-main-portrait-stabilised',
  'phone-main-portrait',
  'phone-telephoto',
  'phone-ultrawide',
  'dashboard-camera',
  'action-camera-wide',
  'compact-camera-wide',
];

export const CODE_LETTER_C = {
  wingspan: { lo: 24, hi: 36 },
  length: { lo: 26, hi: 45 },
} as const;
