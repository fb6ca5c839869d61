import { CaseFormatError } from './format-error';
import { readCaseRecord } from './migrate';
import { MAX_FILE_NESTING, checkNesting } from './nesting';
import { SCHEMA_VERSION, type CaseRecord } from './schema';
import { CASE_FILE_FORMAT, MAX_CASE_FILE_BYTES, caseFileWrapper } from './shape';
import { readAgainst } from './validate';

export { CASE_FILE_FORMAT, MAX_CASE_FILE_BYTES, MAX_CASES_PER_FILE } from './shape';

/**
 * The case file a reviewer hands on: one case (`case`) or many (`cases`), wrapped so that a reader
 * can tell what it holds and which schema it follows. One case alone reproduces every figure
 * (analysis.ts, summary.ts); `npm run solve` reads a file of one case. The file's shape is
 * defined in shape.ts (caseFileShape), from which case-file.schema.json is made.
 */

export interface CaseFile {
  format: typeof CASE_FILE_FORMAT;
  schema: number;
  exportedBy: string;
  case: CaseRecord;
}

export interface CasesFile {
  format: typeof CASE_FILE_FORMAT;
  schema: number;
  exportedBy: string;
  cases: CaseRecord[];
}

export function toCaseFile(c: CaseRecord, toolVersion: string): CaseFile {
  return { format: CASE_FILE_FORMAT, schema: c.schema, exportedBy: `Clip Caliper ${toolVersion}`, case: c };
}

/** Several cases in one file (the log's "export all"); one case still goes out as a CaseFile. */
export function toCasesFile(cases: readonly CaseRecord[], toolVersion: string): CasesFile {
  return { format: CASE_FILE_FORMAT, schema: SCHEMA_VERSION, exportedBy: `Clip Caliper ${toolVersion}`, cases: [...cases] };
}

/**
 * Reads a case file's text into its cases: JSON only (nothing in it is ever run or rendered),
 * nested no deeper than MAX_FILE_NESTING, each record migrated from its own schema version, and
 * the whole file validated before any case is returned (fields the definition does not list are
 * dropped); the error names the first bad field by its path.
 */
export function parseCaseFileAll(text: string): CaseRecord[] {
  if (typeof text !== 'string') throw new CaseFormatError('file', 'expected the text of a file');
  // a string's UTF-8 size is at least its length; count exactly only when it could matter
  const bytes = text.length > MAX_CASE_FILE_BYTES ? text.length : text.length * 3 > MAX_CASE_FILE_BYTES ? utf8Length(text) : 0;
  if (bytes > MAX_CASE_FILE_BYTES) throw new CaseFormatError('file', `larger than ${MAX_CASE_FILE_BYTES} bytes (the limit for a case file)`);
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    throw new CaseFormatError('file', `not JSON (${(e as Error).message})`);
  }
  // JSON.parse builds deep values without recursion (V8's parser keeps its own stack); what
  // reads them after may recurse, so the depth is bounded here first
  checkNesting(raw, 'file', MAX_FILE_NESTING);
  // the file's own fields (format, version, one case or a list); each record is read after, from its own version
  const o = readAgainst(caseFileWrapper, raw, 'file');
  if ('case' in o) return [readCaseRecord(o.case, 'file.case')];
  return (o.cases ?? []).map((c, i) => readCaseRecord(c, `file.cases[${i}]`));
}

/**
 * Reads a file of one case (what the recompute takes): a single-case file, or a list holding
 * exactly one. Files written by earlier versions are migrated.
 */
export function parseCaseFile(text: string): CaseRecord {
  const all = parseCaseFileAll(text);
  if (all.length !== 1) throw new CaseFormatError('file.cases', `holds ${all.length} cases; this reads one (export that case alone)`);
  return all[0]!;
}

/** UTF-8 bytes of a string (what a file of it weighs), without building the bytes. */
export function utf8Length(s: string): number {
  let n = 0;
  for (let i = 0; i < s.length; i++) {
    const c = s.charCodeAt(i);
    if (c < 0x80) n += 1;
    else if (c < 0x800) n += 2;
    else if (c >= 0xd800 && c <= 0xdbff && i + 1 < s.length && (s.charCodeAt(i + 1) & 0xfc00) === 0xdc00) {
      n += 4;
      i++;
    } else n += 3; // a lone surrogate becomes U+FFFD, three bytes
  }
  return n;
}
