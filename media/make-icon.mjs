// Draws the extension's icon (media/icon.png, 128×128 RGBA) from code: two half-arrows
// (⇌, forward in teal, back in amber) over a level beam on a fulcrum, on a dark rounded square.
// An original design with no text and no outside artwork. Run: node media/make-icon.mjs
// The output is deterministic, so re-running it leaves icon.png unchanged.
import { writeFileSync } from 'node:fs';
import { deflateSync } from 'node:zlib';
import { fileURLToPath } from 'node:url';

const SIZE = 128;
/** Samples per pixel along each axis (anti-aliasing by supersampling). */
const SUPERSAMPLE = 4;

const BACKGROUND = [0x1b, 0x28, 0x38];
const FORWARD = [0x3f, 0xc1, 0xb0];
const BACKWARD = [0xf2, 0xa5, 0x41];
const LEVEL = [0xe4, 0xe9, 0xef];

/** Distance from point p to the segment a–b. */
function segmentDistance(px, py, ax, ay, bx, by) {
  const dx = bx - ax;
  const dy = by - ay;
  const t = Math.max(0, Math.min(1, ((px - ax) * dx + (py - ay) * dy) / (dx * dx + dy * dy)));
  return Math.hypot(px - (ax + t * dx), py - (ay + t * dy));
}

const stroke = (ax, ay, bx, by, width) => (x, y) => segmentDistance(x, y, ax, ay, bx, by) <= width / 2;

function triangle(ax, ay, bx, by, cx, cy) {
  const side = (x, y, x1, y1, x2, y2) => (x - x2) * (y1 - y2) - (x1 - x2) * (y - y2);
  return (x, y) => {
    const d1 = side(x, y, ax, ay, bx, by);
    const d2 = side(x, y, bx, by, cx, cy);
    const d3 = side(x, y, cx, cy, ax, ay);
    return !((d1 < 0 || d2 < 0 || d3 < 0) && (d1 > 0 || d2 > 0 || d3 > 0));
  };
}

function roundedSquare(inset, radius) {
  const lo = inset + radius;
  const hi = SIZE - inset - radius;
  return (x, y) => {
    const cx = Math.min(Math.max(x, lo), hi);
    const cy = Math.min(Math.max(y, lo), hi);
    return Math.hypot(x - cx, y - cy) <= radius;
  };
}

const union = (...shapes) => (x, y) => shapes.some((s) => s(x, y));

const ARROW_WIDTH = 8;
// Layers, painted in order: [colour, shape].
const layers = [
  [BACKGROUND, roundedSquare(4, 22)],
  // forward half-arrow: shaft, and a barb rising from its right end
  [FORWARD, union(stroke(28, 44, 100, 44, ARROW_WIDTH), stroke(100, 44, 82, 27, ARROW_WIDTH))],
  // backward half-arrow: shaft, and a barb falling from its left end
  [BACKWARD, union(stroke(28, 64, 100, 64, ARROW_WIDTH), stroke(28, 64, 46, 81, ARROW_WIDTH))],
  // the level beam and its fulcrum
  [LEVEL, union(stroke(22, 96, 106, 96, 6), triangle(64, 97, 52, 112, 76, 112))],
];

function render() {
  const rgba = Buffer.alloc(SIZE * SIZE * 4);
  const n = SUPERSAMPLE * SUPERSAMPLE;
  for (let py = 0; py < SIZE; py++) {
    for (let px = 0; px < SIZE; px++) {
      let r = 0;
      let g = 0;
      let b = 0;
      let a = 0;
      for (let sy = 0; sy < SUPERSAMPLE; sy++) {
        for (let sx = 0; sx < SUPERSAMPLE; sx++) {
          const x = px + (sx + 0.5) / SUPERSAMPLE;
          const y = py + (sy + 0.5) / SUPERSAMPLE;
          let colour = null;
          for (const [c, shape] of layers) if (shape(x, y)) colour = c;
          if (colour) {
            r += colour[0];
            g += colour[1];
            b += colour[2];
            a += 1;
          }
        }
      }
      const i = (py * SIZE + px) * 4;
      // straight (non-premultiplied) alpha: average colour of the covered samples
      rgba[i] = a ? Math.round(r / a) : 0;
      rgba[i + 1] = a ? Math.round(g / a) : 0;
      rgba[i + 2] = a ? Math.round(b / a) : 0;
      rgba[i + 3] = Math.round((255 * a) / n);
    }
  }
  return rgba;
}

const CRC_TABLE = Array.from({ length: 256 }, (_, k) => {
  let c = k;
  for (let j = 0; j < 8; j++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  return c >>> 0;
});

function crc32(buf) {
  let c = 0xffffffff;
  for (const byte of buf) c = CRC_TABLE[(c ^ byte) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

function chunk(type, data) {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, 'ascii');
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])), 0);
  return Buffer.concat([head, data, crc]);
}

/** A PNG of 8-bit RGBA pixels: every scanline uses filter 0 (none), compressed with zlib. */
export function encodePng(rgba, width, height) {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 6; // colour type: RGBA
  const raw = Buffer.alloc(height * (width * 4 + 1));
  for (let y = 0; y < height; y++) rgba.copy(raw, y * (width * 4 + 1) + 1, y * width * 4, (y + 1) * width * 4);
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(raw, { level: 9 })),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

const out = fileURLToPath(new URL('./icon.png', import.meta.url));
writeFileSync(out, encodePng(render(), SIZE, SIZE));
console.log(`wrote ${out}`);
