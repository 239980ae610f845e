/**
 * A dye's solvent model, from its accepted colours in neat solvents to predictions in the solvents
 * nobody measured it in.
 *
 * Solvent scales are linear in transition energy, not in CIELAB, so the main route is:
 *   colour → apparent band position ν̃ (lib/color/band: one Gaussian band per colour, width and strength
 *   shared by the dye's colours) → least squares of ν̃ on a solvent scale (Kamlet–Taft, ET(30), f(εr)) →
 *   predicted ν̃ with its interval → colour through the same band → ± ΔE00.
 * The direct fit of L*, a*, b* on the Kamlet–Taft parameters is kept as a baseline. Each route is scored by
 * its leave-one-out error in ΔE00 and the one that predicts better is used.
 *
 * Leave-one-out of the band route leaves the solvent out of the scale fit; the shared band width and
 * strength are not refitted without it (a small optimism, said where the figure is shown).
 *
 * Band positions from spectra (ν̃max = 10⁷/λmax of the longest-wavelength visible band) are the quantity
 * the scales were defined on, and are used instead of the colours' apparent bands where there are enough
 * of them. The two sources are never mixed in one fit: the apparent band of a skewed (log-normal) band
 * sits 230–530 cm⁻¹ above its true maximum (lib/color/band.ts), an offset that would bias a mixed fit.
 * The rule, per scale: with spectra in at least (terms + 2) solvents having its parameters the scale is
 * fitted on spectra alone, otherwise on colours alone. A spectrum fit is carried to colour through the
 * same band, shifted by the mean apparent-minus-spectral offset of the solvents that have both (its
 * spread adds to the ± ΔE00); its leave-one-out ΔE00 is computed on those solvents only.
 */
import { BAND_LIMITS, bandLab, fitApparentBandsShared, nmToWavenumberCm1 } from "../color/band";
import { deltaE00 } from "../color/difference";
import type { Lab } from "../color/types";
import { gaussian, mulberry32 } from "../random";
import { isModelRefusal, ModelRefusal } from "./errors";
import { fitScaleModel, predictScaleModel, SCALE_MODELS, designRow, termsOf, type ScaleFit, type ScaleModel, type SolventParameters } from "./solvent-scales";
import { studentTQuantile } from "./student-t";

/** A dye's mean accepted colour in one neat solvent (neutral form), CIELAB D65. */
export type SolventColour = { solventId: string; solvent: string; parameters: SolventParameters; lab: Lab; replicates: number };
export type TableSolvent = { solventId: string; solvent: string; parameters: SolventParameters };
/** A dye's measured band position in one neat solvent (neutral form): ν̃max = 10⁷/λmax, the mean over its spectra there. */
export type SolventSpectrumBand = { solventId: string; solvent: string; parameters: SolventParameters; wavenumberCm1: number; spectra: number };

/** Where a fit's band positions come from: measured spectra (ν̃max) or photographed colours (apparent band). */
export type BandSource = "spectrum" | "colour";

export type SpectrumPoint = {
  solventId: string;
  solvent: string;
  /** ν̃max = 10⁷/λmax, cm⁻¹ (mean of `spectra` spectra). */
  wavenumberCm1: number;
  spectra: number;
  /** The colour's apparent band minus this maximum, cm⁻¹, where the solvent also has a usable colour. */
  apparentOffsetCm1: number | null;
};

export type BandPoint = {
  solventId: string;
  solvent: string;
  lab: Lab;
  replicates: number;
  wavenumberCm1: number;
  /** ΔE00 between the measured colour and the fitted band's colour. */
  bandDeltaE00: number;
  status: "ok" | "not-one-band" | "too-pale";
  /** Whether the point entered the scale fits (flagged colours do not). */
  used: boolean;
};

