// Draws the add-in icons (a few points and a fitted line on a teal disc) and writes
// assets/icon-{16,32,64,80}.png (64: the manifest's high-resolution icon).
// Run once with `node scripts/make-icons.mjs`; the PNGs are committed.
import { writeFileSync, mkdirSync } from "node:fs";
import { deflateSync } from "node:zlib";

function crc32(buf) {
  let c, crc = 0xffffffff;
  for (let n = 0; n < buf.length; n++) {
    c = (crc ^ buf[n]) & 0xff;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    crc = (crc >>> 8) ^ c;
  }
  return (crc ^ 0xffffffff) >>> 0;
}
function chunk(type, data) {
  const len = Buffer.alloc(4);
  len.writeUInt32BE(data.length);
  const td = Buffer.concat([Buffer.from(type), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(td));
  return Buffer.concat([len, td, crc]);
}
function png(size, pixel) {
  const raw = Buffer.alloc((size * 4 + 1) * size);
  for (let y = 0; y < size; y++) {
    raw[y * (size * 4 + 1)] = 0;
    for (let x = 0; x < size; x++) {
      const [r, g, b, a] = pixel(x / size, y / size);
      const o = y * (size * 4 + 1) + 1 + x * 4;
      raw[o] = r; raw[o + 1] = g; raw[o + 2] = b; raw[o + 3] = a;
    }
  }
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0); ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 8; ihdr[9] = 6; ihdr[10] = 0; ihdr[11] = 0; ihdr[12] = 0;
  return Buffer.concat([Buffer.from([137, 80, 78, 71, 13, 10, 26, 10]), chunk("IHDR", ihdr), chunk("IDAT", deflateSync(raw)), chunk("IEND", Buffer.alloc(0))]);
}
const pts = [[0.2, 0.7], [0.38, 0.58], [0.55, 0.5], [0.72, 0.33], [0.85, 0.28]];
function pixel(u, v) {
  const r2 = (u - 0.5) ** 2 + (v - 0.5) ** 2;
  if (r2 > 0.25) return [0, 0, 0, 0];
  // line v = 0.82 - 0.65 u
  const d = Math.abs(v - (0.82 - 0.65 * u)) / Math.sqrt(1 + 0.65 ** 2);
  for (const [px, py] of pts) if ((u - px) ** 2 + (v - py) ** 2 < 0.004) return [250, 250, 245, 255];
  if (d < 0.035) return [232, 163, 61, 255];
  return [14, 107, 98, 255];
}
mkdirSync(new URL("../assets", import.meta.url), { recursive: true });
for (const s of [16, 32, 64, 80]) writeFileSync(new URL(`../assets/icon-${s}.png`, import.meta.url), png(s, pixel));
