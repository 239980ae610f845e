import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { applyCorrection, fitWhiteScaling } from "@/lib/color/correction";
import { labToLinearSrgb, linearSrgbToLab } from "@/lib/color/convert";
import { deltaE00 } from "@/lib/color/difference";
import { colourOfRegion } from "@/lib/color/measure";
import { ColorInputError, decodePhoto, measureRegion, measureRegions, sniffPhotoFormat, type RegionSpec } from "@/lib/color/regions";
import { parseExif } from "@/lib/color/exif";
import { mat3Inverse, mat3Mul, type Mat3 } from "@/lib/color/matrix";
import { mat3MulVec, srgbEncode } from "@/lib/color/srgb";
import type { Lab, LinearRgb } from "@/lib/color/types";
import { gaussian, mulberry32 } from "@/lib/random";

/** The acceptance bound for synthetic photos (a design target, no published source). */
const MAX_DE00 = 0.5;

/** Deterministic Gaussian noise (mulberry32 + Box–Muller) so a failing test fails every time. */
function gaussianNoise(seed: number): () => number {
  const uniform = mulberry32(seed);
  return () => gaussian(uniform);
}

type Scene = { width: number; height: number; depth: 8 | 16; paint: (x: number, y: number) => LinearRgb; noise: number };

/** Renders linear-light colours to sRGB code values with Gaussian noise (in codes of the 8-bit scale). */
function render({ width, height, depth, paint, noise }: Scene): Uint8Array | Uint16Array {
  const max = depth === 16 ? 65535 : 255;
  const out = depth === 16 ? new Uint16Array(width * height * 3) : new Uint8Array(width * height * 3);
  const rnd = gaussianNoise(width * 7 + height);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const rgb = paint(x, y);
      for (let c = 0; c < 3; c++) {
        const code = srgbEncode(Math.min(1, Math.max(0, rgb[c]))) * max + noise * (max / 255) * rnd();
        out[(y * width + x) * 3 + c] = Math.min(max, Math.max(0, Math.round(code)));
      }
    }
  }
  return out;
}

async function encode(pixels: Uint8Array | Uint16Array, width: number, height: number, as: "png" | "jpeg" | "tiff" | "webp"): Promise<Uint8Array> {
  let img = sharp(pixels, { raw: { width, height, channels: 3 } });
  if (pixels instanceof Uint16Array) img = img.toColourspace("rgb16");
  if (as === "png") img = img.png();
  if (as === "jpeg") img = img.jpeg({ quality: 95, chromaSubsampling: "4:4:4" });
  if (as === "tiff") img = img.tiff();
  if (as === "webp") img = img.webp({ lossless: true });
  return new Uint8Array(await img.toBuffer());
}

const SAMPLE_LAB: Lab = [52, 38, 24];
const sampleRgb = labToLinearSrgb(SAMPLE_LAB, "D65");

/** A vial: known colour, a clipped specular stripe at x 40–44, dark glass edges 8 px wide at left and right. */
const vial = (x: number): LinearRgb => {
  if (x >= 40 && x < 45) return [1, 1, 1];
  if (x < 8 || x >= 92) return [0.01, 0.01, 0.012];
  return sampleRgb;
};

