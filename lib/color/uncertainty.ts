/**
 * Uncertainty of a photographed colour, after the Guide to the expression of uncertainty in
 * measurement (JCGM 100:2008, "GUM") and its Supplement 1 (JCGM 101:2008, propagation of
 * distributions).
 *
 * Three contributions, treated as independent (GUM §5.1):
 * 1. The region's own pixel noise: the standard uncertainty of its mean per camera channel is
 *    sd / √N_eff (GUM §4.2.3, Type A), with an effective pixel count N_eff because neighbouring
 *    pixels of a photo are not independent: from the photo's own autocorrelation where the pixels
 *    are at hand (`pixelsPerSampleFromAutocorrelation`; on a JPEG test it came within 20 % of the
 *    observed scatter), otherwise by the encoding's block size (`effectivePixelCount`, about 2.7×
 *    too large on the same test, i.e. safe).
 * 2. The white reference's pixel noise, when the day's white reference scales the result.
 * 3. The calibration: the root mean square of its leave-one-out errors in L*, a*, b* over the card's
 *    patches (a Type A evaluation of how far a colour not in the fit lands from its known value).
 *
 * 1 and 2 are carried through the whole chain (tone curve, correction, CIELAB) by the law of
 * propagation of uncertainty with a numerical Jacobian (GUM §5.1.2, eq. 10, sensitivity coefficients
 * by central differences, GUM §5.1.3 note). The combined ± ΔE00 figure is the root mean square
 * CIEDE2000 distance from the estimate over the resulting normal distribution of L*, a*, b*,
 * evaluated at symmetric sigma points (exact for a locally quadratic ΔE00², which CIEDE2000 is for
 * small differences); `monteCarloDeltaE00` checks it by JCGM 101 Monte Carlo.
 */
import { deltaE00 } from "./difference";
import { gaussian, mulberry32 } from "../random";
import type { Lab, LinearRgb, Vec3 } from "./types";

export type PhotoEncoding = "jpeg" | "webp" | "png" | "tiff";

/**
 * Pixels per independent sample. JPEG (and lossy WebP) code every 8×8 block of a channel from one
 * set of quantised DCT coefficients (ITU-T T.81, 1992, §A.2), so the noise of the 64 pixels of a
 * block is strongly correlated: one block is taken as one independent sample, which errs on the safe
 * side (the block means of neighbouring blocks are close to independent). Lossless PNG/TIFF from a
 * camera are still demosaiced from a Bayer mosaic (B. E. Bayer, US patent 3,971,065, 1976), where
 * each pixel's two missing colours come from its neighbours: a 2×2 cell is taken as one sample.
 * Both are practitioner's choices, stated here rather than measured per photo.
 */
export const PIXELS_PER_SAMPLE: Record<PhotoEncoding, number> = { jpeg: 64, webp: 64, png: 4, tiff: 4 };

/** N_eff = N / pixels per sample, at least 1. */
export function effectivePixelCount(pixels: number, encoding: PhotoEncoding = "jpeg"): number {
  return Math.max(1, pixels / PIXELS_PER_SAMPLE[encoding]);
}

/** A measured region as the uncertainty needs it: mean, per-channel pixel SD (same scale), pixel count. */
export type RegionSample = {
  camera: LinearRgb;
  sd: LinearRgb;
  /** Pixels the mean was taken over (accepted pixels). */
  pixels: number;
  encoding?: PhotoEncoding;
  /** Overrides the encoding's pixels per independent sample (e.g. 1 for independent pixel noise). */
  pixelsPerSample?: number;
};

/** Standard uncertainty of the region mean per channel (GUM §4.2.3): sd / √N_eff. */
export function meanStandardUncertainty(region: RegionSample): Vec3 {
  const n = region.pixelsPerSample ? Math.max(1, region.pixels / region.pixelsPerSample) : effectivePixelCount(region.pixels, region.encoding ?? "jpeg");
  return region.sd.map((s) => Math.max(0, s) / Math.sqrt(n)) as Vec3;
}

/** 3×3 covariance matrix (symmetric). */
export type Cov3 = [Vec3, Vec3, Vec3];

const zero3 = (): Cov3 => [
  [0, 0, 0],
  [0, 0, 0],
  [0, 0, 0],
];

