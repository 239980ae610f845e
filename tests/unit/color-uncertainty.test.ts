/**
 * Uncertainty of a photographed colour (lib/color/uncertainty.ts) checked against what repeated
 * photographs actually scatter by: the same vial rendered again and again with fresh pixel noise
 * through a synthetic non-sRGB camera, measured by the engine and corrected by a calibration fitted
 * from a card whose reference values come from the CIE tables in tests/fixtures. The prediction
 * (law of propagation, GUM §5.1.2) and the observed spread are obtained by different routes, so the
 * comparison can fail.
 */
import sharp from "sharp";
import { describe, expect, it } from "vitest";
import { applyCalibration, fitCalibration, whiteAdaptation } from "@/lib/color/calibration";
import { decodePhoto, measureRegion, type DecodedPhoto, type RegionStats } from "@/lib/color/regions";
import { renderSwatches, SYNTHETIC_CAMERAS } from "@/lib/color/synthetic-camera";
import type { Lab, Vec3 } from "@/lib/color/types";
import { colourUncertainty, effectivePixelCount, isTie, monteCarloDeltaE00, pixelsPerSampleFromAutocorrelation, rmsDeltaE00, type Cov3 } from "@/lib/color/uncertainty";
import { CARD, sceneXyzD65, spectrumLab, VIALS } from "../support/spectral-card";

const camera = SYNTHETIC_CAMERAS.coolPhone;
const WHITE = CARD.findIndex((p) => p.name === "grey 1");

function cardCalibration() {
  const r = renderSwatches(camera, { swatches: CARD.map((p) => sceneXyzD65(p.reflectance, "D65")), columns: 6, size: 40, gap: 8 }, 5);
  const photo: DecodedPhoto = { width: r.width, height: r.height, channels: 3, bitDepth: 8, data: r.data, format: "png", exif: {} };
  return fitCalibration(
    CARD.map((p, i) => {
      const s = measureRegion(photo, { shape: "rect", x: r.boxes[i][0] + 5, y: r.boxes[i][1] + 5, w: 30, h: 30 });
      return { name: p.name, camera: s.linearRgb, referenceLab: spectrumLab(p.reflectance, "D65") as Lab, clippedFraction: s.clippedFraction };
    }),
  );
}
const cal = cardCalibration();

/** One small photo of a vial and the white patch; regions of side `side` px. */
function shot(seed: number, side: number): { vial: RegionStats; white: RegionStats; raw: ReturnType<typeof renderSwatches> } {
  const raw = renderSwatches(camera, { swatches: [sceneXyzD65(VIALS[3].transmittance, "D65"), sceneXyzD65(CARD[WHITE].reflectance, "D65")], columns: 2, size: side + 4, gap: 4 }, seed);
  const photo: DecodedPhoto = { width: raw.width, height: raw.height, channels: 3, bitDepth: 8, data: raw.data, format: "png", exif: {} };
  const [vial, white] = raw.boxes.map(([x, y]) => measureRegion(photo, { shape: "rect", x: x + 2, y: y + 2, w: side, h: side }));
  return { vial, white, raw };
}

const whiteLab = spectrumLab(CARD[WHITE].reflectance, "D65") as Lab;
const toLab = (c: Vec3, ref?: Vec3) => applyCalibration(cal, c, ref ? whiteAdaptation(cal, ref, whiteLab, "D65") : undefined).labD65;
const sd = (xs: number[]) => {
  const m = xs.reduce((a, b) => a + b, 0) / xs.length;
  return Math.sqrt(xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1));
};

