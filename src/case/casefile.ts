import { CaseFormatError, validateCase } from './validate';
import type { CaseRecord } from './schema';

/**
 * The case file a reviewer hands on: one case, wrapped so that a reader can tell what it holds
 * and which schema it follows. It alone reproduces every figure (analysis.ts, summary.ts).
 */
export const CASE_FILE_FORMAT = 'clip-caliper-case';

export interface CaseFile {
  format: typeof CASE_FILE_FORMAT;
  schema: number;
  exportedBy: string;
  case: CaseRecord;
}

export function toCaseFile(c: CaseRecord, toolVersion: string): CaseFile {
  return { format: CASE_FILE_FORMAT, schema: c.schema, exportedBy: `Clip Caliper ${toolVersion}`, case: c };
}

/** Files above this are refused before parsing: no real case comes near it. */
export const MAX_CASE_FILE_BYTES = 20 * 1024 * 1024;

/**
 * Reads a case file's text: JSON only (nothing in it is ever run), the whole case validated before
 * anything uses it; the error names the first bad field by its path.
 */
export function parseCaseFile(text: string): CaseRecord {
  if (text.length > MAX_CASE_FILE_BYTES) throw new CaseFormatError('file', `larger than ${MAX_CASE_FILE_BYTES} bytes`);
  let raw: unknown;
  try {
    raw = JSON.parse(text);
  } catch (e) {
    throw new CaseFormatError('file', `not JSON (${(e as Error).message})`);
  }
  const o = raw as Partial<CaseFile> | null;
  if (!o || typeof o !== 'object' || o.format !== CASE_FILE_FORMAT) {
    throw new CaseFormatError('file.format', `expected "${CASE_FILE_FORMAT}"`);
  }
  return validateCase(o.case, 'file.case');
}
