/**
 * Tune: which neat solvent or binary blend gives a wanted colour with a dye, ranked by predicted ΔE00
 * to the target, each with its uncertainty.
 *
 * A blend's band position follows ideal mixing of ν̃ between its two solvents (ν̃ = x₁ν̃₁ + x₂ν̃₂; not of
 * α, β, π*), labelled as an approximation: preferential solvation (Bosch & Rosés, see blends.ts) can bend
 * the curve, so the uncertainty of a blend gets an extra term that is largest at x₂ = ½: a quarter of the
 * two solvents' ν̃ gap times 4x₁x₂ (our allowance, no source). Where the dye was measured in at least three
 * compositions of the pair, the fitted preferential-solvation curve replaces ideal mixing.
 * Colours come from the dye's own band (shared width and strength) through the CIE band model.
 */
import { bandLab } from "../color/band";
import { deltaE00 } from "../color/difference";
import type { Lab } from "../color/types";
import { boschRosesValue, fitBoschRoses, type BlendPoint, type PreferentialSolvation } from "./blends";
import { colourBandOffsetCm1, type DyeModel } from "./dye-model";
import { studentTQuantile } from "./student-t";

export type TuneSolvent = { solventId: string; solvent: string; cautions: string; medium: string };

/** A dye's neat-solvent colours: measured (with apparent band position when one band explains it) or predicted. */
export type TuneNeat = TuneSolvent & {
  lab: Lab;
  measured: boolean;
  /** ± ΔE00 of the colour (0 for a measured mean when no uncertainty is stored). */
  uncertaintyDeltaE00: number;
  /** Band position and its standard uncertainty, cm⁻¹; null when the colour has no band-route position. */
  wavenumberCm1: number | null;
  wavenumberStdErrCm1: number;
  extrapolated: boolean;
};

export type TuneDye = {
  dye: { id: string; code: string; name: string };
  /** The dye's shared band width and strength; null when no band model exists (then only neat solvents). */
  band: { fwhmCm1: number; peakAbsorbance: number; rmsDeltaE00: number } | null;
  neat: TuneNeat[];
  /** Measured blends of a pair: band positions at mole fractions x₂ of the second solvent. */
  blends?: { solventId1: string; solventId2: string; points: BlendPoint[] }[];
};

export type TuneCandidate = {
  dye: TuneDye["dye"];
  kind: "neat" | "blend";
  solvents: TuneSolvent[];
  /** Mole fraction of the second solvent (blends only). */
  x2: number | null;
  lab: Lab;
  deltaE00: number;
  uncertaintyDeltaE00: number;
  measured: boolean;
  /** "measured", "model prediction", "ideal mixing (approximation)" or "preferential solvation fit". */
  basis: string;
  extrapolated: boolean;
};

/** Mole fractions tried for every pair (x₂ of the second solvent). */
export const MOLE_FRACTION_GRID = [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9];

/** ν̃ step of the cached colour curve, cm⁻¹: finer than a colour difference of about 0.1 ΔE00 (our choice). */
const CURVE_STEP = 10;

function colourCurve(band: NonNullable<TuneDye["band"]>) {
  const cache = new Map<number, Lab>();
  return (nu: number): Lab => {
    const k = Math.round(nu / CURVE_STEP);
    let lab = cache.get(k);
    if (!lab) {
      lab = bandLab({ wavenumberCm1: k * CURVE_STEP, fwhmCm1: band.fwhmCm1, peakAbsorbance: band.peakAbsorbance });
      cache.set(k, lab);
    }
    return lab;
  };
}

/**
 * Ranks every neat solvent and every blend on the grid for each dye and returns the best `limit`: per pair
 * only its best mole fraction; colours within `TIE_DELTA_E00` of each other are ordered by their
 * uncertainty (a blend that lands on the same colour with a surer prediction comes first), and at most
 * `perDye` candidates of one dye are kept (for the question "which dye, in which solvent or blend").
 */