/**
 * Law of propagation of uncertainty (GUM §5.1.2) for Lab = f(x) with independent inputs x_j of
 * standard uncertainty u_j: Σ_Lab = J·diag(u²)·Jᵀ, J by central differences with a step of u_j
 * (so the derivative is the secant over the input's own spread, which also covers mild curvature).
 */
export function propagate(f: (x: number[]) => Lab, x: readonly number[], u: readonly number[]): Cov3 {
  const cov = zero3();
  for (let j = 0; j < x.length; j++) {
    if (!(u[j] > 0)) continue;
    const hi = x.slice();
    const lo = x.slice();
    hi[j] += u[j];
    lo[j] = Math.max(0, lo[j] - u[j]);
    const step = hi[j] - lo[j];
    const a = f(hi);
    const b = f(lo);
    const col = [0, 1, 2].map((k) => ((a[k] - b[k]) / step) * u[j]);
    for (let p = 0; p < 3; p++) for (let q = 0; q < 3; q++) cov[p][q] += col[p] * col[q];
  }
  return cov;
}

/** Eigen-decomposition of a symmetric 3×3 by Jacobi rotations: columns of `vectors` pair with `values`. */
function eigenSymmetric3(m: Cov3): { values: Vec3; vectors: Cov3 } {
  const a = m.map((r) => r.slice()) as Cov3;
  const v: Cov3 = [
    [1, 0, 0],
    [0, 1, 0],
    [0, 0, 1],
  ];
  for (let sweep = 0; sweep < 50; sweep++) {
    const off = a[0][1] ** 2 + a[0][2] ** 2 + a[1][2] ** 2;
    if (off < 1e-24) break;
    for (const [p, q] of [
      [0, 1],
      [0, 2],
      [1, 2],
    ]) {
      if (Math.abs(a[p][q]) < 1e-300) continue;
      const theta = (a[q][q] - a[p][p]) / (2 * a[p][q]);
      const t = Math.sign(theta || 1) / (Math.abs(theta) + Math.sqrt(theta * theta + 1));
      const c = 1 / Math.sqrt(t * t + 1);
      const s = t * c;
      for (let k = 0; k < 3; k++) {
        const akp = a[k][p];
        const akq = a[k][q];
        a[k][p] = c * akp - s * akq;
        a[k][q] = s * akp + c * akq;
      }
      for (let k = 0; k < 3; k++) {
        const apk = a[p][k];
        const aqk = a[q][k];
        a[p][k] = c * apk - s * aqk;
        a[q][k] = s * apk + c * aqk;
      }
      for (let k = 0; k < 3; k++) {
        const vkp = v[k][p];
        const vkq = v[k][q];
        v[k][p] = c * vkp - s * vkq;
        v[k][q] = s * vkp + c * vkq;
      }
    }
  }
  return { values: [Math.max(0, a[0][0]), Math.max(0, a[1][1]), Math.max(0, a[2][2])], vectors: v };
}

/**
 * Root mean square ΔE00 from `lab` over N(lab, cov): with cov = Σ λ_k e_k e_kᵀ and ΔE00² locally
 * quadratic, E[ΔE00²] = Σ_k ½(ΔE00(lab + √λ_k e_k)² + ΔE00(lab − √λ_k e_k)²) (symmetric sigma points).
 */
export function rmsDeltaE00(lab: Lab, cov: Cov3): number {
  const { values, vectors } = eigenSymmetric3(cov);
  let total = 0;
  for (let k = 0; k < 3; k++) {
    const s = Math.sqrt(values[k]);
    if (s === 0) continue;
    const d: Vec3 = [vectors[0][k] * s, vectors[1][k] * s, vectors[2][k] * s];
    const plus = deltaE00(lab, [lab[0] + d[0], lab[1] + d[1], lab[2] + d[2]]);
    const minus = deltaE00(lab, [lab[0] - d[0], lab[1] - d[1], lab[2] - d[2]]);
    total += (plus * plus + minus * minus) / 2;
  }
  return Math.sqrt(total);
}

/**
 * JCGM 101:2008 Monte Carlo check of `rmsDeltaE00`: draws L*, a*, b* from N(lab, cov) (Cholesky)
 * with a seeded generator and returns the root mean square ΔE00 from `lab`.
 */