describe("pixel noise propagated through the calibration", () => {
  it("predicts the scatter of L*, a*, b* over repeated photos with independent pixel noise (within 35 %)", () => {
    const repeats = Array.from({ length: 60 }, (_, i) => shot(100 + i, 10));
    const labs = repeats.map((r) => toLab(r.vial.linearRgb, r.white.linearRgb));
    const observed = [0, 1, 2].map((k) => sd(labs.map((l) => l[k])));
    const first = repeats[0];
    const predicted = colourUncertainty({
      toLab,
      region: { camera: first.vial.linearRgb, sd: first.vial.sd as Vec3, pixels: first.vial.pixels - first.vial.rejected, pixelsPerSample: 1 },
      reference: { camera: first.white.linearRgb, sd: first.white.sd as Vec3, pixels: first.white.pixels - first.white.rejected, pixelsPerSample: 1 },
      calibrationLabRms: null,
    });
    const combined = [0, 1, 2].map((k) => Math.hypot(predicted.components.pixels[k], predicted.components.reference[k]));
    for (let k = 0; k < 3; k++) {
      expect(combined[k] / observed[k]).toBeGreaterThan(0.65);
      expect(combined[k] / observed[k]).toBeLessThan(1.35);
    }
  });

  it("is conservative for JPEG (8×8 blocks as one sample) but not absurdly so; the photo's autocorrelation comes closer", async () => {
    const labs: Lab[] = [];
    let predicted = 0;
    let fromAutocorrelation = 0;
    for (let i = 0; i < 24; i++) {
      const { raw } = shot(300 + i, 48);
      const jpeg = await sharp(Buffer.from(raw.data), { raw: { width: raw.width, height: raw.height, channels: 3 } }).jpeg({ quality: 85 }).toBuffer();
      const photo = await decodePhoto(jpeg);
      const [x, y] = raw.boxes[0];
      const vial = measureRegion(photo, { shape: "rect", x: x + 2, y: y + 2, w: 48, h: 48 });
      labs.push(toLab(vial.linearRgb));
      if (i === 0) {
        const u = colourUncertainty({ toLab: (c) => toLab(c), region: { camera: vial.linearRgb, sd: vial.sd as Vec3, pixels: vial.pixels - vial.rejected, encoding: "jpeg" }, calibrationLabRms: null });
        predicted = Math.hypot(...u.components.pixels);
        const perSample = pixelsPerSampleFromAutocorrelation(photo, { x: x + 2, y: y + 2, w: 48, h: 48 });
        const ua = colourUncertainty({ toLab: (c) => toLab(c), region: { camera: vial.linearRgb, sd: vial.sd as Vec3, pixels: vial.pixels - vial.rejected, pixelsPerSample: perSample }, calibrationLabRms: null });
        fromAutocorrelation = Math.hypot(...ua.components.pixels);
        console.log(`pixels per sample from autocorrelation: ${perSample.toFixed(1)}`);
      }
    }
    const observed = Math.hypot(...[0, 1, 2].map((k) => sd(labs.map((l) => l[k]))));
    console.log(`JPEG q85, 48×48 px: predicted pixel term ${predicted.toFixed(3)} (8×8 blocks), ${fromAutocorrelation.toFixed(3)} (autocorrelation) vs observed ${observed.toFixed(3)} (RSS of u(L*), u(a*), u(b*))`);
    expect(predicted).toBeGreaterThan(observed);
    expect(predicted).toBeLessThan(10 * observed);
    // The photo's own autocorrelation comes closer, still on the safe side of a factor 0.8.
    expect(fromAutocorrelation).toBeGreaterThan(0.8 * observed);
    expect(fromAutocorrelation).toBeLessThan(2 * observed);
  });

  it("finds about one pixel per sample when the pixel noise is independent (PNG, no demosaicing)", () => {
    const { raw } = shot(17, 60);
    const photo = { width: raw.width, height: raw.height, bitDepth: 8 as const, data: raw.data };
    const [x, y] = raw.boxes[0];
    expect(pixelsPerSampleFromAutocorrelation(photo, { x: x + 2, y: y + 2, w: 60, h: 60 })).toBeLessThan(1.3);
  });

  it("adds the calibration's leave-one-out RMS and never ends below it", () => {
    const { vial } = shot(7, 30);
    const u = colourUncertainty({ toLab, region: { camera: vial.linearRgb, sd: vial.sd as Vec3, pixels: vial.pixels }, calibrationLabRms: cal.looLabRmsD65 });
    expect(u.calibrationIncluded).toBe(true);
    for (let k = 0; k < 3; k++) expect(u.uLab[k]).toBeGreaterThanOrEqual((cal.looLabRmsD65 as Vec3)[k] - 1e-12);
    expect(u.uDeltaE00).toBeGreaterThan(0);
  });
});

