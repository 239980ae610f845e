/**
 * Deciding whether uploaded bytes are a photo we can measure, before anything is stored.
 *
 * The file's own bytes decide, never its name or the browser's content type: the magic number must be
 * one of the allow-listed formats (JPEG, PNG, WebP, TIFF), the decoder must agree with it, the pixel
 * count must be under the limit (read from the header before any pixels are decoded, so a
 * decompression bomb is refused cheaply), the whole image must decode without errors (a truncated file
 * is refused), and nothing may follow the image's end marker (a polyglot: a photo that is also a ZIP,
 * a script or a PDF). CMYK and greyscale files are refused: they hold no camera RGB to measure.
 * 16-bit PNG/TIFF are accepted as they are (the colour engine reads the full depth); EXIF orientation
 * is applied to the stored width/height and to the derived copies.
 */
import { parseExif } from "@/lib/color/exif";
import sharp, { type Metadata } from "sharp";
import { AppError } from "@/lib/errors";
import type { ExifSummaryFacts } from "./photo-types";

export type PhotoFormat = "jpeg" | "png" | "webp" | "tiff";

export const PHOTO_FORMATS: Record<PhotoFormat, { mime: string; extension: string; label: string }> = {
  jpeg: { mime: "image/jpeg", extension: "jpg", label: "JPEG" },
  png: { mime: "image/png", extension: "png", label: "PNG" },
  webp: { mime: "image/webp", extension: "webp", label: "WebP" },
  tiff: { mime: "image/tiff", extension: "tif", label: "TIFF" },
};

export const ACCEPTED_MIME_TYPES = Object.values(PHOTO_FORMATS).map((f) => f.mime);

export type PhotoLimits = { maxBytes: number; maxPixels: number };

export type PhotoFacts = {
  format: PhotoFormat;
  mimeType: string;
  extension: string;
  /** After EXIF orientation: the frame regions are drawn on. */
  width: number;
  height: number;
  /** Bits per channel as stored in the file (8 or 16). */
  bitDepth: number;
  colourSpace: string;
  hasIccProfile: boolean;
  exif: ExifSummaryFacts;
};

const ALLOWED_LIST = "JPEG, PNG, WebP or TIFF";

function ascii(bytes: Uint8Array, start: number, length: number): string {
  return String.fromCharCode(...bytes.subarray(start, start + length));
}

/** The allow-listed format the magic number says, or a description of what the file is instead. */
export function sniffFormat(bytes: Uint8Array): { format: PhotoFormat } | { other: string } {
  const b = bytes;
  if (b.length >= 3 && b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff) return { format: "jpeg" };
  if (b.length >= 8 && b[0] === 0x89 && ascii(b, 1, 3) === "PNG" && b[4] === 0x0d && b[5] === 0x0a && b[6] === 0x1a && b[7] === 0x0a) return { format: "png" };
  if (b.length >= 12 && ascii(b, 0, 4) === "RIFF" && ascii(b, 8, 4) === "WEBP") return { format: "webp" };
  if (b.length >= 4 && ((b[0] === 0x49 && b[1] === 0x49 && b[2] === 0x2a && b[3] === 0x00) || (b[0] === 0x4d && b[1] === 0x4d && b[2] === 0x00 && b[3] === 0x2a))) {
    return { format: "tiff" };
  }
  const head = ascii(b, 0, Math.min(b.length, 512)).replace(/^\uFEFF/, "").trimStart().toLowerCase();
  if (head.startsWith("<svg") || (head.startsWith("<?xml") && head.includes("<svg")) || head.includes("<svg")) return { other: "an SVG drawing" };
  if (head.startsWith("<")) return { other: "an HTML or XML document" };
  if (ascii(b, 0, 4) === "GIF8") return { other: "a GIF" };
  if (ascii(b, 0, 5) === "%PDF-") return { other: "a PDF" };
  if (ascii(b, 4, 4) === "ftyp") {
    const brand = ascii(b, 8, 4);
    return { other: /hei|mif|hev/.test(brand) ? "a HEIC/HEIF photo (export it as JPEG first)" : brand.startsWith("avi") ? "an AVIF image" : "a video or ISO media file" };
  }
  if (b[0] === 0x50 && b[1] === 0x4b) return { other: "a ZIP archive" };
  if (b[0] === 0x42 && b[1] === 0x4d) return { other: "a BMP bitmap" };
  if (b.length === 0) return { other: "an empty file" };
  return { other: "not an image format we recognise" };
}

