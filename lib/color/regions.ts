import sharp, { type Metadata, type OutputInfo } from "sharp";
import { regionSpreadDeltaE } from "./region-spread";
import { ColorInputError } from "./errors";
import { parseExif, type PhotoExif } from "./exif";
import { srgbDecode, srgbEncode } from "./srgb";
import { pixelsPerSampleFromAutocorrelation } from "./uncertainty";
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
  /**
   * Robust per-channel pixel standard deviation (1.4826 · MAD of the accepted pixels' codes) carried
   * to the scale of `linearRgb` through the slope of the sRGB decoding at the mean: the input of the
   * mean's uncertainty (lib/color/uncertainty.ts).
   */
  sd?: LinearRgb;
  /** Fraction of the region's pixels with a channel at the lowest or highest code (sampled as for the outlier cut). */
  clippedFraction?: number;
  /**
   * Pixels per statistically independent sample, from the region's own autocorrelation
   * (`pixelsPerSampleFromAutocorrelation`): the mean's uncertainty uses N / this, not N.
   */
  pixelsPerSample?: number;
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

function tooLarge(maxPixels: number): ColorInputError {
  const limit = maxPixels >= 1e6 ? `${Number((maxPixels / 1e6).toFixed(1))} million` : String(maxPixels);
  return new ColorInputError(`The image has more than ${limit} pixels; reduce it or crop it to the vials before measuring.`);
}

function decodeFailure(error: unknown, maxPixels: number): ColorInputError {
  const message = error instanceof Error ? error.message : String(error);
  if (/pixel limit/i.test(message)) return tooLarge(maxPixels);
  return new ColorInputError("The image could not be decoded because its data is truncated or damaged; export or copy the photo again.");
}

/**
 * Decodes a photo once to raw sRGB code values with the EXIF orientation applied. Embedded ICC
 * profiles are converted to sRGB by libvips; 16-bit PNG/TIFF stay 16-bit, everything else is 8-bit.
 * Throws `ColorInputError` for empty, unsupported, truncated or too-large input.
 */
