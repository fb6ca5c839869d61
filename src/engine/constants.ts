/*
 * Exact unit definitions and sane bounds. Internal units are metres, seconds and radians.
 * Sources: NIST SP 811 (2008) App. B.8 for the knot, nautical mile, foot and mile; SI Brochure for km/h.
 */
export const NAUTICAL_MILE_M = 1852;
export const KNOT_MS = 1852 / 3600;
export const FOOT_M = 0.3048;
export const STATUTE_MILE_M = 1609.344;
export const MPH_MS = 0.44704;
export const KMH_MS = 1 / 3.6;
export const DEG = Math.PI / 180;

/** Diagonal of the 36 x 24 mm frame on which 35 mm-equivalent focal lengths are defined (CIPA DCG-001). */
export const FULL_FRAME_DIAGONAL_MM = Math.hypot(36, 24);

/*
 * Bounds beyond which an input is a typo, not a measurement. Chosen generously (common practice):
 * nothing filmed from a road moves faster than a jet airliner's cruise, ~300 m/s; 1000 m/s leaves room.
 */
export const MAX_SPEED_MS = 1000;
/** 1000 km: far beyond anything resolvable in a phone clip. */
export const MAX_RANGE_M = 1_000_000;
/** Largest object size accepted (m). */
export const MAX_SIZE_M = 1000;
/** Largest frame width in pixels accepted (16K video is 15360 wide). */
export const MAX_FRAME_PX = 20000;
/** Longest clip in seconds (a day). */
export const MAX_TIME_S = 86400;
