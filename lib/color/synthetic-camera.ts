/**
 * A synthetic camera that is deliberately not sRGB, for tests, end-to-end card photos and demo data:
 * scene colours (CIE XYZ relative to D65, Y of white = 100) pass through
 *
 * 0. the sensor's native primaries, wide enough for every surface colour (ROMM RGB, ISO 22028-2:2013;
 *    K. E. Spaulding, G. J. Woolfe, E. J. Giorgianni, "Reference input/output medium metric RGB color
 *    encodings (RIMM/ROMM RGB)", PICS 2000), so saturated colours outside sRGB still give light,
 * 1. a cross-talk matrix (the sensor's channels overlap: each sees some of the others' light),
 * 2. the light's colour (a gain per channel: a warm lamp gives more red than blue),
 * 3. an exposure error (one factor on all channels),
 * 4. a tone curve that is not sRGB's (a phone-like contrast S-curve on a 1/2.2 power by default),
 * 5. 8-bit quantisation with Gaussian pixel noise (seeded, so the same seed gives the same photo).
 *
 * It is a generator of test data, not a model of a particular camera; every number is invented.
 * Pure: the raw pixels it returns can be encoded to PNG or JPEG by the caller (sharp).
 */
import { gaussian, mulberry32 } from "../random";
import { XYZ_D65_TO_D50 } from "./convert";
import { mat3Mul, type Mat3 } from "./matrix";
import { mat3MulVec, srgbEncode } from "./srgb";
import type { LinearRgb, Vec3, Xyz } from "./types";

export type SyntheticTone =
  /** IEC 61966-2-1 sRGB encoding: the camera Solvatlas assumes when nothing is calibrated. */
  | { kind: "srgb" }
  /** A pure power law e = v^(1/gamma). */
  | { kind: "gamma"; gamma: number }
  /**
   * A power law followed by a cubic contrast S-curve s(g) = g + c·g(1 − g)(2g − 1), which darkens
   * shadows and brightens highlights around mid-scale; monotone for 0 ≤ c < 1.
   */
  | { kind: "s-curve"; gamma: number; contrast: number };

export type SyntheticCamera = {
  name: string;
  /** Rows: camera R, G, B as mixtures of linear sRGB R, G, B. */
  crossTalk: Mat3;
  /** The light's colour as per-channel gains. */
  light: Vec3;
  /** Exposure factor (1 = as metered; 1.3 = a third over). */
  exposure: number;
  tone: SyntheticTone;
  /** Pixel noise, standard deviation in 8-bit code values. */
  noise: number;
};

/** Applies a synthetic tone curve to a linear value (clipped to 0–1 first, as a sensor clips). */
export function syntheticToneEncode(tone: SyntheticTone, v: number): number {
  const x = Math.min(1, Math.max(0, v));
  if (tone.kind === "srgb") return srgbEncode(x);
  const g = Math.pow(x, 1 / tone.gamma);
  if (tone.kind === "gamma") return g;
  return g + tone.contrast * g * (1 - g) * (2 * g - 1);
}

/** XYZ D50 → linear ROMM RGB (ISO 22028-2:2013), white D50 → 1, 1, 1. */
const XYZ_D50_TO_ROMM: Mat3 = [
  [1.3460, -0.2556, -0.0511],
  [-0.5446, 1.5082, 0.0205],
  [0, 0, 1.2123],
];
const XYZ_D65_TO_SENSOR: Mat3 = mat3Mul(XYZ_D50_TO_ROMM, XYZ_D65_TO_D50);

/** The sensor's linear response to a scene colour (before the tone curve; may exceed 1: clipping). */
export function sensorLinear(camera: SyntheticCamera, xyzD65: Xyz): LinearRgb {
  const rgb = mat3MulVec(camera.crossTalk, mat3MulVec(XYZ_D65_TO_SENSOR, [xyzD65[0] / 100, xyzD65[1] / 100, xyzD65[2] / 100]));
  return rgb.map((v, c) => Math.max(0, v) * camera.light[c] * camera.exposure) as LinearRgb;
}

