import { describe, expect, it } from "vitest";
import {
  applyCorrection,
  correctionFromArray,
  correctionToArray,
  fitMatrix3x3,
  fitRootPolynomial,
  fitWhiteScaling,
  type Correction,
  type ReferencePatch,
} from "@/lib/color/correction";
import { labToLinearSrgb } from "@/lib/color/convert";
import { ColorInputError } from "@/lib/color/errors";
import { mat3Inverse, type Mat3 } from "@/lib/color/matrix";
import { mat3MulVec } from "@/lib/color/srgb";
import type { Lab } from "@/lib/color/types";

/**
 * Reference colours spread over hue and lightness, similar in range to a colour checker chart
 * (values chosen for the test, not a published chart).
 */
const CHART: Lab[] = [
  [38, 13, 14], [66, 18, 17], [50, -4, -22], [43, -13, 21], [55, 9, -25], [70, -33, 0],
  [62, 35, 57], [40, 10, -45], [51, 48, 16], [30, 23, -21], [72, -23, 57], [72, 19, 68],
  [29, 14, -50], [55, -38, 31], [42, 53, 28], [82, 4, 80], [52, 50, -14], [51, -28, -28],
  [96, 0, 0], [81, 0, 0], [66, 0, 0], [51, 0, 0], [35, 0, 0], [20, 0, 0],
];

/** A camera whose linear RGB is sRGB seen through a known mixing matrix (its inverse is the correction). */
const CAMERA: Mat3 = [
  [0.8, 0.15, 0.05],
  [0.1, 0.75, 0.15],
  [0.02, 0.18, 0.7],
];
const TRUE_CORRECTION = mat3Inverse(CAMERA);
const patchesThrough = (camera: Mat3, labs: Lab[] = CHART): ReferencePatch[] =>
  labs.map((referenceLab) => ({ measured: mat3MulVec(camera, labToLinearSrgb(referenceLab, "D65")), referenceLab }));

describe("3×3 least-squares colour correction", () => {
  it("recovers a known matrix exactly from noise-free patches, with zero residual ΔE00", () => {
    const fit = fitMatrix3x3(patchesThrough(CAMERA));
    expect(fit.correction.kind).toBe("matrix-3x3");
    if (fit.correction.kind !== "matrix-3x3") return;
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(fit.correction.matrix[i][j]).toBeCloseTo(TRUE_CORRECTION[i][j], 9);
    expect(fit.residuals).toHaveLength(CHART.length);
    for (const r of fit.residuals) expect(r.deltaE00).toBeLessThan(1e-6);
    expect(fit.condition).toBeLessThan(100);
  });

  it("works from the minimum of 4 patches", () => {
    const fit = fitMatrix3x3(patchesThrough(CAMERA, CHART.slice(6, 10)));
    if (fit.correction.kind !== "matrix-3x3") throw new Error("wrong kind");
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(fit.correction.matrix[i][j]).toBeCloseTo(TRUE_CORRECTION[i][j], 8);
  });

  it("reports non-zero residuals when the camera is not linear", () => {
    const patches = patchesThrough(CAMERA).map((p) => ({ ...p, measured: p.measured.map((v) => v ** 1.1) as typeof p.measured }));
    const fit = fitMatrix3x3(patches);
    const worst = Math.max(...fit.residuals.map((r) => r.deltaE00));
    expect(worst).toBeGreaterThan(0.3);
  });

  it("refuses fewer than 4 patches", () => {
    expect(() => fitMatrix3x3(patchesThrough(CAMERA, CHART.slice(0, 3)))).toThrow(/at least 4 reference patches/);
  });

  it("refuses ill-conditioned patches (all grey) with the reason", () => {
    const greys = patchesThrough(CAMERA, CHART.slice(18));
    expect(() => fitMatrix3x3(greys)).toThrow(ColorInputError);
    expect(() => fitMatrix3x3(greys)).toThrow(/too alike.*condition number/);
    // Greys with camera-like noise (±0.002 linear, fixed pattern) are just as unusable.
    const jitter = [0.002, -0.0015, 0.001, -0.002, 0.0005, 0.0018, -0.001, 0.0012, -0.0005];
    const noisy = greys.map((p, i) => ({ ...p, measured: p.measured.map((v, c) => v + jitter[(i * 3 + c) % 9]) as typeof p.measured }));
    expect(() => fitMatrix3x3(noisy)).toThrow(/too alike/);
  });

  it("refuses patches with values that are not numbers", () => {
    const bad = patchesThrough(CAMERA);
    bad[2] = { ...bad[2], measured: [Number.NaN, 0.2, 0.2] };
    expect(() => fitMatrix3x3(bad)).toThrow(/patch 3/);
  });
});