/**
 * Where the image data ends, for the formats whose end is marked (JPEG EOI, PNG IEND, the WebP RIFF
 * length); null for TIFF, whose parts may lie anywhere in the file. Throws for a file cut short.
 */
export function imageEnd(bytes: Uint8Array, format: PhotoFormat): number | null {
  if (format === "png") {
    let i = 8;
    while (i + 12 <= bytes.length) {
      const length = ((bytes[i] << 24) | (bytes[i + 1] << 16) | (bytes[i + 2] << 8) | bytes[i + 3]) >>> 0;
      const type = ascii(bytes, i + 4, 4);
      i += 12 + length;
      if (type === "IEND") return i <= bytes.length ? i : truncated();
    }
    return truncated();
  }
  if (format === "webp") {
    const size = (bytes[4] | (bytes[5] << 8) | (bytes[6] << 16) | (bytes[7] << 24)) >>> 0;
    const end = 8 + size + (size % 2);
    return end <= bytes.length ? end : truncated();
  }
  if (format === "jpeg") {
    // Walk the marker segments; after each start-of-scan, skip entropy-coded data (where FF is
    // followed by 00 or a restart marker) up to the next marker. Thumbnails inside APP1 are skipped
    // with their segment.
    let i = 2;
    while (i + 1 < bytes.length) {
      if (bytes[i] !== 0xff) {
        throw new AppError("invalid_input", `The JPEG has stray bytes between its parts (at byte ${i}): it is damaged or was written by a faulty tool. Export it again from the camera software.`);
      }
      const marker = bytes[i + 1];
      if (marker === 0xff) {
        i += 1;
        continue;
      }
      if (marker === 0xd9) return i + 2;
      if (marker === 0x01 || (marker >= 0xd0 && marker <= 0xd7)) {
        i += 2;
        continue;
      }
      if (i + 3 >= bytes.length) return truncated();
      const length = (bytes[i + 2] << 8) | bytes[i + 3];
      i += 2 + length;
      if (marker === 0xda) {
        while (i + 1 < bytes.length && !(bytes[i] === 0xff && bytes[i + 1] !== 0x00 && !(bytes[i + 1] >= 0xd0 && bytes[i + 1] <= 0xd7))) i++;
      }
    }
    return truncated();
  }
  return null;
}

function truncated(): never {
  throw new AppError("invalid_input", "The photo file is cut short (truncated): the upload or the copy from the camera did not finish. Copy the file again and re-upload it.");
}

function summariseExif(raw: Buffer | undefined, orientation: number | undefined): ExifSummaryFacts {
  const out = parseExif(raw);
  if (orientation) out.orientation = orientation;
  return out;
}

function megapixels(n: number): string {
  return `${(n / 1e6).toFixed(n < 1e7 ? 1 : 0)} megapixels`;
}