export async function decodePhoto(bytes: Uint8Array, opts: { maxPixels?: number } = {}): Promise<DecodedPhoto> {
  const maxPixels = opts.maxPixels ?? DEFAULT_MAX_PIXELS;
  if (bytes.length === 0) throw new ColorInputError(`The file is empty; choose a photo in ${ALLOWED} format.`);
  const format = sniffPhotoFormat(bytes);
  if (!format) throw new ColorInputError(`The file is not a ${ALLOWED} image; export the photo in one of those formats.`);
  const input = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const options = { limitInputPixels: maxPixels, failOn: "warning" as const };

  // rotate() without an angle applies the EXIF orientation. For 16-bit output libvips needs the
  // rgb16 interpretation: raw({depth:"ushort"}) alone would hold 8-bit values in 16-bit words.
  // For 8-bit output libvips converts an embedded ICC profile to sRGB itself; for rgb16 it does
  // not, so the transform is asked for explicitly (only with a profile: without one it would
  // distort the values).
  const decode = (bitDepth: 8 | 16, hasIcc: boolean) => {
    let pipeline = sharp(input, options).rotate().removeAlpha();
    if (bitDepth === 16) {
      pipeline = pipeline.toColourspace("rgb16");
      if (hasIcc) pipeline = pipeline.withIccProfile("srgb");
      pipeline = pipeline.raw({ depth: "ushort" });
    } else {
      pipeline = pipeline.toColourspace("srgb").raw();
    }
    return pipeline.toBuffer({ resolveWithObject: true });
  };
  // JPEG and WebP are always 8-bit and a PNG says its depth in its header: for those the header
  // read and the decode run side by side instead of one after the other.
  const surelyEightBit = format === "jpeg" || format === "webp" || (format === "png" && bytes.length > 24 && bytes[24] !== 16);
  const [metaResult, earlyRaw] = await Promise.allSettled([sharp(input, options).metadata(), surelyEightBit ? decode(8, false) : Promise.resolve(null)]);
  if (metaResult.status === "rejected") throw decodeFailure(metaResult.reason, maxPixels);
  const meta: Metadata = metaResult.value;
  if (meta.format !== format) {
    throw new ColorInputError(`The file starts like a ${format.toUpperCase()} image but is not one; export the photo again.`);
  }
  if (!meta.width || !meta.height) throw decodeFailure(new Error("no size"), maxPixels);
  if (meta.width * meta.height > maxPixels) throw tooLarge(maxPixels);
  const bitDepth: 8 | 16 = meta.depth === "ushort" ? 16 : meta.depth === "uchar" ? 8 : (0 as 8);
  if (bitDepth !== 8 && bitDepth !== 16) {
    throw new ColorInputError(`The image stores ${meta.depth} samples; save it with 8- or 16-bit integer channels.`);
  }

  let raw: { data: Buffer; info: OutputInfo };
  try {
    if (earlyRaw.status === "rejected") throw earlyRaw.reason;
    raw = earlyRaw.value && bitDepth === 8 ? earlyRaw.value : await decode(bitDepth, Boolean(meta.icc));
  } catch (error) {
    throw decodeFailure(error, maxPixels);
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

const Y_BINS = 65536;
/** Fixed-point fraction bits of the luminance tables (integer adds are faster than float adds). */
const Y_FRACTION_BITS = 4;
/** Sum of up to three of these stays a negative int32 (3 × −2²⁸ > −2³¹). */
const CLIPPED_ENTRY = -(2 ** 28);
/** Reused luminance histogram (measureRegion is synchronous): saves a 256 kB allocation per region. */
const Y_HIST_SCRATCH = new Uint32Array(Y_BINS);
const Y_LUTS: Partial<Record<8 | 16, [Int32Array, Int32Array, Int32Array]>> = {};
/**
 * Per-channel luminance contributions in bins of 1/65535 of white (fixed point, 4 fraction bits):
 * Y = 0.2126 R + 0.7152 G + 0.0722 B in linear light (the luminance row of the IEC 61966-2-1
 * matrix). Binning Y this finely keeps the outlier rule exact to 0.002 % of white while letting the
 * median and MAD come from a histogram instead of a sort.
 */
function luminanceLuts(bitDepth: 8 | 16): [Int32Array, Int32Array, Int32Array] {
  let luts = Y_LUTS[bitDepth];
  if (!luts) {
    const lin = decodeLut(bitDepth);
    const scale = (Y_BINS - 1) * (1 << Y_FRACTION_BITS);
    const table = (weight: number) => {
      const t = Int32Array.from(lin, (v) => Math.round(weight * v * scale));
      // Clipped codes (0 and the top code) get a large negative entry, so a clipped pixel's
      // luminance bin is negative and the outlier test drops it with no separate clip test.
      t[0] = CLIPPED_ENTRY;
      t[t.length - 1] = CLIPPED_ENTRY;
      return t;
    };
    luts = [table(0.2126), table(0.7152), table(0.0722)];
    Y_LUTS[bitDepth] = luts;
  }
  return luts;
}

/** Index of the median of a histogram holding `total` counts (lower median for even totals). */
function histogramMedian(hist: Uint32Array, total: number): number {
  const half = (total - 1) / 2;
  let cum = 0;
  for (let v = 0; v < hist.length; v++) {
    cum += hist[v];
    if (cum > half) return v;
  }
  return hist.length - 1;
}

/** Median absolute deviation, in bins, of a histogram around its median bin `m`. */
function histogramMad(hist: Uint32Array, total: number, m: number): number {
  const half = (total - 1) / 2;
  let cum = hist[m];
  let d = 0;
  const last = hist.length - 1;
  while (cum <= half && d < last) {
    d++;
    if (m + d <= last) cum += hist[m + d];
    if (m - d >= 0) cum += hist[m - d];
  }
  return d;
}

/**
 * Pass 2 of `measureRegion`, kept as a small function of its own so V8 optimises its loop fully:
 * histograms the codes of every pixel whose luminance bin lies in [lo, hi] (clipped pixels have
 * negative bins) and returns how many there were.
 */
function histogramAccepted(
  data: Uint8Array | Uint16Array,
  spans: readonly number[],
  yr: Int32Array,
  yg: Int32Array,
  yb: Int32Array,
  lo: number,
  hi: number,
  hist: Uint32Array,
): number {
  // One histogram array for the three channels (red at 0, green at `size`, blue at 2·size):
  // fewer typed arrays in the loop measured about 15 % faster than three.
  const size = hist.length / 3;
  const size2 = 2 * size;
  let accepted = 0;
  for (let s = 0; s < spans.length; s += 2) {
    for (let o = spans[s], oEnd = spans[s + 1]; o <= oEnd; o += 3) {
      const r = data[o];
      const g = data[o + 1];
      const b = data[o + 2];
      const bin = (yr[r] + yg[g] + yb[b]) >> Y_FRACTION_BITS;
      if (bin < lo || bin > hi) continue;
      hist[r]++;
      hist[size + g]++;
      hist[size2 + b]++;
      accepted++;
    }
  }
  return accepted;
}

function describe(region: RegionSpec): string {
  return `${region.shape} ${region.x},${region.y},${region.w},${region.h}`;
}

/** Refuses a region with a value that is not a number, an unknown shape, no area, or a part off the image. */
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
 *    noise-free regions are not cut down to their single most common value. The median and MAD
 *    come from every pixel of small regions and from a 1-in-8 sample of regions ≥ 20 000 pixels.
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

  const [yr, yg, yb] = luminanceLuts(bitDepth);
  // Row spans of the shape: [first sample offset, last sample offset] per row.
  const spans: number[] = [];
  let pixels = 0;
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
    if (colEnd < colStart) continue;
    pixels += colEnd - colStart + 1;
    spans.push((j * width + colStart) * 3, (j * width + colEnd) * 3);
  }
  if (pixels === 0) throw new ColorInputError(`The region ${describe(region)} contains no whole pixel; make it larger.`);

  // Pass 1: luminance histogram of the unclipped pixels, from every pixel of small regions and every
  // 4th pixel of every 2nd row of large ones: the median and MAD only set the outlier cut, and 1 in 8
  // of ≥ 20 000 pixels estimates them to well under a code value while saving most of a pass. The
  // sample's clipped fraction serves the near-clipping flag.
  const yHist = Y_HIST_SCRATCH.fill(0);
  let sampledClipped = 0;
  const sampleLuminance = (stride: number, rowStep: number): number => {
    let count = 0;
    sampledClipped = 0;
    for (let s = 0; s < spans.length; s += 2 * rowStep) {
      for (let o = spans[s], oEnd = spans[s + 1]; o <= oEnd; o += stride) {
        const bin = (yr[data[o]] + yg[data[o + 1]] + yb[data[o + 2]]) >> Y_FRACTION_BITS;
        if (bin < 0) {
          sampledClipped++;
          continue;
        }
        yHist[bin]++;
        count++;
      }
    }
    return count;
  };
  const large = pixels >= 20_000;
  let sampled = large ? sampleLuminance(12, 2) : sampleLuminance(3, 1);
  if (sampled === 0 && large) sampled = sampleLuminance(3, 1);
  if (sampled === 0) {
    throw new ColorInputError(
      `Every pixel of the region ${describe(region)} is clipped (black or white); reduce the exposure or move the region onto the sample.`,
    );
  }
  const clippedFraction = sampledClipped / (sampled + sampledClipped);
  const medBin = histogramMedian(yHist, sampled);
  const madBins = histogramMad(yHist, sampled, medBin);
  const med = medBin / (Y_BINS - 1);
  const codeStepBins = (srgbDecode(Math.min(1, srgbEncode(med) + 1 / max)) - med) * (Y_BINS - 1);
  const cut = REGION_LIMITS.outlierZ * Math.max(1.4826 * madBins, codeStepBins, 1);
  const lo = Math.max(0, Math.ceil(medBin - cut)) | 0;
  const hi = Math.min(Y_BINS - 1, Math.floor(medBin + cut)) | 0;

  // Pass 2, every pixel: drop clipped ones (negative bin) and luminance outliers, histogram the rest.
  const joint = new Uint32Array(3 * (max + 1));
  const accepted = histogramAccepted(data, spans, yr, yg, yb, lo, hi, joint);
  const hist = [0, 1, 2].map((c) => joint.subarray(c * (max + 1), (c + 1) * (max + 1)));
  if (accepted === 0) {
    throw new ColorInputError(
      `No pixel of the region ${describe(region)} is usable (all clipped or outliers); reduce the exposure or move the region onto the sample.`,
    );
  }

  const trimCount = Math.floor(accepted * REGION_LIMITS.trim);
  const linearRgb: LinearRgb = [0, 0, 0];
  const robustSdCodes: [number, number, number] = [0, 0, 0];
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
    const m = histogramMedian(hc, accepted);
    robustSdCodes[c] = 1.4826 * histogramMad(hc, accepted, m);
  }

  const spread = regionSpreadDeltaE(linearRgb, robustSdCodes, max);
  const rejected = pixels - accepted;
  const flags: RegionFlag[] = [];
  if (accepted < REGION_LIMITS.minAcceptedPixels) flags.push("too-few-pixels");
  if (rejected > REGION_LIMITS.maxRejectedFraction * pixels) flags.push("much-rejected");
  if (spread > REGION_LIMITS.maxSpread) flags.push("non-uniform");
  const encoded = linearRgb.map(srgbEncode);
  if (clippedFraction > REGION_LIMITS.maxClippedFraction || encoded.some((e) => e < REGION_LIMITS.clipMargin || e > 1 - REGION_LIMITS.clipMargin)) {
    flags.push("near-clipping");
  }
  const sd = linearRgb.map((v, c) => {
    const e = srgbEncode(v);
    const step = robustSdCodes[c] / max;
    const hiE = Math.min(1, e + step);
    const loE = Math.max(0, e - step);
    return hiE > loE ? ((srgbDecode(hiE) - srgbDecode(loE)) / (hiE - loE)) * step : 0;
  }) as LinearRgb;
  const pixelsPerSample = pixelsPerSampleFromAutocorrelation(photo, region);
  return { linearRgb, pixels, rejected, spread, sd, clippedFraction, pixelsPerSample, flags };
}

/** Measures many regions of the one decoded buffer (never decodes again). */
export function measureRegions(photo: DecodedPhoto, regions: readonly RegionSpec[]): RegionStats[] {
  return regions.map((region) => measureRegion(photo, region));
}
