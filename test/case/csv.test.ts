import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { csvField, inertText, MARKS_CSV_HEADER, marksCsv } from '../../src/case/csv';
import { newCase, upsertMark } from '../../src/case/marks';

/*
 * A reader written from RFC 4180 section 2's grammar (file = record *(CRLF record) [CRLF];
 * escaped = DQUOTE *(TEXTDATA / COMMA / CR / LF / 2DQUOTE) DQUOTE; non-escaped = *TEXTDATA), kept
 * strict: it refuses a bare quote inside an unquoted field and anything after a closing quote
 * other than a comma or CRLF. Our writer must produce what this reads back exactly.
 */
function parseRfc4180(text: string): string[][] {
  const rows: string[][] = [];
  let i = 0;
  const field = (): string => {
    if (text[i] === '"') {
      i++;
      let out = '';
      for (;;) {
        if (i >= text.length) throw new Error('unclosed quote');
        if (text[i] === '"') {
          if (text[i + 1] === '"') {
            out += '"';
            i += 2;
            continue;
          }
          i++;
          return out;
        }
        out += text[i++];
      }
    }
    let out = '';
    while (i < text.length && text[i] !== ',' && !(text[i] === '\r' && text[i + 1] === '\n')) {
      if (text[i] === '"' || text[i] === '\r' || text[i] === '\n') throw new Error(`bare ${JSON.stringify(text[i])} in an unquoted field at ${i}`);
      out += text[i++];
    }
    return out;
  };
  while (i < text.length) {
    const row = [field()];
    while (text[i] === ',') {
      i++;
      row.push(field());
    }
    if (text.slice(i, i + 2) !== '\r\n') throw new Error(`expected CRLF at ${i}`);
    i += 2;
    rows.push(row);
  }
  return rows;
}

const video = { pageUrl: 'http://127.0.0.1:8000/plain.html', pageTitle: 'Invented clip', src: '', width: 640, height: 360, duration: 4 };
const mapping = { objectFit: 'fill', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };

describe('marks as CSV (RFC 4180)', () => {
  it('RFC 4180 2.6 and 2.7: a field with a comma, quote, CR or LF is quoted, and a quote doubled', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "hi"')).toBe('"say ""hi"""');
    expect(csvField('two\r\nlines')).toBe('"two\r\nlines"');
    expect(csvField('lf\nonly')).toBe('"lf\nonly"');
    expect(csvField('')).toBe('');
  });

  it('one row per mark point, every row ending in CRLF (RFC 4180 2.1) with the header’s field count (2.4)', () => {
    let c = newCase('0123456789abcdef', video, '0.1.0', 1);
    c = upsertMark(c, { id: 'm1', kind: 'object-span', t: 1.25, points: [{ x: 10.5, y: 2 }, { x: 40, y: 3 }], edgeSigmaPx: 0.5, dimension: 'wingspan', mapping, by: 'Invented, "the" reviewer', createdAt: 0 }, 2);
    c = upsertMark(c, { id: 'm2', kind: 'lane-dash', t: 0.5, points: [{ x: 1, y: 300 }], edgeSigmaPx: 0.7, mapping, landmarkId: '=1+2', createdAt: 1000 }, 3);
    const text = marksCsv([c]);
    expect(text.endsWith('\r\n')).toBe(true);
    const rows = parseRfc4180(text);
    expect(rows[0]).toEqual([...MARKS_CSV_HEADER]);
    expect(rows).toHaveLength(1 + 3);
    for (const r of rows) expect(r).toHaveLength(MARKS_CSV_HEADER.length);
    expect(rows[1]).toEqual(['0123456789abcdef', 'm1', 'object-span', '1.25', '1', '10.5', '2', '0.5', 'wingspan', '', 'Invented, "the" reviewer', '1970-01-01T00:00:00.000Z']);
    expect(rows[2]!.slice(4, 7)).toEqual(['2', '40', '3']);
    // a cell a spreadsheet would run as a formula is made inert
    expect(rows[3]![9]).toBe("'=1+2");
  });

  it('inert text: only a leading = + - @ tab or CR is neutralised', () => {
    expect(['=a', '+a', '-a', '@a', '\ta', '\ra', 'a=b', 'plain'].map(inertText)).toEqual(["'=a", "'+a", "'-a", "'@a", "'\ta", "'\ra", 'a=b', 'plain']);
  });

  it('property: any text round-trips through a field and the RFC 4180 reader', () => {
    fc.assert(
      fc.property(fc.array(fc.string({ unit: 'binary' }), { minLength: 1, maxLength: 5 }), (fields) => {
        const line = `${fields.map(csvField).join(',')}\r\n`;
        expect(parseRfc4180(line)).toEqual([fields]);
      }),
      { numRuns: 500 },
    );
  });
});