/** Noise-free encoded value (0–1) of a scene colour. */
export function cameraEncoded(camera: SyntheticCamera, xyzD65: Xyz): Vec3 {
  return sensorLinear(camera, xyzD65).map((v) => syntheticToneEncode(camera.tone, v)) as Vec3;
}

/** Cameras used by the tests and the demo: invented, named after what they do. */
export const SYNTHETIC_CAMERAS = {
  /** A phone under a warm lamp, a third of a stop under, with a contrasty tone curve. */
  warmPhone: {
    name: "phone, warm lamp, −⅓ stop, S-curve",
    crossTalk: [
      [0.82, 0.14, 0.04],
      [0.1, 0.78, 0.12],
      [0.03, 0.2, 0.77],
    ],
    light: [1.0, 0.88, 0.6],
    exposure: 0.8,
    tone: { kind: "s-curve", gamma: 2.2, contrast: 0.5 },
    noise: 2,
  },
  /** A phone under a cool LED panel, under-exposed, strong cross-talk, gentler contrast. */
  coolPhone: {
    name: "phone, cool LED, −½ stop, strong cross-talk",
    crossTalk: [
      [0.7, 0.24, 0.06],
      [0.16, 0.68, 0.16],
      [0.05, 0.25, 0.7],
    ],
    light: [0.85, 1.0, 1.15],
    exposure: 0.72,
    tone: { kind: "s-curve", gamma: 2.0, contrast: 0.35 },
    noise: 3,
  },
  /** A machine-vision camera with a plain 1/1.8 power law and mild cross-talk. */
  powerLaw: {
    name: "camera, neutral light, gamma 1.8",
    crossTalk: [
      [0.9, 0.08, 0.02],
      [0.05, 0.9, 0.05],
      [0.02, 0.08, 0.9],
    ],
    light: [1.0, 1.0, 0.95],
    exposure: 0.85,
    tone: { kind: "gamma", gamma: 1.8 },
    noise: 1.5,
  },
} satisfies Record<string, SyntheticCamera>;

export type SwatchLayout = {
  /** Scene colours, XYZ relative to D65 (Y of white = 100), laid out row by row. */
  swatches: Xyz[];
  columns: number;
  /** Side of one swatch in pixels. */
  size: number;
  /** Gap between swatches and border, in pixels (the black surround). */
  gap: number;
};

export type RenderedSwatches = {
  width: number;
  height: number;
  /** 8-bit RGB, interleaved, row-major. */
  data: Uint8Array;
  /** Each swatch's box (x, y, w, h) in pixels, in the order given. */
  boxes: [number, number, number, number][];
};

/**
 * Renders swatches on a near-black surround through a synthetic camera with seeded Gaussian pixel
 * noise, quantised to 8 bits.
 */
export function renderSwatches(camera: SyntheticCamera, layout: SwatchLayout, seed = 1): RenderedSwatches {
  const { swatches, columns, size, gap } = layout;
  const rows = Math.ceil(swatches.length / columns);
  const width = columns * size + (columns + 1) * gap;
  const height = rows * size + (rows + 1) * gap;
  const data = new Uint8Array(width * height * 3);
  const random = mulberry32(seed);
  const background = cameraEncoded(camera, [0.4, 0.42, 0.45]);
  const paint = (x0: number, y0: number, w: number, h: number, encoded: Vec3) => {
    for (let y = y0; y < y0 + h; y++) {
      for (let x = x0; x < x0 + w; x++) {
        const o = (y * width + x) * 3;
        for (let c = 0; c < 3; c++) data[o + c] = Math.min(255, Math.max(0, Math.round(encoded[c] * 255 + camera.noise * gaussian(random))));
      }
    }
  };
  paint(0, 0, width, height, background);
  const boxes: [number, number, number, number][] = swatches.map((xyz, i) => {
    const x = gap + (i % columns) * (size + gap);
    const y = gap + Math.floor(i / columns) * (size + gap);
    paint(x, y, size, size, cameraEncoded(camera, xyz));
    return [x, y, size, size];
  });
  return { width, height, data, boxes };
}
