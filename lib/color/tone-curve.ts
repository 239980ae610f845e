/**
 * Tone linearisation: a per-channel monotone curve from a camera's code value (as Solvatlas stores
 * it, sRGB-decoded, 0–1) to linear light, fitted to grey patches of known luminance.
 *
 * Why: a phone's JPEG is not sRGB-encoded. Its tone curve (an S-shaped contrast curve, a brightened
 * shadow, a rolled-off highlight) bends every channel, and no matrix applied afterwards can undo a
 * bend. The greys of a calibration card have known luminance Y, so each channel's curve can be
 * measured directly, as an opto-electronic conversion function (OECF) is measured from a grey scale
 * in ISO 14524:2009 ("Photography — Electronic still-picture cameras — Methods for measuring
 * opto-electronic conversion functions").
 *
 * The curve interpolates the greys in log–log coordinates (ln camera value → ln Y) with a monotone
 * piecewise-cubic Hermite interpolant (F. N. Fritsch and R. E. Carlson, "Monotone piecewise cubic
 * interpolation", SIAM J. Numer. Anal. 17(2), 238–246, 1980; slopes by Fritsch & Butland 1984, see
 * `monotoneSlopes`). Log–log because a power law (the usual shape of a tone curve over a stretch)
 * is a straight line there, so the curve stays smooth between widely spaced greys. Outside the
 * greys it continues as the straight line of its end tangent (a power law through the end grey,
 * linear-in-log extrapolation), which is monotone because the end slopes are never negative. A dye
 * vial on a backlight is often lighter than the card's white, so the upper end matters.
 *
 * Each channel is mapped onto the greys' luminance Y (white of the target = 1), so after
 * linearisation a neutral patch has equal R, G and B: the curve also white-balances. The colour
 * matrix that follows takes out the channel cross-talk.
 */
import { CalibrationError } from "./calibration-errors";
import type { LinearRgb } from "./types";

/** One channel's curve: knots in ln(camera value) → ln(Y) and the Hermite slopes at the knots. */
export type ChannelCurve = { lnCamera: number[]; lnY: number[]; slopes: number[] };

/** A per-channel tone curve; serialisable as it is. */
export type ToneCurve = {
  kind: "monotone-cubic-log-log";
  /** Red, green, blue. */
  channels: [ChannelCurve, ChannelCurve, ChannelCurve];
};

/** A grey patch for the tone curve: its camera value per channel and its reference luminance Y (0–1). */
export type GreyPoint = { name: string; camera: LinearRgb; luminance: number };

/** Camera values at or below this are treated as black: the log of zero has no meaning. */
const FLOOR = 1e-6;
/** Greys closer than this in ln(camera value) cannot be told apart (≈ 2 % in linear light). */
const MIN_LN_STEP = 0.02;

export const TONE_CURVE_MIN_GREYS = 3;

/**
 * Slopes of a monotone piecewise-cubic Hermite interpolant (PCHIP): at interior knots the weighted
 * harmonic mean of the neighbouring secants, zero where they differ in sign (F. N. Fritsch and
 * J. Butland, "A method for constructing local monotone piecewise cubic interpolants", SIAM J. Sci.
 * Stat. Comput. 5(2), 300–304, 1984); at the ends the one-sided three-point estimate, limited to
 * 3× the end secant; both satisfy the monotonicity conditions of Fritsch & Carlson (1980). The
 * harmonic mean follows a smooth curve more closely than Fritsch–Carlson's arithmetic mean with
 * uneven knot spacing, which a card's grey scale has in log coordinates.
 */
export function monotoneSlopes(x: readonly number[], y: readonly number[]): number[] {
  const n = x.length;
  const h: number[] = [];
  const delta: number[] = [];
  for (let i = 0; i < n - 1; i++) {
    h.push(x[i + 1] - x[i]);
    delta.push((y[i + 1] - y[i]) / h[i]);
  }
  const m: number[] = new Array(n).fill(0);
  if (n === 2) return [delta[0], delta[0]];
  for (let k = 1; k < n - 1; k++) {
    if (delta[k - 1] * delta[k] <= 0) continue;
    const w1 = 2 * h[k] + h[k - 1];
    const w2 = h[k] + 2 * h[k - 1];
    m[k] = (w1 + w2) / (w1 / delta[k - 1] + w2 / delta[k]);
  }
  const end = (h0: number, h1: number, d0: number, d1: number) => {
    let v = ((2 * h0 + h1) * d0 - h0 * d1) / (h0 + h1);
    if (Math.sign(v) !== Math.sign(d0)) v = 0;
    else if (Math.sign(d0) !== Math.sign(d1) && Math.abs(v) > Math.abs(3 * d0)) v = 3 * d0;
    return v;
  };
  m[0] = end(h[0], h[1], delta[0], delta[1]);
  m[n - 1] = end(h[n - 2], h[n - 3], delta[n - 2], delta[n - 3]);
  return m;
}