describe("root-polynomial correction (Finlayson, Mackiewicz & Hurlbert, IEEE TIP 24 (2015) 1460)", () => {
  it("reproduces a linear camera exactly (the linear terms suffice)", () => {
    const fit = fitRootPolynomial(patchesThrough(CAMERA), 2);
    for (const r of fit.residuals) expect(r.deltaE00).toBeLessThan(1e-4);
  });

  it("is exposure-invariant: scaling the camera RGB by k scales the corrected RGB by k (the paper's key property)", () => {
    const patches = patchesThrough(CAMERA).map((p) => ({ ...p, measured: p.measured.map((v) => v ** 1.1) as typeof p.measured }));
    for (const degree of [2] as const) {
      const { correction } = fitRootPolynomial(patches, degree);
      const rgb = patches[7].measured;
      const once = applyCorrection(correction, rgb);
      const dimmer = applyCorrection(correction, [rgb[0] * 0.5, rgb[1] * 0.5, rgb[2] * 0.5]);
      for (let c = 0; c < 3; c++) expect(dimmer[c]).toBeCloseTo(once[c] * 0.5, 10);
    }
  });

  it("fits a non-linear camera better than the 3×3 matrix", () => {
    const patches = patchesThrough(CAMERA).map((p) => ({ ...p, measured: p.measured.map((v) => v ** 1.15) as typeof p.measured }));
    const mean = (xs: { deltaE00: number }[]) => xs.reduce((s, r) => s + r.deltaE00, 0) / xs.length;
    expect(mean(fitRootPolynomial(patches, 2).residuals)).toBeLessThan(mean(fitMatrix3x3(patches).residuals));
  });

  it("needs three patches per term: degree 2 refused below 18 patches, degree 3 refused on a 24-patch chart", () => {
    expect(() => fitRootPolynomial(patchesThrough(CAMERA, CHART.slice(0, 17)), 2)).toThrow(/at least 18/);
    expect(() => fitRootPolynomial(patchesThrough(CAMERA), 3)).toThrow(/at least 39/);
  });
});

describe("white/grey scaling (von Kries)", () => {
  it("maps the reference exactly onto its Lab and scales other colours channel by channel", () => {
    const grey: Lab = [80, 0, 0];
    const target = labToLinearSrgb(grey, "D65");
    const measured: [number, number, number] = [target[0] * 1.3, target[1], target[2] * 0.6];
    const fit = fitWhiteScaling({ measured, referenceLab: grey });
    expect(fit.residuals[0].deltaE00).toBeLessThan(1e-9);
    if (fit.correction.kind !== "white-scaling") throw new Error("wrong kind");
    expect(fit.correction.gains[0]).toBeCloseTo(1 / 1.3, 12);
    expect(fit.correction.gains[2]).toBeCloseTo(1 / 0.6, 12);
  });

  it("refuses a reference too dark to scale by", () => {
    expect(() => fitWhiteScaling({ measured: [0.5, 0.001, 0.5], referenceLab: [80, 0, 0] })).toThrow(/too dark in the green channel/);
  });
});

describe("correction storage", () => {
  const corrections: Correction[] = [
    { kind: "none" },
    { kind: "white-scaling", gains: [1.1, 1, 0.9] },
    { kind: "matrix-3x3", matrix: TRUE_CORRECTION },
    { kind: "root-polynomial", terms: [0, 1, 2].map((i) => Array.from({ length: 13 }, (_, k) => (i === k ? 1 : 0.01 * k))) },
  ];

  it.each(corrections)("round-trips $kind through a flat number array", (c) => {
    const { kind, values } = correctionToArray(c);
    const back = correctionFromArray(kind, values);
    expect(back).toEqual(c);
    expect(applyCorrection(back, [0.2, 0.4, 0.6])).toEqual(applyCorrection(c, [0.2, 0.4, 0.6]));
  });

  it("refuses arrays that do not fit their kind", () => {
    expect(() => correctionFromArray("matrix-3x3", [1, 2, 3])).toThrow(ColorInputError);
    expect(() => correctionFromArray("root-polynomial", [1, 2, 3, 4])).toThrow(ColorInputError);
    expect(() => correctionFromArray("gamma", [])).toThrow(/not a known correction/);
  });
});