export function monteCarloDeltaE00(lab: Lab, cov: Cov3, draws = 20000, seed = 1): number {
  const random = mulberry32(seed);
  const l = zero3();
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j <= i; j++) {
      let s = cov[i][j];
      for (let k = 0; k < j; k++) s -= l[i][k] * l[j][k];
      l[i][j] = i === j ? Math.sqrt(Math.max(0, s)) : l[j][j] > 0 ? s / l[j][j] : 0;
    }
  }
  let total = 0;
  for (let n = 0; n < draws; n++) {
    const z = [gaussian(random), gaussian(random), gaussian(random)];
    const d = [0, 1, 2].map((i) => l[i][0] * z[0] + l[i][1] * z[1] + l[i][2] * z[2]);
    const e = deltaE00(lab, [lab[0] + d[0], lab[1] + d[1], lab[2] + d[2]]);
    total += e * e;
  }
  return Math.sqrt(total / draws);
}

export type ColourUncertainty = {
  /** Standard uncertainties u(L*), u(a*), u(b*). */
  uLab: Vec3;
  /** Combined standard uncertainty as a colour difference: root mean square ΔE00 (see module comment). */
  uDeltaE00: number;
  /** The contributions' standard uncertainties in L*, a*, b*, for showing where the doubt comes from. */
  components: { pixels: Vec3; reference: Vec3; calibration: Vec3 };
  /** False when no calibration stands behind the colour: its systematic error is then unknown and not included. */
  calibrationIncluded: boolean;
  /** Full covariance of L*, a*, b*. */
  covariance: Cov3;
};

const diag = (c: Cov3): Vec3 => [Math.sqrt(c[0][0]), Math.sqrt(c[1][1]), Math.sqrt(c[2][2])];

/**
 * The uncertainty of one photographed colour. `toLab(camera, referenceCamera?)` is the whole
 * measurement chain (calibration, white scaling, CIELAB in the white the result is stated in);
 * `calibrationLabRms` is the calibration's leave-one-out RMS per coordinate (null: no calibration).
 */
export function colourUncertainty(args: {
  toLab: (camera: LinearRgb, referenceCamera?: LinearRgb) => Lab;
  region: RegionSample;
  reference?: RegionSample;
  calibrationLabRms: Vec3 | null;
}): ColourUncertainty & { lab: Lab } {
  const { region, reference } = args;
  const x = [...region.camera, ...(reference ? reference.camera : [])];
  const u = [...meanStandardUncertainty(region), ...(reference ? meanStandardUncertainty(reference) : [])];
  const f = (v: number[]) => args.toLab([v[0], v[1], v[2]], reference ? [v[3], v[4], v[5]] : undefined);
  const lab = f(x);
  const pixels = propagate(f, x, [u[0], u[1], u[2], 0, 0, 0].slice(0, x.length));
  const ref = reference ? propagate(f, x, [0, 0, 0, u[3], u[4], u[5]]) : zero3();
  const calRms = args.calibrationLabRms ?? ([0, 0, 0] as Vec3);
  const total = zero3();
  for (let p = 0; p < 3; p++) for (let q = 0; q < 3; q++) total[p][q] = pixels[p][q] + ref[p][q] + (p === q ? calRms[p] ** 2 : 0);
  return {
    lab,
    uLab: diag(total),
    uDeltaE00: rmsDeltaE00(lab, total),
    components: { pixels: diag(pixels), reference: diag(ref), calibration: calRms },
    calibrationIncluded: args.calibrationLabRms !== null,
    covariance: total,
  };
}

/** ± ΔE00 from u(L*), u(a*), u(b*) alone (no covariances), e.g. for stored measurements. */
export function deltaE00Uncertainty(lab: Lab, uLab: Vec3): number {
  return rmsDeltaE00(lab, [
    [uLab[0] ** 2, 0, 0],
    [0, uLab[1] ** 2, 0],
    [0, 0, uLab[2] ** 2],
  ]);
}

/**
 * Whether two search distances are a tie: their difference is within the combined standard
 * uncertainty √(u₁² + u₂²) times the coverage factor k (GUM §6.2; k = 1 by default, the rule
 * "differ by less than their combined uncertainty"; k = 2 for about 95 % coverage). Missing
 * uncertainties count as 0, so two exact numbers are never a tie unless equal.
 */