export function tune(target: Lab, dyes: readonly TuneDye[], { limit = 20, blends = true, perDye = Infinity }: { limit?: number; blends?: boolean; perDye?: number } = {}): TuneCandidate[] {
  const out: TuneCandidate[] = [];
  for (const d of dyes) {
    for (const n of d.neat) {
      out.push({
        dye: d.dye,
        kind: "neat",
        solvents: [pick(n)],
        x2: null,
        lab: n.lab,
        deltaE00: deltaE00(target, n.lab),
        uncertaintyDeltaE00: n.uncertaintyDeltaE00,
        measured: n.measured,
        basis: n.measured ? "measured" : "solvent model, neat solvent",
        extrapolated: n.extrapolated,
      });
    }
    if (!blends || !d.band) continue;
    const curve = colourCurve(d.band);
    const withBand = d.neat.filter((n) => n.wavenumberCm1 !== null);
    const fitted = new Map<string, PreferentialSolvation & { rmse: number }>();
    for (const b of d.blends ?? []) {
      const s1 = withBand.find((n) => n.solventId === b.solventId1);
      const s2 = withBand.find((n) => n.solventId === b.solventId2);
      if (!s1 || !s2 || b.points.filter((p) => p.x2 > 0 && p.x2 < 1).length < 3) continue;
      const fit = fitBoschRoses(b.points, s1.wavenumberCm1!, s2.wavenumberCm1!);
      fitted.set(`${b.solventId1}|${b.solventId2}`, fit);
    }
    for (let i = 0; i < withBand.length; i++) {
      for (let j = i + 1; j < withBand.length; j++) {
        const [s1, s2] = [withBand[i], withBand[j]];
        const pref = fitted.get(`${s1.solventId}|${s2.solventId}`);
        const prefSwapped = fitted.get(`${s2.solventId}|${s1.solventId}`);
        for (const x2 of MOLE_FRACTION_GRID) {
          let nu: number;
          let u: number;
          let basis: string;
          if (pref || prefSwapped) {
            nu = pref ? boschRosesValue(pref, x2) : boschRosesValue(prefSwapped!, 1 - x2);
            u = Math.hypot((pref ?? prefSwapped)!.rmse, (1 - x2) * s1.wavenumberStdErrCm1, x2 * s2.wavenumberStdErrCm1);
            basis = "preferential solvation fit";
          } else {
            nu = (1 - x2) * s1.wavenumberCm1! + x2 * s2.wavenumberCm1!;
            const allowance = 0.25 * Math.abs(s2.wavenumberCm1! - s1.wavenumberCm1!) * 4 * x2 * (1 - x2);
            u = Math.hypot((1 - x2) * s1.wavenumberStdErrCm1, x2 * s2.wavenumberStdErrCm1, allowance);
            basis = "ideal mixing (approximation)";
          }
          const lab = curve(nu);
          const spread = Math.sqrt((deltaE00(curve(nu - u), lab) ** 2 + deltaE00(curve(nu + u), lab) ** 2) / 2);
          out.push({
            dye: d.dye,
            kind: "blend",
            solvents: [pick(s1), pick(s2)],
            x2,
            lab,
            deltaE00: deltaE00(target, lab),
            uncertaintyDeltaE00: Math.hypot(spread, d.band.rmsDeltaE00),
            measured: false,
            basis,
            extrapolated: s1.extrapolated || s2.extrapolated,
          });
        }
      }
    }
  }
  const bestPerPair = new Map<string, TuneCandidate>();
  for (const c of out) {
    const key = `${c.dye.id}|${c.solvents.map((s) => s.solventId).join("|")}`;
    const kept = bestPerPair.get(key);
    if (!kept || c.deltaE00 < kept.deltaE00 - TIE_DELTA_E00 || (Math.abs(c.deltaE00 - kept.deltaE00) <= TIE_DELTA_E00 && c.uncertaintyDeltaE00 < kept.uncertaintyDeltaE00)) bestPerPair.set(key, c);
  }
  const ranked = [...bestPerPair.values()].sort(
    (p, q) => Math.round(p.deltaE00 / TIE_DELTA_E00) - Math.round(q.deltaE00 / TIE_DELTA_E00) || Number(q.measured) - Number(p.measured) || p.uncertaintyDeltaE00 - q.uncertaintyDeltaE00,
  );
  const perDyeCount = new Map<string, number>();
  const result: TuneCandidate[] = [];
  for (const c of ranked) {
    const n = perDyeCount.get(c.dye.id) ?? 0;
    if (n >= perDye) continue;
    perDyeCount.set(c.dye.id, n + 1);
    result.push(c);
    if (result.length >= limit) break;
  }
  return result;
}

/** Colours closer than this to each other rank as equal and are ordered by uncertainty (about a tenth of a just-noticeable difference; our choice). */
export const TIE_DELTA_E00 = 0.1;

function pick(s: TuneSolvent): TuneSolvent {
  return { solventId: s.solventId, solvent: s.solvent, cautions: s.cautions, medium: s.medium };
}

/**
 * A dye's tune input from its fitted model (dye-model.ts): measured colours with their apparent band
 * positions, and predictions with theirs (standard error = 95 % half-width / t(0.975, dof)).
 */
export function tuneDyeFromModel(
  dye: TuneDye["dye"],
  model: DyeModel,
  solvents: ReadonlyMap<string, TuneSolvent>,
  blends: TuneDye["blends"] = [],
): TuneDye {
  const bandFit = model.chosen?.route === "band" ? model.scales.find((s) => s.model === model.chosen!.model)?.fit ?? null : null;
  const hasBand = !model.band.refusal && Number.isFinite(model.band.fwhmCm1) && model.points.some((p) => p.used);
  const t = bandFit ? studentTQuantile(0.975, bandFit.dof) : 1;
  // Predictions of a fit on spectra are band maxima; tune works with the colour band, like the measured points.
  const shift = colourBandOffsetCm1(model);
  const info = (id: string, name: string): TuneSolvent => solvents.get(id) ?? { solventId: id, solvent: name, cautions: "", medium: "" };
  const neat: TuneNeat[] = [
    ...model.points.map((p) => ({
      ...info(p.solventId, p.solvent),
      lab: p.lab,
      measured: true,
      uncertaintyDeltaE00: 0,
      wavenumberCm1: hasBand && p.used ? p.wavenumberCm1 : null,
      wavenumberStdErrCm1: 0,
      extrapolated: false,
    })),
    ...model.predictions.map((p) => ({
      ...info(p.solventId, p.solvent),
      lab: p.lab,
      measured: false,
      uncertaintyDeltaE00: p.uncertaintyDeltaE00,
      wavenumberCm1: hasBand && p.route === "band" && p.wavenumberCm1 !== null ? p.wavenumberCm1 + shift : null,
      wavenumberStdErrCm1: p.wavenumberHalfWidthCm1 !== null ? p.wavenumberHalfWidthCm1 / t : 0,
      extrapolated: p.extrapolated,
    })),
  ];
  return { dye, band: hasBand ? { fwhmCm1: model.band.fwhmCm1, peakAbsorbance: model.band.peakAbsorbance, rmsDeltaE00: model.band.rmsDeltaE00 } : null, neat, blends };
}