/** Cubic Hermite evaluation of one channel curve at ln(camera value) `t`, with linear ends. */
function evaluateLn(curve: ChannelCurve, t: number): number {
  const { lnCamera: x, lnY: y, slopes: m } = curve;
  const n = x.length;
  // A zero end tangent (allowed for monotonicity) would flatten everything beyond the end grey:
  // the end secant is used there instead.
  if (t <= x[0]) return y[0] + (m[0] > 0 ? m[0] : (y[1] - y[0]) / (x[1] - x[0])) * (t - x[0]);
  if (t >= x[n - 1]) return y[n - 1] + (m[n - 1] > 0 ? m[n - 1] : (y[n - 1] - y[n - 2]) / (x[n - 1] - x[n - 2])) * (t - x[n - 1]);
  let i = 0;
  while (i < n - 2 && t > x[i + 1]) i++;
  const h = x[i + 1] - x[i];
  const s = (t - x[i]) / h;
  const s2 = s * s;
  const s3 = s2 * s;
  return (2 * s3 - 3 * s2 + 1) * y[i] + (s3 - 2 * s2 + s) * h * m[i] + (-2 * s3 + 3 * s2) * y[i + 1] + (s3 - s2) * h * m[i + 1];
}

/** Applies a tone curve: camera value (sRGB-decoded, 0–1) → linear light, per channel. */
export function applyToneCurve(curve: ToneCurve, camera: LinearRgb): LinearRgb {
  return curve.channels.map((ch, c) => (camera[c] <= FLOOR ? 0 : Math.exp(evaluateLn(ch, Math.log(camera[c]))))) as LinearRgb;
}

const CHANNEL_NAMES = ["red", "green", "blue"] as const;

/**
 * Fits the tone curve from ≥ 3 grey patches (see the module comment for the method and sources).
 * Refuses (CalibrationError) greys that are too few, too alike, black in a channel, or whose camera
 * values do not rise with their reference luminance.
 */
export function fitToneCurve(greys: readonly GreyPoint[]): ToneCurve {
  if (greys.length < TONE_CURVE_MIN_GREYS) {
    throw new CalibrationError(
      "too-few-greys",
      `The tone curve needs at least ${TONE_CURVE_MIN_GREYS} grey patches of different lightness and ${greys.length} were given; mark more of the card's grey scale.`,
    );
  }
  const sorted = [...greys].sort((p, q) => p.luminance - q.luminance);
  const channels = [0, 1, 2].map((c) => {
    const lnCamera: number[] = [];
    const lnY: number[] = [];
    for (let i = 0; i < sorted.length; i++) {
      const g = sorted[i];
      if (!(g.camera[c] > FLOOR) || !(g.luminance > 0)) {
        throw new CalibrationError("grey-black", `The grey patch "${g.name}" is black in the ${CHANNEL_NAMES[c]} channel; expose the photo brighter so every grey has a value.`);
      }
      const x = Math.log(g.camera[c]);
      const y = Math.log(g.luminance);
      if (lnCamera.length > 0 && y - lnY[lnY.length - 1] < MIN_LN_STEP) {
        throw new CalibrationError(
          "greys-alike",
          `The grey patches "${sorted[i - 1].name}" and "${g.name}" have nearly the same reference lightness; use greys that differ clearly in lightness.`,
        );
      }
      if (lnCamera.length > 0 && x - lnCamera[lnCamera.length - 1] < MIN_LN_STEP) {
        throw new CalibrationError(
          "greys-not-monotone",
          `In the ${CHANNEL_NAMES[c]} channel the grey patch "${g.name}" is not clearly lighter in the photo than "${sorted[i - 1].name}", although its reference is lighter; check that the grey patches are marked on the right squares and not clipped.`,
        );
      }
      lnCamera.push(x);
      lnY.push(y);
    }
    return { lnCamera, lnY, slopes: monotoneSlopes(lnCamera, lnY) };
  }) as [ChannelCurve, ChannelCurve, ChannelCurve];
  return { kind: "monotone-cubic-log-log", channels };
}

/** Checks a tone curve read from storage: same-length, finite, increasing knots. */
export function isValidToneCurve(curve: unknown): curve is ToneCurve {
  if (!curve || typeof curve !== "object") return false;
  const c = curve as ToneCurve;
  if (c.kind !== "monotone-cubic-log-log" || !Array.isArray(c.channels) || c.channels.length !== 3) return false;
  return c.channels.every((ch) => {
    if (!ch || !Array.isArray(ch.lnCamera) || !Array.isArray(ch.lnY) || !Array.isArray(ch.slopes)) return false;
    const n = ch.lnCamera.length;
    if (n < 2 || ch.lnY.length !== n || ch.slopes.length !== n) return false;
    if (![...ch.lnCamera, ...ch.lnY, ...ch.slopes].every((v) => typeof v === "number" && Number.isFinite(v))) return false;
    for (let i = 1; i < n; i++) if (!(ch.lnCamera[i] > ch.lnCamera[i - 1]) || !(ch.lnY[i] > ch.lnY[i - 1])) return false;
    return true;
  });
}
