import sharp, { type Metadata, type OutputInfo } from "sharp";
import { regionSpreadDeltaE } from "./region-spread";
import { ColorInputError } from "./errors";
import { parseExif, type PhotoExif } from "./exif";
import { srgbDecode, srgbEncode } from "./srgb";
import type { LinearRgb } from "./types";

export { ColorInputError };
export type { PhotoExif };

export type PhotoFormat = "jpeg" | "png" | "webp" | "tiff";

/** One photo decoded to interleaved RGB, EXIF orientation applied, origin top-left. */
export type DecodedPhoto = {
  width: number;
  height: number;
  channels: 3;
  bitDepth: 8 | 16;
  /** sRGB-encoded code values, row-major, R G B interleaved; 0–255 or 0–65535. */
  data: Uint8Array | Uint16Array;
  format: PhotoFormat;
  exif: PhotoExif;
};

/** A region in pixels of the oriented photo; an ellipse is the one inscribed in the x, y, w, h box. */
export type RegionSpec = { shape: "rect" | "ellipse"; x: number; y: number; w: number; h: number };

/** What the region's pixels say, before any light correction. */
export type RegionStats = {
  /** Robust mean in linear light (sRGB transfer undone), 0–1; the raw camera-side value to keep. */
  linearRgb: LinearRgb;
  /** Pixels inside the region. */
  pixels: number;
  /** Of those, pixels left out: clipped (any channel at the lowest or highest code) or luminance outliers. */
  rejected: number;
  /** Robust pixel-to-pixel scatter of the accepted pixels, in ΔE*ab units (see `measureRegion`). */
  spread: number;
  flags: RegionFlag[];
};

/**
 * Quality flags. Region flags come from `measureRegion`; "out-of-srgb-gamut" is added once a colour
 * is corrected and converted (see measure.ts), since an uncorrected camera value is in gamut by construction.
 */
export type RegionFlag = "too-few-pixels" | "much-rejected" | "non-uniform" | "near-clipping" | "out-of-srgb-gamut";

/** Thresholds behind the flags: common practice for photo colorimetry, no single published source. */
export const REGION_LIMITS = {
  /** Fewer accepted pixels than this and camera noise is not averaged out. */
  minAcceptedPixels: 50,
  /** More than this fraction rejected: the region probably covers glare, a label or an edge. */
  maxRejectedFraction: 0.3,
  /** Spread above this many ΔE*ab: the region is not one colour (gradient, meniscus, bubbles). */
  maxSpread: 4,
  /** A mean channel within this fraction of either end of the code range is near clipping. */
  clipMargin: 0.04,
  /** More clipped pixels than this fraction also marks the region as near clipping. */
  maxClippedFraction: 0.02,
  /** Modified z-score cut for luminance outliers (Iglewicz & Hoaglin 1993 recommend 3.5). */
  outlierZ: 3.5,
  /** Fraction trimmed from each end of every channel for the robust mean. */
  trim: 0.1,
} as const;

/** Default pixel limit: 60 MP covers today's phone and DSLR photos; larger images are refused. */
export const DEFAULT_MAX_PIXELS = 60_000_000;

const ALLOWED = "JPEG, PNG, WebP or TIFF";

/** Format by magic bytes; sharp's libvips would also read SVG, PDF, HEIF etc., which are refused. */
export function sniffPhotoFormat(b: Uint8Array): PhotoFormat | null {
  if (b.length >= 3 && b[0] === 0xff && b[1] === 0xd8 && b[2] === 0xff) return "jpeg";
  if (b.length >= 8 && b[0] === 0x89 && b[1] === 0x50 && b[2] === 0x4e && b[3] === 0x47 && b[4] === 0x0d && b[5] === 0x0a && b[6] === 0x1a && b[7] === 0x0a)
    return "png";
  if (b.length >= 12 && b[0] === 0x52 && b[1] === 0x49 && b[2] === 0x46 && b[3] === 0x46 && b[8] === 0x57 && b[9] === 0x45 && b[10] === 0x42 && b[11] === 0x50)
    return "webp";
  if (b.length >= 4 && ((b[0] === 0x49 && b[1] === 0x49 && b[2] === 0x2a && b[3] === 0x00) || (b[0] === 0x4d && b[1] === 0x4d && b[2] === 0x00 && b[3] === 0x2a)))
    return "tiff";
  return null;
}

function decodeFailure(error: unknown): ColorInputError {
  const message = error instanceof Error ? error.message : String(error);
  if (/pixel limit/i.test(message)) return tooLarge();
  return new ColorInputError("The image could not be decoded because its data is truncated or damaged; export or copy the photo again.");
}