export type ScaleRoute = {
  model: ScaleModel;
  /** The band positions the fit was made on; every point of `fit` comes from this one source. */
  source: BandSource;
  /** Why this source (e.g. "spectra in 6 solvents, at least 6 needed"). */
  sourceNote: string;
  /**
   * Spectrum fits only: added to a fitted ν̃max to reach the colour band that carries it to a colour (mean
   * apparent-minus-spectral offset over `offsetSolvents` solvents with both, and its standard deviation).
   */
  offset: { meanCm1: number; sdCm1: number; solvents: number } | null;
  fit: ScaleFit | null;
  refusal: string | null;
  /** Mean and RMS leave-one-out ΔE00 of the colours this route predicts (null when refused). */
  looDeltaE00: number | null;
  looRmsDeltaE00: number | null;
  /** Leave-one-out predicted colour per used point, in the order of `fit.solvents`. */
  looLabs: Lab[] | null;
};

export type DirectRoute = {
  model: ScaleModel;
  fits: { L: ScaleFit; a: ScaleFit; b: ScaleFit } | null;
  refusal: string | null;
  looDeltaE00: number | null;
  looRmsDeltaE00: number | null;
  looLabs: Lab[] | null;
};

export type Prediction = {
  solventId: string;
  solvent: string;
  lab: Lab;
  /** RMS ΔE00 of the colours of the prediction's distribution, combined with the band's own colour residual. */
  uncertaintyDeltaE00: number;
  extrapolated: boolean;
  route: "band" | "cielab";
  model: ScaleModel;
  wavenumberCm1: number | null;
  /** Half-width of the 95 % prediction interval of ν̃, cm⁻¹. */
  wavenumberHalfWidthCm1: number | null;
};

export type DyeModel = {
  version: number;
  /** Null when no route could be fitted; then `reason` says why. */
  chosen: { route: "band"; model: ScaleModel } | { route: "cielab"; model: ScaleModel } | null;
  reason: string | null;
  band: { fwhmCm1: number; peakAbsorbance: number; rmsDeltaE00: number; refusal: string | null };
  points: BandPoint[];
  /** Band maxima from the dye's spectra, one per solvent. */
  spectra: SpectrumPoint[];
  scales: ScaleRoute[];
  direct: DirectRoute;
  predictions: Prediction[];
};

/** Bumped when the computation changes, so stored models are recomputed. */
export const DYE_MODEL_VERSION = 2;

/** More than this share of flagged colours (no single band, too pale) and the band route is refused (our limit). */
export const MAX_FLAGGED_SHARE = 1 / 3;

/** Draws per prediction for the ± ΔE00 (stratified quantiles in ν̃; seeded Gaussians for L*, a*, b*). */
const DRAWS = 60;

function rms(values: readonly number[]): number {
  return Math.sqrt(values.reduce((s, v) => s + v * v, 0) / values.length);
}
const mean = (values: readonly number[]) => values.reduce((s, v) => s + v, 0) / values.length;

function hashSeed(text: string): number {
  let h = 2166136261;
  for (let i = 0; i < text.length; i++) h = Math.imul(h ^ text.charCodeAt(i), 16777619);
  return h >>> 0;
}

function refusalText(error: unknown): string {
  if (isModelRefusal(error)) return error.message;
  throw error;
}