/** Checks the bytes and reports what they are; throws AppError (413/415/422) with what to do. */
export async function inspectPhoto(bytes: Uint8Array, limits: PhotoLimits): Promise<PhotoFacts> {
  if (bytes.byteLength > limits.maxBytes) {
    throw new AppError("too_large", `The file is ${(bytes.byteLength / 1048576).toFixed(1)} MB; photos up to ${(limits.maxBytes / 1048576).toFixed(0)} MB are accepted. Export a smaller JPEG.`);
  }
  const sniffed = sniffFormat(bytes);
  if ("other" in sniffed) {
    throw new AppError("unsupported_type", `This file is ${sniffed.other}, not a photo Solvatlas can measure. Upload a ${ALLOWED_LIST} photo straight from the camera.`);
  }
  const format = sniffed.format;
  const info = PHOTO_FORMATS[format];
  const end = imageEnd(bytes, format);
  if (end !== null && end < bytes.length) {
    const rest = bytes.subarray(end);
    if (rest.some((v) => v !== 0)) {
      throw new AppError(
        "unsupported_type",
        `The ${info.label} image ends after ${end} bytes but the file carries ${rest.length} more bytes of other data (a file that is a photo and something else at once). Save the photo again as a plain ${info.label} and upload that.`,
      );
    }
  }
  let meta: Metadata;
  try {
    meta = await sharp(bytes, { limitInputPixels: false, failOn: "error" }).metadata();
  } catch {
    throw new AppError("invalid_input", `The file starts like a ${info.label} but its header cannot be read: it is damaged. Copy it from the camera again.`);
  }
  if (meta.format !== format && !(format === "tiff" && meta.format === "tiff")) {
    throw new AppError("unsupported_type", `The file starts like a ${info.label} but decodes as ${meta.format ?? "something else"}. Upload a plain ${ALLOWED_LIST} photo.`);
  }
  const width = meta.width ?? 0;
  const height = meta.height ?? 0;
  if (width < 1 || height < 1) throw new AppError("invalid_input", "The photo has no pixels. Upload the photo itself.");
  if (width * height > limits.maxPixels) {
    throw new AppError(
      "too_large",
      `The image declares ${width}×${height} pixels (${megapixels(width * height)}); the limit is ${megapixels(limits.maxPixels)}. Such files are refused before decoding. Export the photo at the camera's normal size.`,
    );
  }
  if ((meta.pages ?? 1) > 1) {
    throw new AppError("invalid_input", `The file holds ${meta.pages} images (pages or animation frames). Upload one rack photo per file.`);
  }
  if (meta.space === "cmyk") {
    throw new AppError(
      "unsupported_type",
      "This is a CMYK image (made for print), not a camera photo: its colours depend on a print profile and cannot be compared with camera RGB. Upload the camera's own RGB JPEG, PNG or TIFF.",
    );
  }
  if (meta.space === "b-w" || meta.space === "grey16" || (meta.channels ?? 3) < 3) {
    throw new AppError("invalid_input", "This photo is greyscale: it holds no colour to measure. Upload the colour photo.");
  }
  const oriented = meta.autoOrient ?? { width, height };
  const depthBits: Record<string, number> = { uchar: 8, char: 8, ushort: 16, short: 16, uint: 32, int: 32, float: 32, double: 64 };
  return {
    format,
    mimeType: info.mime,
    extension: info.extension,
    width: oriented.width,
    height: oriented.height,
    bitDepth: depthBits[meta.depth ?? "uchar"] ?? 8,
    colourSpace: meta.space ?? "srgb",
    hasIccProfile: !!meta.hasProfile,
    exif: summariseExif(meta.exif, meta.orientation),
  };
}

export const DERIVED_SIZES = { thumb: 320, display: 1600 } as const;

/**
 * The thumbnail and display-size copy: EXIF orientation applied, 8-bit sRGB JPEG, alpha flattened on
 * white, never enlarged. Re-encoding also means what browsers are shown is clean decoder output.
 */
export async function makeDerivatives(bytes: Uint8Array, limits: Pick<PhotoLimits, "maxPixels">): Promise<{ thumb: Buffer; display: Buffer }> {
  const make = (size: number, quality: number) =>
    sharp(bytes, { limitInputPixels: limits.maxPixels, failOn: "truncated" })
      .autoOrient()
      .resize({ width: size, height: size, fit: "inside", withoutEnlargement: true })
      .flatten({ background: "#ffffff" })
      .toColourspace("srgb")
      .jpeg({ quality, mozjpeg: false })
      .toBuffer();
  try {
    // Each copy decodes every pixel of the original: a truncated or corrupt body fails here, before
    // anything is stored.
    const [thumb, display] = await Promise.all([make(DERIVED_SIZES.thumb, 80), make(DERIVED_SIZES.display, 88)]);
    return { thumb, display };
  } catch (error) {
    const text = error instanceof Error ? error.message : String(error);
    if (/truncat|premature|end of (file|data)|incomplete|unexpected end|read error|not enough/i.test(text)) truncated();
    throw new AppError("invalid_input", `The photo is damaged and cannot be decoded (${text.split("\n")[0].slice(0, 120)}). Copy it from the camera again.`);
  }
}