let maxPixelsInMessage = DEFAULT_MAX_PIXELS;
function tooLarge(): ColorInputError {
  return new ColorInputError(
    `The image has more than ${(maxPixelsInMessage / 1e6).toFixed(0)} megapixels; reduce it or crop it to the vials before measuring.`,
  );
}

/**
 * Decodes a photo once to raw sRGB code values with the EXIF orientation applied. Embedded ICC
 * profiles are converted to sRGB by libvips; 16-bit PNG/TIFF stay 16-bit, everything else is 8-bit.
 * Throws `ColorInputError` for empty, unsupported, truncated or too-large input.
 */
export async function decodePhoto(bytes: Uint8Array, opts: { maxPixels?: number } = {}): Promise<DecodedPhoto> {
  const maxPixels = opts.maxPixels ?? DEFAULT_MAX_PIXELS;
  maxPixelsInMessage = maxPixels;
  if (bytes.length === 0) throw new ColorInputError(`The file is empty; choose a photo in ${ALLOWED} format.`);
  const format = sniffPhotoFormat(bytes);
  if (!format) throw new ColorInputError(`The file is not a ${ALLOWED} image; export the photo in one of those formats.`);
  const input = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const options = { limitInputPixels: maxPixels, failOn: "warning" as const };

  let meta: Metadata;
  try {
    meta = await sharp(input, options).metadata();
  } catch (error) {
    throw decodeFailure(error);
  }
  if (meta.format !== format && !(format === "tiff" && meta.format === "tiff")) {
    throw new ColorInputError(`The file starts like a ${format.toUpperCase()} image but is not one; export the photo again.`);
  }
  if (!meta.width || !meta.height) throw decodeFailure(new Error("no size"));
  if (meta.width * meta.height > maxPixels) throw tooLarge();
  const bitDepth: 8 | 16 = meta.depth === "ushort" ? 16 : meta.depth === "uchar" ? 8 : 0 as 8;
  if (bitDepth !== 8 && bitDepth !== 16) {
    throw new ColorInputError(`The image stores ${meta.depth} samples; save it with 8- or 16-bit integer channels.`);
  }

  let raw: { data: Buffer; info: OutputInfo };
  try {
    // rotate() without an angle applies the EXIF orientation. For 16-bit output libvips needs the
    // rgb16 interpretation: raw({depth:"ushort"}) alone would hold 8-bit values in 16-bit words.
    let pipeline = sharp(input, options).rotate().removeAlpha();
    pipeline = bitDepth === 16 ? pipeline.toColourspace("rgb16").raw({ depth: "ushort" }) : pipeline.toColourspace("srgb").raw();
    raw = await pipeline.toBuffer({ resolveWithObject: true });
  } catch (error) {
    throw decodeFailure(error);
  }
  const { info } = raw;
  if (info.channels !== 3) throw new ColorInputError("The image could not be turned into three colour channels; save it as an RGB photo.");
  let data: Uint8Array | Uint16Array;
  if (bitDepth === 16) {
    const b = raw.data;
    data = b.byteOffset % 2 === 0 ? new Uint16Array(b.buffer, b.byteOffset, b.byteLength / 2) : new Uint16Array(Uint8Array.from(b).buffer);
  } else {
    data = new Uint8Array(raw.data.buffer, raw.data.byteOffset, raw.data.byteLength);
  }
  const exif = parseExif(meta.exif);
  if (meta.orientation !== undefined) exif.orientation = meta.orientation;
  return { width: info.width, height: info.height, channels: 3, bitDepth, data, format, exif };
}

const LUTS: Partial<Record<8 | 16, Float64Array>> = {};
/** Code value → linear light, IEC 61966-2-1 decoding, cached per bit depth. */
function decodeLut(bitDepth: 8 | 16): Float64Array {
  let lut = LUTS[bitDepth];
  if (!lut) {
    const max = bitDepth === 16 ? 65535 : 255;
    lut = new Float64Array(max + 1);
    for (let i = 0; i <= max; i++) lut[i] = srgbDecode(i / max);
    LUTS[bitDepth] = lut;
  }
  return lut;
}