/** Fits every route and predicts the unmeasured table solvents with the better one. Pure; deterministic. */
export function computeDyeModel(input: { dyeId: string; colours: readonly SolventColour[]; table: readonly TableSolvent[]; spectra?: readonly SolventSpectrumBand[] }): DyeModel {
  const { colours, table } = input;
  const measuredBands = input.spectra ?? [];
  const labs = colours.map((c) => c.lab);
  const shared = colours.length > 0 ? fitApparentBandsShared(labs) : { fwhmCm1: NaN, peakAbsorbance: NaN, bands: [] };
  const points: BandPoint[] = colours.map((c, i) => ({
    solventId: c.solventId,
    solvent: c.solvent,
    lab: c.lab,
    replicates: c.replicates,
    wavenumberCm1: shared.bands[i].band.wavenumberCm1,
    bandDeltaE00: shared.bands[i].deltaE00,
    status: shared.bands[i].status,
    used: shared.bands[i].status === "ok",
  }));
  const flagged = points.filter((p) => !p.used).length;
  let bandRefusal: string | null = null;
  if (colours.length > 0 && flagged > MAX_FLAGGED_SHARE * colours.length) {
    bandRefusal = `${flagged} of ${colours.length} colours are not explained by one absorption band (more than a third), so no band model is fitted; the dye probably absorbs in two regions.`;
    points.forEach((p) => (p.used = false));
  }
  const used = points.filter((p) => p.used);
  const bandShape = { wavenumberCm1: 0, fwhmCm1: shared.fwhmCm1, peakAbsorbance: shared.peakAbsorbance };
  const labAt = (nu: number): Lab => bandLab({ ...bandShape, wavenumberCm1: Math.min(BAND_LIMITS.maxWavenumberCm1 * 1.2, Math.max(BAND_LIMITS.minWavenumberCm1 * 0.8, nu)) });
  const bandRms = used.length > 0 ? rms(used.map((p) => p.bandDeltaE00)) : 0;
  const paramsOf = new Map(colours.map((c) => [c.solventId, c.parameters]));

  const pointOf = new Map(points.map((p) => [p.solventId, p]));
  const spectrumPoints: SpectrumPoint[] = measuredBands.map((b) => {
    const p = pointOf.get(b.solventId);
    return { solventId: b.solventId, solvent: b.solvent, wavenumberCm1: b.wavenumberCm1, spectra: b.spectra, apparentOffsetCm1: p && p.used ? p.wavenumberCm1 - b.wavenumberCm1 : null };
  });
  const offsets = spectrumPoints.flatMap((p) => (p.apparentOffsetCm1 === null ? [] : [p.apparentOffsetCm1]));
  const offset = offsets.length > 0 ? { meanCm1: mean(offsets), sdCm1: offsets.length > 1 ? Math.sqrt(offsets.reduce((t, v) => t + (v - mean(offsets)) ** 2, 0) / (offsets.length - 1)) : 0, solvents: offsets.length } : null;
  const canColour = !bandRefusal && used.length > 0;

  const scales: ScaleRoute[] = SCALE_MODELS.map((model) => {
    const terms = termsOf(model);
    const needed = terms.length + 3;
    const spectraWithParams = measuredBands.filter((b) => "row" in designRow(terms, b.parameters));
    let sourceNote = `band positions from colours: spectra in ${spectraWithParams.length} solvent${spectraWithParams.length === 1 ? "" : "s"} with these parameters, at least ${needed} needed to fit on spectra alone`;
    if (spectraWithParams.length >= needed) {
      try {
        const fit = fitScaleModel(model, spectraWithParams.map((b) => ({ solvent: b.solvent, parameters: b.parameters, value: b.wavenumberCm1 })), { property: "wavenumber", unit: "cm⁻¹" });
        const note = `band maxima ν̃max from spectra in ${spectraWithParams.length} solvents`;
        // Checked in colour only where a solvent has both a spectrum and a usable colour.
        const checked = canColour && offset ? spectraWithParams.map((b, i) => ({ i, p: pointOf.get(b.solventId) })).filter((c) => c.p?.used) : [];
        if (checked.length === 0) {
          return { model, source: "spectrum", sourceNote: `${note}; no solvent has both a spectrum and a usable colour, so the fit cannot be carried to colours`, offset, fit, refusal: null, looDeltaE00: null, looRmsDeltaE00: null, looLabs: null };
        }
        const looLabs = fit.looPredicted.map((nu) => labAt(nu + offset!.meanCm1));
        const errors = checked.map(({ i, p }) => deltaE00(looLabs[i], p!.lab));
        return { model, source: "spectrum", sourceNote: `${note}; leave-one-out ΔE00 over the ${checked.length} of them with a measured colour`, offset, fit, refusal: null, looDeltaE00: mean(errors), looRmsDeltaE00: rms(errors), looLabs };
      } catch (error) {
        sourceNote = `band positions from colours: the fit on spectra was refused (${refusalText(error)})`;
      }
    }
    if (bandRefusal) return { model, source: "colour", sourceNote, offset: null, fit: null, refusal: bandRefusal, looDeltaE00: null, looRmsDeltaE00: null, looLabs: null };
    const withParams = used.filter((p) => "row" in designRow(terms, paramsOf.get(p.solventId)!));
    try {
      const fit = fitScaleModel(
        model,
        withParams.map((p) => ({ solvent: p.solvent, parameters: paramsOf.get(p.solventId)!, value: p.wavenumberCm1 })),
        { property: "wavenumber", unit: "cm⁻¹" },
      );
      const looLabs = fit.looPredicted.map(labAt);
      const errors = looLabs.map((lab, i) => deltaE00(lab, withParams[i].lab));
      return { model, source: "colour", sourceNote, offset: null, fit, refusal: null, looDeltaE00: mean(errors), looRmsDeltaE00: rms(errors), looLabs };
    } catch (error) {
      return { model, source: "colour", sourceNote, offset: null, fit: null, refusal: refusalText(error), looDeltaE00: null, looRmsDeltaE00: null, looLabs: null };
    }
  });

  const direct = directRoute(colours);

  const candidates: { route: "band" | "cielab"; model: ScaleModel; loo: number }[] = [
    ...scales.filter((s) => s.looDeltaE00 !== null).map((s) => ({ route: "band" as const, model: s.model, loo: s.looDeltaE00! })),
    ...(direct.looDeltaE00 !== null ? [{ route: "cielab" as const, model: direct.model, loo: direct.looDeltaE00 }] : []),
  ].sort((p, q) => p.loo - q.loo);
  const best = candidates[0] ?? null;
  const reason = best
    ? null
    : colours.length === 0
      ? "The dye has no accepted colours in neat solvents (neutral form) to fit."
      : (bandRefusal ?? scales.find((s) => s.refusal)?.refusal ?? direct.refusal ?? "No model could be fitted.");

  const measured = new Set(colours.map((c) => c.solventId));
  const predictions: Prediction[] = [];
  if (best) {
    const random = mulberry32(hashSeed(input.dyeId));
    for (const s of table) {
      if (measured.has(s.solventId)) continue;
      if (best.route === "band") {
        const route = scales.find((r) => r.model === best.model)!;
        const fit = route.fit!;
        let p;
        try {
          p = predictScaleModel(fit, s.parameters);
        } catch {
          continue;
        }
        // A spectrum fit predicts a band maximum; its colour comes from the colour band, offset as measured.
        const shift = route.offset?.meanCm1 ?? 0;
        const spreadCm1 = Math.hypot(p.stdErr, route.offset?.sdCm1 ?? 0);
        const lab = labAt(p.value + shift);
        const draws = Array.from({ length: DRAWS }, (_, k) => p.value + shift + spreadCm1 * studentTQuantile((k + 0.5) / DRAWS, fit.dof));
        const spread = rms(draws.map((nu) => deltaE00(labAt(nu), lab)));
        predictions.push({
          solventId: s.solventId,
          solvent: s.solvent,
          lab,
          uncertaintyDeltaE00: Math.sqrt(spread * spread + bandRms * bandRms),
          extrapolated: p.extrapolated,
          route: "band",
          model: best.model,
          wavenumberCm1: p.value,
          wavenumberHalfWidthCm1: p.halfWidth,
        });
      } else {
        const fits = direct.fits!;
        let pl, pa, pb;
        try {
          [pl, pa, pb] = [fits.L, fits.a, fits.b].map((f) => predictScaleModel(f, s.parameters));
        } catch {
          continue;
        }
        const lab: Lab = [Math.min(100, Math.max(0, pl.value)), pa.value, pb.value];
        const draws = Array.from({ length: DRAWS }, () => {
          const d: Lab = [lab[0] + pl.stdErr * gaussian(random), lab[1] + pa.stdErr * gaussian(random), lab[2] + pb.stdErr * gaussian(random)];
          return deltaE00(d, lab);
        });
        predictions.push({
          solventId: s.solventId,
          solvent: s.solvent,
          lab,
          uncertaintyDeltaE00: rms(draws),
          extrapolated: pl.extrapolated,
          route: "cielab",
          model: best.model,
          wavenumberCm1: null,
          wavenumberHalfWidthCm1: null,
        });
      }
    }
  }
  return {
    version: DYE_MODEL_VERSION,
    chosen: best ? { route: best.route, model: best.model } : null,
    reason,
    band: { fwhmCm1: shared.fwhmCm1, peakAbsorbance: shared.peakAbsorbance, rmsDeltaE00: bandRms, refusal: bandRefusal },
    points,
    spectra: spectrumPoints,
    scales,
    direct,
    predictions,
  };
}