describe("photo regions (synthetic images made in the test)", () => {
  it.each(["png", "jpeg", "tiff", "webp"] as const)("measures a noisy vial with a clipped highlight and dark edges within ΔE00 0.5 (%s)", async (format) => {
    const width = 100;
    const height = 120;
    const pixels = render({ width, height, depth: 8, paint: vial, noise: 3 });
    const photo = await decodePhoto(await encode(pixels, width, height, format));
    expect(photo.format).toBe(format);
    expect([photo.width, photo.height, photo.bitDepth]).toEqual([width, height, 8]);
    const stats = measureRegion(photo, { shape: "rect", x: 0, y: 10, w: 100, h: 100 });
    expect(stats.pixels).toBe(10000);
    // The 5-px stripe (500 px, clipped) and the 16 px of edges (1600 px) are rejected.
    expect(stats.rejected).toBeGreaterThanOrEqual(2000);
    expect(stats.rejected).toBeLessThan(2600);
    const lab = linearSrgbToLab(stats.linearRgb, "D65");
    expect(deltaE00(lab, SAMPLE_LAB)).toBeLessThan(MAX_DE00);
    expect(stats.flags).toContain("near-clipping");
    expect(stats.flags).not.toContain("non-uniform");
  });

  it("reads 16-bit PNG as 16-bit and measures it within ΔE00 0.5", async () => {
    const width = 100;
    const height = 60;
    const pixels = render({ width, height, depth: 16, paint: vial, noise: 3 });
    const photo = await decodePhoto(await encode(pixels, width, height, "png"));
    expect(photo.bitDepth).toBe(16);
    expect(photo.data).toBeInstanceOf(Uint16Array);
    const stats = measureRegion(photo, { shape: "rect", x: 10, y: 0, w: 80, h: 60 });
    expect(deltaE00(linearSrgbToLab(stats.linearRgb, "D65"), SAMPLE_LAB)).toBeLessThan(MAX_DE00);
    expect(stats.rejected).toBeGreaterThanOrEqual(5 * 60);
  });

  it("corrects a known colour cast with a grey reference of known Lab (von Kries scaling)", async () => {
    const greyLab: Lab = [70, 0, 0];
    const grey = labToLinearSrgb(greyLab, "D65");
    const cast: LinearRgb = [1.25, 1, 0.7];
    const width = 200;
    const height = 80;
    const paint = (x: number): LinearRgb => {
      const base = x < 100 ? grey : sampleRgb;
      return [base[0] * cast[0], base[1] * cast[1], base[2] * cast[2]];
    };
    const photo = await decodePhoto(await encode(render({ width, height, depth: 8, paint, noise: 2 }), width, height, "png"));
    const [ref, sample] = measureRegions(photo, [
      { shape: "rect", x: 10, y: 10, w: 80, h: 60 },
      { shape: "ellipse", x: 110, y: 10, w: 80, h: 60 },
    ]);
    const uncorrected = linearSrgbToLab(sample.linearRgb, "D65");
    expect(deltaE00(uncorrected, SAMPLE_LAB)).toBeGreaterThan(5);
    const fit = fitWhiteScaling({ measured: ref.linearRgb, referenceLab: greyLab }, "D65");
    expect(fit.residuals[0].deltaE00).toBeLessThan(1e-6);
    const corrected = linearSrgbToLab(applyCorrection(fit.correction, sample.linearRgb), "D65");
    expect(deltaE00(corrected, SAMPLE_LAB)).toBeLessThan(MAX_DE00);
    const colour = colourOfRegion(sample, fit.correction, "D65");
    expect(colour.rawLinearRgb).toEqual(sample.linearRgb);
    expect(deltaE00(colour.lab, SAMPLE_LAB)).toBeLessThan(MAX_DE00);
  });

  it("applies the EXIF orientation before cutting regions and reads the EXIF fields", async () => {
    // Stored 60 wide × 40 high, red block in the stored top-left; orientation 6 means "rotate 90° clockwise to view".
    const width = 60;
    const height = 40;
    const red = labToLinearSrgb([50, 60, 40], "D65");
    const pixels = render({ width, height, depth: 8, paint: (x, y) => (x < 20 && y < 20 ? red : [0.2, 0.2, 0.2]), noise: 0 });
    const jpeg = await sharp(pixels, { raw: { width, height, channels: 3 } })
      .jpeg({ quality: 95 })
      .withExif({
        IFD0: { Make: "Acme", Model: "Bench 1", DateTime: "2026:12:01 10:00:00" },
        IFD2: { DateTimeOriginal: "2026:11:30 09:15:02", ExposureTime: "1/60", FNumber: "28/10", ISOSpeedRatings: "200" },
      })
      .withMetadata({ orientation: 6 })
      .toBuffer();
    const photo = await decodePhoto(new Uint8Array(jpeg));
    expect([photo.width, photo.height]).toEqual([40, 60]);
    expect(photo.exif.orientation).toBe(6);
    expect(photo.exif.make).toBe("Acme");
    expect(photo.exif.model).toBe("Bench 1");
    // DateTimeOriginal (Exif sub-IFD) wins over IFD0 DateTime (CIPA DC-008).
    // Camera clock time, no zone in EXIF: written as UTC.
    expect(photo.exif.takenAt).toBe("2026-11-30T09:15:02.000Z");
    expect(photo.exif.exposureTime).toBeCloseTo(1 / 60, 12);
    expect(photo.exif.fNumber).toBeCloseTo(2.8, 12);
    expect(photo.exif.iso).toBe(200);
    // After a clockwise quarter turn the stored top-left block sits at the top-right.
    const topRight = measureRegion(photo, { shape: "rect", x: 24, y: 2, w: 14, h: 14 });
    const topLeft = measureRegion(photo, { shape: "rect", x: 2, y: 2, w: 14, h: 14 });
    expect(linearSrgbToLab(topRight.linearRgb, "D65")[1]).toBeGreaterThan(40);
    expect(Math.abs(linearSrgbToLab(topLeft.linearRgb, "D65")[1])).toBeLessThan(3);
  });

  it("converts an embedded ICC profile (Display P3) to sRGB before measuring (8-bit)", async () => {
    const width = 40;
    const height = 30;
    const pixels = render({ width, height, depth: 8, paint: () => sampleRgb, noise: 0 });
    // For 8-bit output sharp converts the sRGB pixels to P3 on writing and embeds the P3 profile.
    const bytes = new Uint8Array(await sharp(pixels, { raw: { width, height, channels: 3 } }).withIccProfile("p3").png().toBuffer());
    const photo = await decodePhoto(bytes);
    const lab = linearSrgbToLab(measureRegion(photo, { shape: "rect", x: 0, y: 0, w: width, h: height }).linearRgb, "D65");
    expect(deltaE00(lab, SAMPLE_LAB)).toBeLessThan(MAX_DE00);
  });

  it("converts an embedded ICC profile (Display P3) to sRGB before measuring (16-bit)", async () => {
    // Display P3: primaries R 0.680/0.320, G 0.265/0.690, B 0.150/0.060, D65 white, sRGB transfer
    // curve (SMPTE EG 432-1 / Apple; from memory). Linear P3 = M_P3⁻¹ · M_sRGB · linear sRGB.
    const fromPrimaries = (xy: number[][]): Mat3 => {
      const cols = xy.map(([x, y]) => [x / y, 1, (1 - x - y) / y]);
      const m: Mat3 = [0, 1, 2].map((r) => [cols[0][r], cols[1][r], cols[2][r]]) as Mat3;
      const w = [0.3127 / 0.329, 1, (1 - 0.3127 - 0.329) / 0.329] as LinearRgb;
      const s = mat3MulVec(mat3Inverse(m), w);
      return m.map((row) => [row[0] * s[0], row[1] * s[1], row[2] * s[2]]) as Mat3;
    };
    const srgbToP3 = mat3Mul(mat3Inverse(fromPrimaries([[0.68, 0.32], [0.265, 0.69], [0.15, 0.06]])), fromPrimaries([[0.64, 0.33], [0.3, 0.6], [0.15, 0.06]]));
    const p3 = mat3MulVec(srgbToP3, sampleRgb).map((v) => Math.round(srgbEncode(v) * 65535));
    const width = 40;
    const height = 30;
    const pixels = new Uint16Array(width * height * 3).map((_, i) => p3[i % 3]);
    // When writing rgb16, sharp attaches the profile without converting the pixels (checked below).
    const bytes = new Uint8Array(await sharp(pixels, { raw: { width, height, channels: 3 } }).toColourspace("rgb16").withIccProfile("p3").png().toBuffer());
    const stored = await sharp(bytes, { ignoreIcc: true }).toColourspace("rgb16").raw({ depth: "ushort" }).toBuffer();
    expect(Array.from(new Uint16Array(stored.buffer, stored.byteOffset, 3))).toEqual(p3);
    const photo = await decodePhoto(bytes);
    expect(photo.bitDepth).toBe(16);
    const lab = linearSrgbToLab(measureRegion(photo, { shape: "rect", x: 0, y: 0, w: width, h: height }).linearRgb, "D65");
    expect(deltaE00(lab, SAMPLE_LAB)).toBeLessThan(MAX_DE00);
  });

  it("counts the pixels of an ellipse inscribed in its box (≈ π/4 of the box)", async () => {
    const photo = await decodePhoto(await encode(render({ width: 200, height: 200, depth: 8, paint: () => sampleRgb, noise: 0 }), 200, 200, "png"));
    const rect = measureRegion(photo, { shape: "rect", x: 0, y: 0, w: 200, h: 200 });
    const ellipse = measureRegion(photo, { shape: "ellipse", x: 0, y: 0, w: 200, h: 200 });
    expect(rect.pixels).toBe(40000);
    expect(Math.abs(ellipse.pixels / 40000 - Math.PI / 4)).toBeLessThan(0.005);
    expect(ellipse.rejected).toBe(0);
    expect(rect.spread).toBe(0);
    expect(deltaE00(linearSrgbToLab(rect.linearRgb, "D65"), SAMPLE_LAB)).toBeLessThan(0.2);
  });

  it("flags a region of two colours: non-uniform at equal lightness, much rejected at different lightness; and a tiny region", async () => {
    const twoHues = (x: number): LinearRgb => labToLinearSrgb(x < 50 ? [50, 50, 30] : [50, -40, 40], "D65");
    const hues = await decodePhoto(await encode(render({ width: 100, height: 40, depth: 8, paint: twoHues, noise: 1 }), 100, 40, "png"));
    expect(measureRegion(hues, { shape: "rect", x: 0, y: 0, w: 100, h: 40 }).flags).toContain("non-uniform");
    const twoLightness = (x: number): LinearRgb => labToLinearSrgb(x < 40 ? [35, 20, 10] : [60, 20, 10], "D65");
    const light = await decodePhoto(await encode(render({ width: 100, height: 40, depth: 8, paint: twoLightness, noise: 1 }), 100, 40, "png"));
    expect(measureRegion(light, { shape: "rect", x: 0, y: 0, w: 100, h: 40 }).flags).toContain("much-rejected");
    expect(measureRegion(hues, { shape: "rect", x: 5, y: 5, w: 5, h: 5 }).flags).toContain("too-few-pixels");
  });

  it("flags a corrected colour outside the sRGB gamut", () => {
    const stats = { linearRgb: [0.5, 0.2, 0.1] as LinearRgb, pixels: 100, rejected: 0, spread: 0, flags: [] };
    const colour = colourOfRegion(stats, { kind: "white-scaling", gains: [3, 1, 1] }, "D65");
    expect(colour.flags).toContain("out-of-srgb-gamut");
  });
});

