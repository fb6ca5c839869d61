import type { InferOutput } from 'valibot';
import type { assumptionsSchema, markSchema, pointSchema, recordSchema, versionSchema, videoSchema } from './shape';

/**
 * The case model: one measured video, its marks and the assumptions behind its figures. Its
 * version, kinds and limits are in case-limits.ts (the definition in shape.ts reads them there);
 * its types are read off the definition here.
 */
export * from './case-limits';

/*
 * The record's types are read off its one definition (shape.ts), so they cannot drift from what
 * the reader accepts. Type-only imports: this module stays free of the schema library, so the
 * overlay (which needs caseKey and POINTS_PER_KIND) does not carry it. What each field means is
 * said beside it in shape.ts and in the published case-file.schema.json.
 */
export type Point = InferOutput<typeof pointSchema>;
/** How CSS pixels were mapped to intrinsic pixels when the mark was made (for audit, not for maths); every field optional. */
export type DisplayMappingRecord = Mark['mapping'];
export type Mark = InferOutput<typeof markSchema>;
export type VideoInfo = InferOutput<typeof videoSchema>;
/** A range a value is known to lie in, in the units its field names. */
export interface Range {
  lo: number;
  hi: number;
}
/**
 * The assumptions behind a case's figures, in the units a user gives them. Absent: the tool's
 * defaults (a phone main camera, an aircraft of aerodrome code letter C, broadside).
 */
export type CaseAssumptions = InferOutput<typeof assumptionsSchema>;
/**
 * A case. Since version 2: status ('open' for a case migrated from version 1), tags (trimmed,
 * distinct) and history: earlier versions of this same case that an import met (the other side of
 * a merge), newest first, never edited, only added to, so a merge cannot lose either side.
 */
export type CaseRecord = InferOutput<typeof recordSchema>;
/** One earlier version of a case: the record without its own history, and when it was set aside. */
export type CaseVersion = Omit<InferOutput<typeof versionSchema>, 'history'>;

export const caseKey = (id: string) => `case:${id}`;