/**
 * One band position per solvent from a dye's spectra: ν̃max = 10⁷/λmax(nm) cm⁻¹, averaged over the
 * solvent's spectra. Spectra without a band maximum in the visible (λmax null) give none.
 */
export function spectrumBandsBySolvent(
  spectra: readonly { solventId: string; lambdaMaxNm: number | null }[],
  table: readonly TableSolvent[],
): SolventSpectrumBand[] {
  const info = new Map(table.map((t) => [t.solventId, t]));
  const bySolvent = new Map<string, number[]>();
  for (const s of spectra) {
    if (s.lambdaMaxNm === null || !(s.lambdaMaxNm > 0) || !info.has(s.solventId)) continue;
    bySolvent.set(s.solventId, [...(bySolvent.get(s.solventId) ?? []), nmToWavenumberCm1(s.lambdaMaxNm)]);
  }
  return [...bySolvent.entries()]
    .map(([solventId, nus]) => ({ solventId, solvent: info.get(solventId)!.solvent, parameters: info.get(solventId)!.parameters, wavenumberCm1: mean(nus), spectra: nus.length }))
    .sort((p, q) => p.solvent.localeCompare(q.solvent));
}

/** cm⁻¹ to add to the chosen fit's ν̃ to reach the colour band (non-zero only for a fit on spectra). */
export function colourBandOffsetCm1(model: DyeModel): number {
  if (model.chosen?.route !== "band") return 0;
  const chosenModel = model.chosen.model;
  return model.scales.find((s) => s.model === chosenModel)?.offset?.meanCm1 ?? 0;
}