describe("EXIF reading", () => {
  it("never throws on damaged EXIF blocks and reads nothing from them", () => {
    let seed = 7;
    for (let k = 0; k < 200; k++) {
      const block = new Uint8Array(64).map(() => ((seed = (seed * 1103515245 + 12345) & 0x7fffffff) >> 16) & 0xff);
      block.set([0x49, 0x49, 0x2a, 0x00], 0);
      expect(() => parseExif(block)).not.toThrow();
    }
    expect(parseExif(new Uint8Array([1, 2, 3]))).toEqual({});
    expect(parseExif(undefined)).toEqual({});
  });
});

describe("photo input is refused cleanly", () => {
  const regionOn = async (region: RegionSpec) => {
    const photo = await decodePhoto(await encode(render({ width: 50, height: 40, depth: 8, paint: () => sampleRgb, noise: 0 }), 50, 40, "png"));
    return () => measureRegion(photo, region);
  };

  it("refuses empty input, non-images, SVG and GIF by their bytes", async () => {
    await expect(decodePhoto(new Uint8Array())).rejects.toThrow(/empty/);
    await expect(decodePhoto(new TextEncoder().encode("hello, not an image"))).rejects.toThrow(ColorInputError);
    const svg = new TextEncoder().encode('<svg xmlns="http://www.w3.org/2000/svg" width="10" height="10"/>');
    await expect(decodePhoto(svg)).rejects.toThrow(/not a JPEG, PNG, WebP or TIFF/);
    const gif = new Uint8Array(await sharp({ create: { width: 4, height: 4, channels: 3, background: "red" } }).gif().toBuffer());
    await expect(decodePhoto(gif)).rejects.toThrow(/not a JPEG, PNG, WebP or TIFF/);
    expect(sniffPhotoFormat(gif)).toBeNull();
  });

  it("refuses truncated JPEG and PNG data", async () => {
    const pixels = render({ width: 64, height: 64, depth: 8, paint: vial, noise: 3 });
    for (const format of ["jpeg", "png"] as const) {
      const bytes = await encode(pixels, 64, 64, format);
      await expect(decodePhoto(bytes.subarray(0, Math.floor(bytes.length * 0.6)))).rejects.toThrow(/truncated or damaged/);
    }
  });

  it("refuses an image above the pixel limit", async () => {
    const bytes = await encode(render({ width: 50, height: 40, depth: 8, paint: () => sampleRgb, noise: 0 }), 50, 40, "png");
    await expect(decodePhoto(bytes, { maxPixels: 1000 })).rejects.toThrow(/more than 1000 pixels/);
  });

  it("refuses regions off the image, empty or not numbers", async () => {
    await expect(regionOn({ shape: "rect", x: 40, y: 0, w: 20, h: 10 })).resolves.toThrow(/outside the 50×40 image/);
    await expect(regionOn({ shape: "rect", x: -1, y: 0, w: 10, h: 10 })).resolves.toThrow(ColorInputError);
    await expect(regionOn({ shape: "rect", x: 0, y: 0, w: 0, h: 10 })).resolves.toThrow(/empty/);
    await expect(regionOn({ shape: "ellipse", x: 0, y: 0, w: Number.NaN, h: 10 })).resolves.toThrow(/not a number/);
  });

  it("refuses a region whose every pixel is clipped", async () => {
    const photo = await decodePhoto(await encode(render({ width: 20, height: 20, depth: 8, paint: () => [1, 1, 1], noise: 0 }), 20, 20, "png"));
    expect(() => measureRegion(photo, { shape: "rect", x: 0, y: 0, w: 20, h: 20 })).toThrow(/clipped/);
  });
});
