import type { CaseRecord } from './schema';

/*
 * A case's marks as CSV, one row per mark point, for a spreadsheet. Quoting follows RFC 4180
 * section 2: records end in CRLF; a field holding a comma, a double quote, CR or LF is enclosed
 * in double quotes, and a double quote inside it is written twice. Every row has the header's
 * number of fields.
 */

export const MARKS_CSV_HEADER = ['case_id', 'mark_id', 'kind', 't_s', 'point', 'x_px', 'y_px', 'edge_sigma_px', 'dimension', 'landmark_id', 'by', 'created_at'] as const;

/** One field, quoted when RFC 4180 requires it. */
export function csvField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}

/**
 * Text a user typed, made inert for a spreadsheet: a cell that begins with = + - @ or a tab or CR
 * would be read as a formula, so it gets a leading apostrophe (OWASP "CSV Injection", from
 * memory). Numbers are written by us and never need it.
 */
export function inertText(s: string): string {
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

function row(fields: readonly string[]): string {
  return `${fields.map(csvField).join(',')}\r\n`;
}

/** The marks of one or more cases: a header, then a row per point in mark order. */
export function marksCsv(cases: readonly CaseRecord[]): string {
  let out = row(MARKS_CSV_HEADER);
  for (const c of cases) {
    for (const m of c.marks) {
      m.points.forEach((p, i) => {
        out += row([
          inertText(c.id),
          inertText(m.id),
          m.kind,
          String(m.t),
          String(i + 1),
          String(p.x),
          String(p.y),
          String(m.edgeSigmaPx),
          m.dimension ?? '',
          inertText(m.landmarkId ?? ''),
          inertText(m.by ?? ''),
          new Date(m.createdAt).toISOString(),
        ]);
      });
    }
  }
  return out;
}
