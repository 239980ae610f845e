/**
 * Photos made in the test itself: a rack of coloured vials on a dark backdrop with a white tile, and
 * the awkward files an upload must handle (bombs, truncated files, polyglots, rotated, 16-bit, CMYK).
 */
import { deflateSync } from "node:zlib";
import sharp from "sharp";

export type Rgb8 = [number, number, number];

export const RACK = { w: 960, h: 400, vial: { w: 110, h: 200, y: 110, x0: 50, step: 170 }, white: { x: 770, y: 120, w: 140, h: 160 } };

/** A rack photo: sRGB-encoded vial colours (8-bit), a white tile, a dark backdrop; `seed` varies the noise-free backdrop. */
export async function rackPhoto(vials: Rgb8[], { white = [235, 235, 235] as Rgb8, backdrop = [22, 24, 28] as Rgb8, format = "jpeg" as "jpeg" | "png" } = {}): Promise<Buffer> {
  const { w, h, vial } = RACK;
  const px = Buffer.alloc(w * h * 3);
  const paint = (x0: number, y0: number, ww: number, hh: number, c: Rgb8) => {
    for (let y = y0; y < y0 + hh; y++) for (let x = x0; x < x0 + ww; x++) px.set(c, (y * w + x) * 3);
  };
  paint(0, 0, w, h, backdrop);
  vials.forEach((c, i) => paint(vial.x0 + i * vial.step, vial.y, vial.w, vial.h, c));
  paint(RACK.white.x, RACK.white.y, RACK.white.w, RACK.white.h, white);
  const img = sharp(px, { raw: { width: w, height: h, channels: 3 } });
  return format === "png" ? img.png().toBuffer() : img.jpeg({ quality: 95, chromaSubsampling: "4:4:4" }).toBuffer();
}

/** A small distinct JPEG per index (for parallel uploads). */
export function smallJpeg(index: number, size = 64): Promise<Buffer> {
  return sharp({ create: { width: size, height: size, channels: 3, background: { r: (index * 37) % 256, g: (index * 91) % 256, b: (index * 53) % 256 } } })
    .jpeg()
    .toBuffer();
}

function crc32(bytes: Uint8Array): number {
  let c = ~0;
  for (const b of bytes) {
    c ^= b;
    for (let k = 0; k < 8; k++) c = c & 1 ? (c >>> 1) ^ 0xedb88320 : c >>> 1;
  }
  return ~c >>> 0;
}

function chunk(type: string, data: Uint8Array): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, "ascii");
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([Buffer.from(type, "ascii"), data])), 0);
  return Buffer.concat([head, data, crc]);
}

/**
 * A decompression bomb: a valid PNG whose header declares side×side RGB pixels, with a compressed
 * stream of zero rows (a few hundred kB that would decode to gigabytes). Only the first `rows` rows
 * are actually present.
 */
export function pngBomb(side = 40_000, rows = 64): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(side, 0);
  ihdr.writeUInt32BE(side, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // RGB
  const raw = Buffer.alloc(rows * (1 + side * 3));
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk("IHDR", ihdr), chunk("IDAT", deflateSync(raw)), chunk("IEND", new Uint8Array())]);
}

/** A ZIP archive's end record: enough for unzip tools to see an (empty) archive appended to a photo. */
export const ZIP_TAIL = Buffer.from([0x50, 0x4b, 0x05, 0x06, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0]);

export const SVG = Buffer.from(`<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="100" height="100"><script>alert(1)</script><rect width="100" height="100" fill="red"/></svg>`);

/** 300 wide × 200 high as stored, with EXIF orientation 6 (display rotated 90° clockwise: 200 × 300). */
export function rotatedJpeg(): Promise<Buffer> {
  const px = Buffer.alloc(300 * 200 * 3);
  for (let y = 0; y < 200; y++) for (let x = 0; x < 300; x++) px.set(x < 150 ? [200, 30, 30] : [30, 30, 200], (y * 300 + x) * 3);
  return sharp(px, { raw: { width: 300, height: 200, channels: 3 } }).jpeg({ quality: 95 }).withMetadata({ orientation: 6 }).toBuffer();
}

/** A 16-bit-per-channel RGB PNG of one colour (16-bit values given), written chunk by chunk. */
export function png16(rgb16: [number, number, number], size = 80): Buffer {
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(size, 0);
  ihdr.writeUInt32BE(size, 4);
  ihdr[8] = 16;
  ihdr[9] = 2;
  const row = 1 + size * 6;
  const raw = Buffer.alloc(size * row);
  for (let y = 0; y < size; y++) for (let x = 0; x < size; x++) rgb16.forEach((v, c) => raw.writeUInt16BE(v, y * row + 1 + x * 6 + c * 2));
  return Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), chunk("IHDR", ihdr), chunk("IDAT", deflateSync(raw)), chunk("IEND", new Uint8Array())]);
}

export function cmykJpeg(): Promise<Buffer> {
  return sharp({ create: { width: 64, height: 64, channels: 3, background: "#3366cc" } }).toColourspace("cmyk").jpeg().toBuffer();
}

export function greyJpeg(): Promise<Buffer> {
  return sharp({ create: { width: 64, height: 64, channels: 3, background: "#777777" } }).toColourspace("b-w").jpeg().toBuffer();
}
