import { toJsonSchema, type ConversionConfig } from '@valibot/to-json-schema';
import {
  JSON_EXTRA,
  MAX_CASE_FILE_BYTES,
  aspectRange,
  assumptionsSchema,
  caseFileShape,
  headingRange,
  headwindRange,
  hfovRange,
  markSchema,
  pointSchema,
  recordSchema,
  sizeRange,
  speedRange,
  versionSchema,
  videoSchema,
} from './shape';
import { LEGIT_FILE_NESTING, MAX_FILE_NESTING } from './nesting';
import { SCHEMA_VERSION } from './schema';

/*
 * The published JSON Schema (src/case/case-file.schema.json), made from shape.ts by
 * `npm run schema`; a test holds the committed file equal to what this makes. Build-time only:
 * nothing the extension bundles imports this module, so the converter never ships.
 */

/** Checks the converter cannot see by itself: what each means in JSON Schema is recorded beside it (JSON_EXTRA), or it says nothing JSON Schema can. */
const SILENT_IN_JSON = new Set(['check', 'raw_check', 'transform', 'custom', 'finite']);

const config: ConversionConfig = {
  target: 'draft-2020-12',
  // a pipe may start with a guard (an object that is not a list) before the object itself: the object is what is published
  typeMode: 'output',
  definitions: { record: recordSchema, version: versionSchema, video: videoSchema, point: pointSchema, mark: markSchema, assumptions: assumptionsSchema, hfovRange, sizeRange, aspectRange, speedRange, headwindRange, headingRange },
  overrideAction: ({ valibotAction, jsonSchema }) => {
    const extra = JSON_EXTRA.get(valibotAction);
    if (extra) return { ...jsonSchema, ...extra };
    // anything else the converter cannot read fails the build of the file (errorMode stays 'throw')
    return SILENT_IN_JSON.has(valibotAction.type) ? jsonSchema : undefined;
  },
  overrideSchema: ({ valibotSchema, jsonSchema }) => (valibotSchema.type === 'custom' ? {} : undefined),
};

/** `{ "not": {} }` (what the converter writes for a field that may not be there) as JSON Schema's own `false`; an empty `required` dropped. */
function tidy(x: unknown): unknown {
  if (Array.isArray(x)) return x.map(tidy);
  if (typeof x !== 'object' || x === null) return x;
  const o = x as Record<string, unknown>;
  if (Object.keys(o).length === 1 && typeof o.not === 'object' && o.not !== null && Object.keys(o.not).length === 0) return false;
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(o)) {
    if (k === 'required' && Array.isArray(v) && v.length === 0) continue;
    out[k] = tidy(v);
  }
  return out;
}

export function caseFileJsonSchema(): Record<string, unknown> {
  const made = tidy(toJsonSchema(caseFileShape(recordSchema), config)) as Record<string, unknown>;
  const { $schema, $defs, ...rest } = made;
  return {
    $schema,
    $id: `urn:clip-caliper:case-file:${SCHEMA_VERSION}`,
    title: `Clip Caliper case file, schema version ${SCHEMA_VERSION}`,
    description:
      'One case or several, as exported by Clip Caliper. Every field is data: nothing in a file is run or rendered as markup. ' +
      'Fields not listed here are not used by any figure: the reader drops them and never stores them. ' +
      `The whole file may nest at most ${MAX_FILE_NESTING} levels of objects and lists (a file this schema describes nests at most ${LEGIT_FILE_NESTING}); a deeper one is refused, naming where the bound was passed. ` +
      'The reader (src/case/casefile.ts parseCaseFileAll, then validate.ts, both from the definition in src/case/shape.ts that this file is made from) also checks what JSON Schema cannot say: ' +
      "each point lies within -width..2 x width and -height..2 x height of its video, a range's low end is not above its high end, an earlier version carries the case's own id, " +
      `each landmark size names a different landmark id, and the whole file is at most ${MAX_CASE_FILE_BYTES / 1024 / 1024} MiB (counted in UTF-8 bytes). ` +
      `Files written by schema versions 1 to ${SCHEMA_VERSION - 1} are read too (migrated); this schema describes version ${SCHEMA_VERSION}. Made by npm run schema; do not edit by hand.`,
    ...rest,
    $defs,
  };
}

/** The file's text as committed: two-space JSON and a final newline. */
export const caseFileJsonSchemaText = (): string => `${JSON.stringify(caseFileJsonSchema(), null, 2)}\n`;