describe("± ΔE00 from the L*, a*, b* covariance", () => {
  const cases: [Lab, Cov3][] = [
    [[60, 0, 0], [[0.25, 0, 0], [0, 0.09, 0.02], [0, 0.02, 0.16]]],
    [[45, 60, -40], [[0.4, 0.1, 0], [0.1, 1.2, -0.3], [0, -0.3, 0.9]]],
    [[85, -10, 70], [[0.04, 0, 0], [0, 0.3, 0], [0, 0, 0.6]]],
  ];
  it("agrees with a JCGM 101 Monte Carlo of 20 000 draws within 5 %", () => {
    for (const [lab, cov] of cases) {
      const sigma = rmsDeltaE00(lab, cov);
      const mc = monteCarloDeltaE00(lab, cov, 20000, 42);
      expect(Math.abs(sigma - mc) / mc).toBeLessThan(0.05);
    }
  });
  it("equals u(L*) for a neutral colour with uncertainty in L* only: ΔE00 = ΔL*/S_L and S_L = 1 at L* 50 (CIE 142-2001)", () => {
    expect(rmsDeltaE00([50, 0, 0], [[0.36, 0, 0], [0, 0, 0], [0, 0, 0]])).toBeCloseTo(0.6, 3);
  });
});

describe("ties and effective pixel counts", () => {
  it("calls two distances a tie only when they differ by less than their combined uncertainty", () => {
    expect(isTie({ deltaE00: 2.0, uncertaintyDeltaE00: 0.3 }, { deltaE00: 2.35, uncertaintyDeltaE00: 0.3 })).toBe(true);
    expect(isTie({ deltaE00: 2.0, uncertaintyDeltaE00: 0.3 }, { deltaE00: 2.5, uncertaintyDeltaE00: 0.3 })).toBe(false);
    expect(isTie({ deltaE00: 2.0, uncertaintyDeltaE00: 0.3 }, { deltaE00: 2.5, uncertaintyDeltaE00: 0.3 }, 2)).toBe(true);
    expect(isTie({ deltaE00: 1 }, { deltaE00: 1.0001 })).toBe(false);
  });
  it("counts an 8×8 JPEG block (ITU-T T.81) and a 2×2 Bayer cell as one sample", () => {
    expect(effectivePixelCount(6400, "jpeg")).toBe(100);
    expect(effectivePixelCount(6400, "png")).toBe(1600);
    expect(effectivePixelCount(10, "jpeg")).toBe(1);
  });
});

describe("pixels per sample inside measureRegion", () => {
  it("comes with every region and ignores the background around an ellipse", () => {
    const { raw } = shot(23, 60);
    const photo: DecodedPhoto = { width: raw.width, height: raw.height, channels: 3, bitDepth: 8, data: raw.data, format: "png", exif: {} };
    const [x, y, w, h] = raw.boxes[0];
    // The ellipse inscribed in the swatch's own box, and one reaching 2 px into the surround.
    const inside = measureRegion(photo, { shape: "ellipse", x, y, w, h });
    expect(inside.pixelsPerSample).toBeGreaterThanOrEqual(1);
    expect(inside.pixelsPerSample).toBeLessThan(1.3);
    const rect = measureRegion(photo, { shape: "rect", x: x - 2, y: y - 2, w: w + 4, h: h + 4 });
    expect(rect.pixelsPerSample as number).toBeGreaterThan(2);
  });
});
