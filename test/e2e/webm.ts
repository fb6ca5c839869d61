import { readFileSync } from 'node:fs';

/*
 * A WebM (EBML) container read in Node, enough for the fixture tests: frame size, duration and the
 * number of blocks (one per frame in the fixture clips).
 */

export interface Container {
  width: number;
  height: number;
  durationS: number;
  blocks: number;
}

const MASTERS = new Set([0x18538067, 0x1549a966, 0x1654ae6b, 0xae, 0xe0, 0x1f43b675, 0xa0]);

function vint(b: Uint8Array, p: number, keepMarker: boolean): { value: number; length: number; unknown: boolean } {
  const first = b[p] ?? 0;
  let length = 1;
  let mask = 0x80;
  while (length <= 8 && (first & mask) === 0) {
    mask >>= 1;
    length++;
  }
  if (length > 8) throw new Error(`bad EBML length at ${p}`);
  let value = keepMarker ? first : first & (mask - 1);
  let allOnes = value === mask - 1;
  for (let i = 1; i < length; i++) {
    const byte = b[p + i] ?? 0;
    value = value * 256 + byte;
    if (byte !== 0xff) allOnes = false;
  }
  return { value, length, unknown: !keepMarker && allOnes };
}

function readUint(b: Uint8Array, p: number, n: number): number {
  let v = 0;
  for (let i = 0; i < n; i++) v = v * 256 + (b[p + i] ?? 0);
  return v;
}

export function readContainer(file: string): Container {
  const b = new Uint8Array(readFileSync(file));
  const view = new DataView(b.buffer, b.byteOffset, b.byteLength);
  const out: Container = { width: 0, height: 0, durationS: 0, blocks: 0 };
  let timecodeScale = 1_000_000;
  let durationTicks = 0;
  const walk = (start: number, end: number): void => {
    let p = start;
    while (p < end) {
      const id = vint(b, p, true);
      const size = vint(b, p + id.length, false);
      const data = p + id.length + size.length;
      const stop = size.unknown ? end : Math.min(end, data + size.value);
      if (MASTERS.has(id.value)) walk(data, stop);
      else if (id.value === 0xa3 || id.value === 0xa1) out.blocks++;
      else if (id.value === 0x2ad7b1) timecodeScale = readUint(b, data, size.value);
      else if (id.value === 0x4489) durationTicks = size.value === 4 ? view.getFloat32(data) : view.getFloat64(data);
      else if (id.value === 0xb0) out.width = readUint(b, data, size.value);
      else if (id.value === 0xba) out.height = readUint(b, data, size.value);
      p = stop;
    }
  };
  walk(0, b.length);
  out.durationS = (durationTicks * timecodeScale) / 1e9;
  return out;
}