/** k-th smallest (0-based) of `a`, reordering `a` in place (Hoare selection, expected O(n)). */
function select(a: Float32Array | Float64Array, k: number): number {
  let lo = 0;
  let hi = a.length - 1;
  while (hi > lo) {
    const pivot = a[(lo + hi) >> 1];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (a[i] < pivot) i++;
      while (a[j] > pivot) j--;
      if (i <= j) {
        const t = a[i];
        a[i] = a[j];
        a[j] = t;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return a[k];
  }
  return a[k];
}

function median(values: Float32Array, n: number): number {
  const copy = values.slice(0, n);
  const mid = n >> 1;
  const upper = select(copy, mid);
  if (n % 2 === 1) return upper;
  let lower = -Infinity;
  for (let i = 0; i < mid; i++) if (copy[i] > lower) lower = copy[i];
  return (lower + upper) / 2;
}

function describe(region: RegionSpec): string {
  return `${region.shape} ${region.x},${region.y},${region.w},${region.h}`;
}

/** Bounds of the region's pixel rows and, per row, of its columns (pixel centres inside the shape). */
function validateRegion(photo: DecodedPhoto, region: RegionSpec): void {
  const { x, y, w, h } = region;
  if (![x, y, w, h].every(Number.isFinite)) throw new ColorInputError(`The region ${describe(region)} has a value that is not a number; give x, y, width and height in pixels.`);
  if (region.shape !== "rect" && region.shape !== "ellipse") throw new ColorInputError(`The region shape "${String(region.shape)}" is unknown; use rect or ellipse.`);
  if (w <= 0 || h <= 0) throw new ColorInputError(`The region ${describe(region)} is empty; give it a width and height of at least one pixel.`);
  if (x < 0 || y < 0 || x + w > photo.width || y + h > photo.height) {
    throw new ColorInputError(
      `The region ${describe(region)} reaches outside the ${photo.width}×${photo.height} image; keep it within the photo (origin top-left, after EXIF orientation).`,
    );
  }
}

/**
 * Measures one region of a decoded photo.
 *
 * 1. Pixels whose centre lies inside the rectangle or inscribed ellipse are taken.
 * 2. Clipped pixels (any channel at code 0 or at the top code) are rejected: their true value is unknown.
 * 3. Luminance outliers are rejected: Y = 0.2126 R + 0.7152 G + 0.0722 B in linear light (sRGB
 *    luminance row, IEC 61966-2-1), modified z-score |Y − median| / (1.4826 · MAD) > 3.5
 *    (Iglewicz & Hoaglin 1993). This catches specular highlights on glass (high side) and dark vial
 *    edges or shadows (low side). The MAD is floored at one code step at the median so quantised,
 *    noise-free regions are not cut down to their single most common value.
 * 4. The colour is the 10 % trimmed mean of each channel in linear light over the accepted pixels.
 *    Why trimmed mean and not median: the median of 8-bit data snaps to whole code values (a bias of
 *    up to half a code, ≈ 0.3 ΔE00 in dark colours), while a trimmed mean averages sensor noise across
 *    codes and still ignores the residual outliers that step 3 left in either tail.
 * 5. Spread: for each channel the robust standard deviation (1.4826 · MAD, in code values) of the
 *    accepted pixels is turned into a CIELAB D65 step from the mean; spread is the root sum of squares
 *    of the three ΔE*ab steps, i.e. the typical pixel-to-pixel colour scatter.
 *
 * Throws `ColorInputError` if the region is off the image, empty, or has no usable pixels.
 */
export function measureRegion(photo: DecodedPhoto, region: RegionSpec): RegionStats {
  validateRegion(photo, region);
  const { width, data, bitDepth } = photo;
  const max = bitDepth === 16 ? 65535 : 255;
  const lut = decodeLut(bitDepth);
  const { x, y, w, h } = region;
  const ellipse = region.shape === "ellipse";
  const cx = x + w / 2;
  const cy = y + h / 2;
  const rowStart = Math.max(0, Math.ceil(y - 0.5));
  const rowEnd = Math.min(photo.height - 1, Math.ceil(y + h - 0.5) - 1);

  // Upper bound on pixel count for the scratch arrays.
  const capacity = (rowEnd - rowStart + 1) * (Math.ceil(w) + 1);
  const lum = new Float32Array(Math.max(1, capacity));
  const offsets = new Uint32Array(Math.max(1, capacity));
  let pixels = 0;
  let clipped = 0;
  let n = 0;
  for (let j = rowStart; j <= rowEnd; j++) {
    let left = x;
    let right = x + w;
    if (ellipse) {
      const dy = (j + 0.5 - cy) / (h / 2);
      if (dy * dy > 1) continue;
      const half = (w / 2) * Math.sqrt(1 - dy * dy);
      left = cx - half;
      right = cx + half;
    }
    const colStart = Math.max(0, Math.ceil(left - 0.5));
    const colEnd = Math.min(width - 1, Math.ceil(right - 0.5) - 1);
    for (let i = colStart; i <= colEnd; i++) {
      pixels++;
      const o = (j * width + i) * 3;
      const r = data[o];
      const g = data[o + 1];
      const b = data[o + 2];
      if (r === 0 || g === 0 || b === 0 || r === max || g === max || b === max) {
        clipped++;
        continue;
      }
      lum[n] = 0.2126 * lut[r] + 0.7152 * lut[g] + 0.0722 * lut[b];
      offsets[n] = o;
      n++;
    }
  }
  if (pixels === 0) throw new ColorInputError(`The region ${describe(region)} contains no whole pixel; make it larger.`);
  if (n === 0) {
    throw new ColorInputError(
      `Every pixel of the region ${describe(region)} is clipped (black or white); reduce the exposure or move the region onto the sample.`,
    );
  }

  const med = median(lum, n);
  const dev = new Float32Array(n);
  for (let k = 0; k < n; k++) dev[k] = Math.abs(lum[k] - med);
  const mad = median(dev, n);
  const codeStep = srgbDecode(Math.min(1, srgbEncode(med) + 1 / max)) - med;
  const sigma = Math.max(1.4826 * mad, codeStep);
  const cut = REGION_LIMITS.outlierZ * sigma;

  // Histograms of the accepted pixels' codes: exact trimmed means and MADs in O(pixels + codes).
  const hist = [new Uint32Array(max + 1), new Uint32Array(max + 1), new Uint32Array(max + 1)];
  let accepted = 0;
  for (let k = 0; k < n; k++) {
    if (Math.abs(lum[k] - med) > cut) continue;
    const o = offsets[k];
    hist[0][data[o]]++;
    hist[1][data[o + 1]]++;
    hist[2][data[o + 2]]++;
    accepted++;
  }

  const trimCount = Math.floor(accepted * REGION_LIMITS.trim);
  const linearRgb: LinearRgb = [0, 0, 0];
  const robustSdCodes: [number, number, number] = [0, 0, 0];
  const medianCodes: [number, number, number] = [0, 0, 0];
  for (let c = 0; c < 3; c++) {
    const hc = hist[c];
    // Trimmed mean: drop trimCount values from each end, average the rest in linear light.
    let skipLow = trimCount;
    let keep = accepted - 2 * trimCount;
    let sum = 0;
    for (let v = 0; v <= max && keep > 0; v++) {
      let count = hc[v];
      if (count === 0) continue;
      if (skipLow > 0) {
        const s = Math.min(skipLow, count);
        skipLow -= s;
        count -= s;
      }
      const take = Math.min(keep, count);
      sum += take * lut[v];
      keep -= take;
    }
    linearRgb[c] = sum / (accepted - 2 * trimCount);
    // Median code and MAD in codes from the histogram.
    const half = (accepted - 1) / 2;
    let cum = 0;
    let m = 0;
    for (let v = 0; v <= max; v++) {
      cum += hc[v];
      if (cum > half) {
        m = v;
        break;
      }
    }
    medianCodes[c] = m;
    cum = hc[m];
    let d = 0;
    while (cum <= half && d < max) {
      d++;
      if (m + d <= max) cum += hc[m + d];
      if (m - d >= 0) cum += hc[m - d];
    }
    robustSdCodes[c] = 1.4826 * d;
  }

  const spread = regionSpreadDeltaE(linearRgb, robustSdCodes, max);
  const rejected = pixels - accepted;
  const flags: RegionFlag[] = [];
  if (accepted < REGION_LIMITS.minAcceptedPixels) flags.push("too-few-pixels");
  if (rejected > REGION_LIMITS.maxRejectedFraction * pixels) flags.push("much-rejected");
  if (spread > REGION_LIMITS.maxSpread) flags.push("non-uniform");
  const encoded = linearRgb.map(srgbEncode);
  if (clipped > REGION_LIMITS.maxClippedFraction * pixels || encoded.some((e) => e < REGION_LIMITS.clipMargin || e > 1 - REGION_LIMITS.clipMargin)) {
    flags.push("near-clipping");
  }
  return { linearRgb, pixels, rejected, spread, flags };
}

/** Measures many regions of the one decoded buffer (never decodes again). */
export function measureRegions(photo: DecodedPhoto, regions: readonly RegionSpec[]): RegionStats[] {
  return regions.map((region) => measureRegion(photo, region));
}
