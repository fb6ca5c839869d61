// Draws the toolbar icon (our own design: a caliper bracket over a dot on a rounded square) at every
// size the browsers and stores ask for, as PNGs, with no image library: a tiny rasteriser with 4x4
// supersampling and a minimal PNG encoder. Run: node extension/tools/make-icons.mjs
import { deflateSync } from 'node:zlib';
import { writeFileSync, mkdirSync } from 'node:fs';

// Chromium asks for 16, 32, 48 and 128 (developer.chrome.com, "Configure extension icons"); Firefox
// picks by size and screen density, a main icon with a double-size one (MDN, manifest.json `icons`:
// 32/64, 48/96). The 128 is the Chrome Web Store's listing icon, whose artwork is 96 x 96 with 16
// transparent pixels on every side (developer.chrome.com, "Supplying images", Extension icon).
const SIZES = [16, 32, 48, 64, 96, 128];
const PADDING = { 128: 16 };
const out = new URL('../public/icons/', import.meta.url);
mkdirSync(out, { recursive: true });

// Shapes in a unit square (0..1), painted in order; later shapes cover earlier ones.
const BG = [22, 62, 110];
const FG = [255, 255, 255];
const ACCENT = [255, 176, 32];
function inRoundedSquare(x, y, r) {
  const cx = Math.min(Math.max(x, r), 1 - r);
  const cy = Math.min(Math.max(y, r), 1 - r);
  return (x - cx) ** 2 + (y - cy) ** 2 <= r * r;
}
function paint(x, y) {
  if (!inRoundedSquare(x, y, 0.2)) return null;
  const bar = (x0, x1, y0, y1) => x >= x0 && x <= x1 && y >= y0 && y <= y1;
  // caliper jaws: a top rail with two jaws hanging down
  if (bar(0.16, 0.84, 0.18, 0.3) || bar(0.16, 0.28, 0.18, 0.62) || bar(0.72, 0.84, 0.18, 0.62)) return FG;
  // the measured object: a dot between the jaws
  if ((x - 0.5) ** 2 + (y - 0.6) ** 2 <= 0.13 ** 2) return ACCENT;
  return BG;
}

function png(size) {
  const ss = 4;
  const pad = PADDING[size] ?? 0;
  const art = size - 2 * pad;
  const rows = [];
  for (let py = 0; py < size; py++) {
    const row = Buffer.alloc(1 + size * 4);
    for (let px = 0; px < size; px++) {
      let r = 0, g = 0, b = 0, a = 0;
      for (let sy = 0; sy < ss; sy++) for (let sx = 0; sx < ss; sx++) {
        const x = (px - pad + (sx + 0.5) / ss) / art, y = (py - pad + (sy + 0.5) / ss) / art;
        const c = x >= 0 && x <= 1 && y >= 0 && y <= 1 ? paint(x, y) : null;
        if (c) { r += c[0]; g += c[1]; b += c[2]; a += 1; }
      }
      const o = 1 + px * 4;
      if (a) { row[o] = r / a; row[o + 1] = g / a; row[o + 2] = b / a; }
      row[o + 3] = Math.round((255 * a) / (ss * ss));
    }
    rows.push(row);
  }
  const chunk = (type, data) => {
    const len = Buffer.alloc(4); len.writeUInt32BE(data.length);
    const td = Buffer.concat([Buffer.from(type), data]);
    const crc = Buffer.alloc(4); crc.writeUInt32BE(crc32(td));
    return Buffer.concat([len, td, crc]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0); ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 8; ihdr[9] = 6; // 8-bit RGBA
  return Buffer.concat([
    Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(Buffer.concat(rows), { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}
function crc32(buf) {
  let c = ~0;
  for (const byte of buf) { c ^= byte; for (let k = 0; k < 8; k++) c = (c >>> 1) ^ (0xedb88320 & -(c & 1)); }
  return ~c >>> 0;
}
for (const s of SIZES) writeFileSync(new URL(`icon-${s}.png`, out), png(s));
console.log(`icons written: ${SIZES.join(', ')} px`);
