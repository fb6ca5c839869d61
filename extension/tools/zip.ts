/**
 * A small ZIP writer for the store packages (PKWARE APPNOTE.TXT 6.3: local headers, central
 * directory, end record; deflate or stored; no ZIP64, no encryption). Node's zlib gives raw deflate
 * and CRC-32, so the project carries no zip library. The output is byte-for-byte reproducible: the
 * same files and time always give the same archive, which lets a reviewer rebuild and compare.
 */
import { crc32, deflateRawSync } from 'node:zlib';

export interface ZipEntry {
  /** Path inside the archive: relative, `/`-separated, no `.` or `..` parts. */
  path: string;
  data: Uint8Array;
}

export class ZipError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'ZipError';
  }
}

/** The earliest time a ZIP (MS-DOS) timestamp can hold: 1980-01-01 00:00:00. */
export const DOS_EPOCH = new Date(Date.UTC(1980, 0, 1, 0, 0, 0));

const LIMIT_32 = 0xffff_ffff;
const LIMIT_16 = 0xffff;
const METHOD_STORED = 0;
const METHOD_DEFLATED = 8;
const VERSION_NEEDED = 20; // 2.0: deflate and folders
const MADE_BY_UNIX = (3 << 8) | VERSION_NEEDED; // so external attributes carry Unix modes
const FLAG_UTF8 = 1 << 11; // names are UTF-8 (APPNOTE 4.4.4, bit 11)
const MODE_FILE = 0o100644;

/** Checks one archive path, naming the entry and what is allowed. */
export function checkEntryPath(path: unknown, index: number): string {
  const field = `zip entry ${index + 1} path`;
  if (typeof path !== 'string' || path.length === 0) throw new ZipError(`${field}: got ${JSON.stringify(path)}; allowed: a non-empty relative path`);
  if (path.startsWith('/') || /^[A-Za-z]:/.test(path)) throw new ZipError(`${field}: got "${path}"; allowed: a relative path (no leading / or drive letter)`);
  if (path.includes('\\')) throw new ZipError(`${field}: got "${path}"; allowed: / as the only separator`);
  if (path.split('/').some((part) => part === '' || part === '.' || part === '..')) {
    throw new ZipError(`${field}: got "${path}"; allowed: no empty, "." or ".." parts`);
  }
  if (Buffer.byteLength(path, 'utf8') > LIMIT_16) throw new ZipError(`${field}: ${Buffer.byteLength(path, 'utf8')} bytes long; allowed: at most ${LIMIT_16} bytes`);
  return path;
}

/** MS-DOS date and time words for a moment (read as UTC; the format has no time zone). */
export function dosDateTime(when: Date): { date: number; time: number } {
  const t = when.getTime();
  if (!Number.isFinite(t) || t < DOS_EPOCH.getTime() || when.getUTCFullYear() > 2107) {
    throw new ZipError(`zip timestamp: got ${Number.isFinite(t) ? when.toISOString() : 'an invalid date'}; allowed: 1980-01-01 to 2107-12-31`);
  }
  const date = ((when.getUTCFullYear() - 1980) << 9) | ((when.getUTCMonth() + 1) << 5) | when.getUTCDate();
  const time = (when.getUTCHours() << 11) | (when.getUTCMinutes() << 5) | Math.floor(when.getUTCSeconds() / 2);
  return { date, time };
}

/**
 * Writes the entries, in the order given, into one archive. Each entry is deflated unless that
 * would not make it smaller (already-compressed PNGs are then stored as they are).
 */
export function writeZip(entries: readonly ZipEntry[], when: Date = DOS_EPOCH): Buffer {
  if (entries.length > LIMIT_16) throw new ZipError(`zip entries: got ${entries.length}; allowed: at most ${LIMIT_16} (no ZIP64)`);
  const { date, time } = dosDateTime(when);
  const seen = new Set<string>();
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;

  entries.forEach((entry, i) => {
    const path = checkEntryPath(entry.path, i);
    if (seen.has(path)) throw new ZipError(`zip entry ${i + 1} path: "${path}" appears twice; allowed: each path once`);
    seen.add(path);
    const data = Buffer.from(entry.data.buffer, entry.data.byteOffset, entry.data.byteLength);
    if (data.length > LIMIT_32) throw new ZipError(`zip entry "${path}": ${data.length} bytes; allowed: at most ${LIMIT_32} (no ZIP64)`);
    const deflated = deflateRawSync(data, { level: 9 });
    const method = deflated.length < data.length ? METHOD_DEFLATED : METHOD_STORED;
    const body = method === METHOD_DEFLATED ? deflated : data;
    const crc = crc32(data);
    const name = Buffer.from(path, 'utf8');

    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(VERSION_NEEDED, 4);
    local.writeUInt16LE(FLAG_UTF8, 6);
    local.writeUInt16LE(method, 8);
    local.writeUInt16LE(time, 10);
    local.writeUInt16LE(date, 12);
    local.writeUInt32LE(crc, 14);
    local.writeUInt32LE(body.length, 18);
    local.writeUInt32LE(data.length, 22);
    local.writeUInt16LE(name.length, 26);
    local.writeUInt16LE(0, 28);

    const central = Buffer.alloc(46);
    central.writeUInt32LE(0x02014b50, 0);
    central.writeUInt16LE(MADE_BY_UNIX, 4);
    central.writeUInt16LE(VERSION_NEEDED, 6);
    central.writeUInt16LE(FLAG_UTF8, 8);
    central.writeUInt16LE(method, 10);
    central.writeUInt16LE(time, 12);
    central.writeUInt16LE(date, 14);
    central.writeUInt32LE(crc, 16);
    central.writeUInt32LE(body.length, 20);
    central.writeUInt32LE(data.length, 24);
    central.writeUInt16LE(name.length, 28);
    // extra field, comment, disk number start, internal attributes: all 0 (offsets 30-37)
    central.writeUInt32LE((MODE_FILE << 16) >>> 0, 38);
    central.writeUInt32LE(offset, 42);

    locals.push(local, name, body);
    centrals.push(central, name);
    offset += local.length + name.length + body.length;
    if (offset > LIMIT_32) throw new ZipError(`zip archive: larger than ${LIMIT_32} bytes; allowed: at most that (no ZIP64)`);
  });

  const directory = Buffer.concat(centrals);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  // this disk and the directory's disk: 0 (offsets 4-7)
  end.writeUInt16LE(entries.length, 8);
  end.writeUInt16LE(entries.length, 10);
  end.writeUInt32LE(directory.length, 12);
  end.writeUInt32LE(offset, 16);
  end.writeUInt16LE(0, 20);
  return Buffer.concat([...locals, directory, end]);
}