export function isTie(a: { deltaE00: number; uncertaintyDeltaE00?: number | null }, b: { deltaE00: number; uncertaintyDeltaE00?: number | null }, k = 1): boolean {
  const ua = a.uncertaintyDeltaE00 ?? 0;
  const ub = b.uncertaintyDeltaE00 ?? 0;
  return Math.abs(a.deltaE00 - b.deltaE00) <= k * Math.sqrt(ua * ua + ub * ub);
}

/**
 * Pixels per independent sample estimated from the photo itself: the lag-1 autocorrelations ρx, ρy
 * of the pixel values along rows and columns inside the region (each channel, averaged), and for an
 * AR(1)-like correlation the variance of a mean of N pixels is that of N·(1 − ρx)(1 − ρy) /
 * ((1 + ρx)(1 + ρy)) independent ones (G. V. Bayley and J. M. Hammersley, "The 'effective' number of
 * independent observations in an autocorrelated time series", J. R. Stat. Soc. Suppl. 8(2), 184–197,
 * 1946; applied per image axis). Negative correlations count as 0 (never fewer pixels per sample
 * than 1); ρ is capped at 0.95. Works on the region's box (for an ellipse the rectangle inscribed
 * in it), its central 96 × 96 pixels when larger (to bound the cost), pixels at either end of the
 * code range left out.
 */
export function pixelsPerSampleFromAutocorrelation(
  photo: { width: number; height: number; bitDepth: 8 | 16; data: Uint8Array | Uint16Array },
  box: { x: number; y: number; w: number; h: number; shape?: "rect" | "ellipse" },
): number {
  const max = photo.bitDepth === 16 ? 65535 : 255;
  const WINDOW = 96;
  const cx = box.x + box.w / 2;
  const cy = box.y + box.h / 2;
  // An ellipse's bounding box holds background in its corners: use the rectangle inscribed in it.
  const inscribed = box.shape === "ellipse" ? Math.SQRT1_2 : 1;
  const w = Math.min(box.w * inscribed, WINDOW);
  const h = Math.min(box.h * inscribed, WINDOW);
  const x0 = Math.max(0, Math.round(cx - w / 2));
  const y0 = Math.max(0, Math.round(cy - h / 2));
  const x1 = Math.min(photo.width, Math.round(cx + w / 2));
  const y1 = Math.min(photo.height, Math.round(cy + h / 2));
  if (x1 - x0 < 3 || y1 - y0 < 3) return 1;
  const { data, width } = photo;
  // One pass of raw moments per channel: Σv, Σv² over pixels; Σa, Σb, Σab over horizontal and
  // vertical neighbour pairs (cov = E[ab] − E[a]E[b]); codes at either end of the range are skipped.
  const rho = [0, 0];
  for (let c = 0; c < 3; c++) {
    let n = 0;
    let s1 = 0;
    let s2 = 0;
    let nx = 0;
    let ax = 0;
    let bx = 0;
    let abx = 0;
    let ny = 0;
    let ay = 0;
    let by = 0;
    let aby = 0;
    for (let y = y0; y < y1; y++) {
      const row = y * width;
      for (let x = x0; x < x1; x++) {
        const v = data[(row + x) * 3 + c];
        if (v === 0 || v === max) continue;
        n++;
        s1 += v;
        s2 += v * v;
        if (x + 1 < x1) {
          const r = data[(row + x + 1) * 3 + c];
          if (r !== 0 && r !== max) {
            nx++;
            ax += v;
            bx += r;
            abx += v * r;
          }
        }
        if (y + 1 < y1) {
          const d = data[(row + width + x) * 3 + c];
          if (d !== 0 && d !== max) {
            ny++;
            ay += v;
            by += d;
            aby += v * d;
          }
        }
      }
    }
    if (n < 9) return 1;
    const variance = s2 / n - (s1 / n) ** 2;
    if (!(variance > 0)) return 1;
    if (nx) rho[0] += (abx / nx - (ax / nx) * (bx / nx)) / variance / 3;
    if (ny) rho[1] += (aby / ny - (ay / ny) * (by / ny)) / variance / 3;
  }
  const factor = (r: number) => {
    const p = Math.min(0.95, Math.max(0, r));
    return (1 + p) / (1 - p);
  };
  return factor(rho[0]) * factor(rho[1]);
}
