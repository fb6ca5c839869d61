/*
 * The case layer's one door: the extension (popup, options, tools) takes what it needs from the
 * case and the engine through here, never from their files, so that the engine can be rearranged
 * behind it. Engine items the extension shows (units, camera profiles, size classes, verdict
 * sentences) pass through too: the extension never reaches into src/engine.
 *
 * Named re-exports only, no `export *`: the list is the contract, and a bundle keeps just what a
 * page imports (package.json's sideEffects marks src/ free of side effects, so a page that takes
 * only a band parser does not load the analysis too). test/house/arrows.test.ts holds the
 * direction of imports.
 */

// the case record and its parts
export { caseKey, CASE_STATUSES, POINTS_PER_KIND, SCHEMA_VERSION } from './schema';
export type { CaseAssumptions, CaseRecord, CaseStatus, Mark, MarkKind, Point, VideoInfo } from './schema';
export { defaultAssumptions, engineAssumptions } from './assumptions';
export type { EngineAssumptions } from './assumptions';
export { parseBand } from './bands';
export { DEFAULT_SETTINGS, MAX_MARKER_NAME, readSettings, SETTINGS_KEY } from './settings';
export type { Settings } from './settings';

// figures and what shows them
export { analyseCase } from './analysis';
export { analyseCaseBeside, framesOnly, type PortableFrames } from './frames-part';
export type { CaseAnalysis, CaseWarning, SpeedReading } from './analysis';
export { pageFigures, planFor } from './page-analysis';
export type { PageFigures } from './page-analysis';
export { planView, rangePlot } from './plots';
export type { PlanView, RangePlot } from './plots';
export { summaryText } from './summary';
export type { SummaryFormat } from './summary';
// the annotated frame (issue 15 point 7): what is drawn where; the popup rasterises it
export { annotatedFrameName, caseFileStem, layoutPicture } from './annotated-frame';
export type { PictureLayout, PictureWords, Shape } from './annotated-frame';

// case files
export { MAX_CASE_FILE_BYTES, parseCaseFile, toCaseFile } from './casefile';
// build-time only (npm run schema): no page imports it, so no bundle carries it
export { caseFileJsonSchemaText } from './json-schema';

// engine items the extension shows, passed through this door
export { hfovFromEquivalentFocal } from '../engine/camera';
export { LANE_CYCLES } from '../engine/lanes';
export type { PassReading } from '../engine/pass-series';
export { VERDICT_SENTENCES } from '../engine/plausibility';
export { CAMERA_PROFILES, profileHfovRad } from '../engine/profiles';
export { CODE_LETTERS, OTHER_SIZE_CLASSES } from '../engine/size';
export type { Estimate } from '../engine/stats';
export { formatEstimate, formatQuantity } from '../engine/units';
export type { Quantity, UnitSystem } from '../engine/units';

// what the overlay, the log and the background take (rerouted through the door)
export { FOOT_M, KNOT_MS, MPH_MS, NAUTICAL_MILE_M, STATUTE_MILE_M } from '../engine/constants';
export { cssToIntrinsic, intrinsicToCss, mappingFromLayout } from '../engine/display';
export type { Mapping } from '../engine/display';
export { InputError } from '../engine/errors';
export type { Gray } from '../engine/snap';
export { handSigmaPx, intrinsicPerCssAlong, LANDMARK_SNAP_FLOOR_PX, markSigmaPx, MAX_MOVE_PX, MAX_SPAN_CHANGE, snapSpanEnds } from '../engine/span-ends';
export type { EndResult } from '../engine/span-ends';
export { fieldOfView } from './camera-fields';
export { marksCsv } from './csv';
export { frameFigures } from './frame-figures';
export { workingAssumptions } from './lane-speed';
export type { FrameBasis, FrameFigures, ObjectSpan } from './frame-figures';
export { cameraFrame, marksAt } from './frames';
export type { Headline } from './headline';
export { caseIdFor, stripFragment } from './ids';
export { exportFileName } from './importing';
export type { CaseListing, QuarantineEntry, StorageUsage } from './listing';
export { applyQuery, checkNotes, DEFAULT_QUERY, distinctSites, distinctTags, headlineKey, LruCache, marksByTimestamp, openableUrl, parseDayRange, parseTags, shownTitle, SORT_KEYS, visibleRows } from './log';
export type { DateField, LogQuery, SortKey } from './log';
export { landmarkDimensionOf } from './marks';
export { assumedDimension, disagreement } from './size-match';
export type { SpanDimension } from './size-match';
export { CASE_PREFIX, DELETED_PREFIX, QUARANTINE_PREFIX } from './store-policy';
export { createCaseStore } from './store/case-store';
export type { KeyValueArea } from './store/port';
export { readStoredCase } from './stored';
// following the object through the clip (issue 15): the engine's follower, for the follow page's worker
export { DEFAULT_FOLLOW, followSteps, reseedRange, reseedSteps } from '../engine/follow';
export type { FollowedFrame, FollowRun, FollowSeed, FollowSettings } from '../engine/follow';