/** Baseline: L*, a*, b* each fitted linearly on the Kamlet–Taft parameters (ET(30) when those cannot be fitted). */
function directRoute(colours: readonly SolventColour[]): DirectRoute {
  let lastRefusal = "No colours to fit.";
  for (const model of ["kamlet-taft", "et30"] as const) {
    const rows = colours.filter((c) => "row" in designRow(termsOf(model), c.parameters));
    try {
      const fit = (k: 0 | 1 | 2, name: string) =>
        fitScaleModel(model, rows.map((c) => ({ solvent: c.solvent, parameters: c.parameters, value: c.lab[k] })), { property: name, unit: "" });
      const fits = { L: fit(0, "L*"), a: fit(1, "a*"), b: fit(2, "b*") };
      const looLabs: Lab[] = rows.map((_, i) => [fits.L.looPredicted[i], fits.a.looPredicted[i], fits.b.looPredicted[i]]);
      const errors = looLabs.map((lab, i) => deltaE00(lab, rows[i].lab));
      return { model, fits, refusal: null, looDeltaE00: mean(errors), looRmsDeltaE00: rms(errors), looLabs };
    } catch (error) {
      lastRefusal = refusalText(error);
    }
  }
  return { model: "kamlet-taft", fits: null, refusal: lastRefusal, looDeltaE00: null, looRmsDeltaE00: null, looLabs: null };
}

/** Re-exported so callers can tell a refusal from a failure. */
export { ModelRefusal };
