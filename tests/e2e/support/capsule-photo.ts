import { createHash } from 'node:crypto';
import { crc32, deflateSync } from 'node:zlib';

/*
 * A small but real photo for the browser tests: a PNG built from its published layout (signature,
 * IHDR, IDAT, IEND; ISO/IEC 15948 §5.2 and §11.2) showing a two-tone capsule with a bite out of its
 * body, so a screenshot of the evidence list shows something recognisable and the server's type
 * check sees what a camera file starts with.
 */

function chunk(type: string, data: Buffer): Buffer {
  const length = Buffer.alloc(4);
  length.writeUInt32BE(data.length);
  const body = Buffer.concat([Buffer.from(type, 'ascii'), data]);
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(body));
  return Buffer.concat([length, body, crc]);
}

type Rgb = readonly [number, number, number];

const background: Rgb = [228, 226, 220];
const cap: Rgb = [170, 40, 48];
const body: Rgb = [244, 240, 228];
const shadow: Rgb = [120, 118, 112];

/** The colour of one pixel: a horizontal capsule, cap on the left, body on the right, broken at its end. */
function pixel(x: number, y: number, width: number, height: number): Rgb {
  const cy = height / 2;
  const r = height * 0.28;
  const left = width * 0.18;
  const right = width * 0.82;
  const inside =
    (x >= left && x <= right && Math.abs(y - cy) <= r) ||
    (x - left) ** 2 + (y - cy) ** 2 <= r * r ||
    (x - right) ** 2 + (y - cy) ** 2 <= r * r;
  // The broken part: a jagged notch out of the body's end.
  const notch = x > right - r * 0.6 && y < cy + ((x * 7) % 5) - r * 0.2;
  if (!inside || notch) return Math.abs(y - (cy + r + 2)) < 2 && x > left && x < right ? shadow : background;
  return x < width * 0.5 ? cap : body;
}

export function capsulePhotoPng(width = 96, height = 64): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: truecolour, no alpha
  const rows: number[] = [];
  for (let y = 0; y < height; y++) {
    rows.push(0); // filter type: none
    for (let x = 0; x < width; x++) rows.push(...pixel(x, y, width, height));
  }
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(Buffer.from(rows))),
    chunk('IEND', Buffer.alloc(0)),
  ]);
}

export const sha256Hex = (bytes: Buffer): string => createHash('sha256').update(bytes).digest('hex');
