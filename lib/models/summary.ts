/**
 * The outside view of a dye's model (GET /api/dyes/{id}/model and the dye page): the fits side by side,
 * the chosen route, its leave-one-out figures, and one plain sentence. Pure.
 */
import type { BandSource, DyeModel } from "./dye-model";
import { TERM_LABELS, type ScaleFit, type ScaleModel } from "./solvent-scales";

export const MODEL_LABELS: Record<ScaleModel, string> = { "kamlet-taft": "Kamlet–Taft α, β, π*", et30: "ET(30)", permittivity: "f(εr) = (εr − 1)/(2εr + 1)" };

export type FitSummary = {
  model: ScaleModel;
  route: "band" | "cielab";
  /** Band route only: where the fitted band positions come from. */
  source?: BandSource;
  property: string;
  unit: string;
  n: number;
  coefficients: Record<string, { value: number; stdErr: number }>;
  r2: number;
  looRmse: number;
  residualStdErr: number;
  conditionNumber: number;
  vif: Record<string, number>;
};

function summarise(fit: ScaleFit, route: "band" | "cielab", source?: BandSource): FitSummary {
  return {
    model: fit.model,
    route,
    ...(source ? { source } : {}),
    property: fit.property,
    unit: fit.unit,
    n: fit.n,
    coefficients: fit.coefficients,
    r2: fit.r2,
    looRmse: fit.looRmse,
    residualStdErr: fit.residualStdErr,
    conditionNumber: fit.conditionNumber,
    vif: fit.vif,
  };
}

export function modelSummary(model: DyeModel) {
  const fits: FitSummary[] = [
    ...model.scales.filter((s) => s.fit).map((s) => summarise(s.fit!, "band", s.source)),
    ...(model.direct.fits ? [model.direct.fits.L, model.direct.fits.a, model.direct.fits.b].map((f) => summarise(f, "cielab")) : []),
  ];
  const routes = [
    ...model.scales.map((s) => ({ route: "band" as const, model: s.model, source: s.source, sourceNote: s.sourceNote, offset: s.offset, looDeltaE00: s.looDeltaE00, refusal: s.refusal })),
    { route: "cielab" as const, model: model.direct.model, looDeltaE00: model.direct.looDeltaE00, refusal: model.direct.refusal },
  ];
  return {
    chosen: model.chosen,
    sentence: modelSentence(model),
    band: model.band,
    routes,
    fits,
    points: model.points.map((p) => ({ solvent: { id: p.solventId, name: p.solvent }, source: "colour" as const, lab: p.lab, replicates: p.replicates, wavenumberCm1: p.wavenumberCm1, bandDeltaE00: p.bandDeltaE00, status: p.status, used: p.used })),
    spectra: model.spectra.map((p) => ({ solvent: { id: p.solventId, name: p.solvent }, source: "spectrum" as const, wavenumberCm1: p.wavenumberCm1, spectra: p.spectra, apparentOffsetCm1: p.apparentOffsetCm1 })),
  };
}

const fmt = (v: number, digits = 0) => v.toLocaleString("en-GB", { maximumFractionDigits: digits, minimumFractionDigits: digits });

/** One plain sentence from the fit: which solvent property drives the band, and how much the one-scale fits explain. */
export function modelSentence(model: DyeModel): string {
  if (!model.chosen) return model.reason ?? "No model could be fitted.";
  const kt = model.scales.find((s) => s.model === "kamlet-taft")?.fit;
  const perm = model.scales.find((s) => s.model === "permittivity")?.fit;
  const et = model.scales.find((s) => s.model === "et30")?.fit;
  const parts: string[] = [];
  const onSpectra = (m: ScaleModel) => {
    const route = model.scales.find((s) => s.model === m);
    return route?.source === "spectrum" && route.fit ? `, on band maxima from spectra in ${route.fit.n} solvents` : "";
  };
  if (kt) {
    // The largest |coefficient × spread of the parameter over the measured set|: what moves the band most here.
    const spread = (j: number) => {
      const col = kt.design.map((r) => r[j]);
      return Math.max(...col) - Math.min(...col);
    };
    const effects = kt.terms.map((t, j) => ({ t, effect: Math.abs(kt.coefficients[t].value) * spread(j) }));
    effects.sort((p, q) => q.effect - p.effect);
    const top = effects[0].t;
    const words: Record<string, string> = { alpha: "hydrogen-bond donation (α)", beta: "hydrogen-bond acceptance (β)", pi_star: "dipolarity/polarisability (π*)", delta: "polarisability (δ)" };
    const c = kt.coefficients[top];
    const symbol = top === "alpha" ? "a" : top === "beta" ? "b" : top === "pi_star" ? "s" : "d";
    parts.push(`The band position is most sensitive to ${words[top]}: ${symbol} = ${fmt(c.value)} ± ${fmt(c.stdErr)} cm⁻¹ per unit ${TERM_LABELS[top]} (Kamlet–Taft R² ${fmt(kt.r2, 2)}${onSpectra("kamlet-taft")})`);
  } else if (model.chosen.route === "cielab") {
    parts.push("The colours are fitted directly in CIELAB");
  }
  if (et) parts.push(`ET(30) alone gives R² ${fmt(et.r2, 2)}${onSpectra("et30")}`);
  if (perm) parts.push(`permittivity alone ${perm.r2 < 0.5 ? "explains little" : "explains"}, R² ${fmt(perm.r2, 2)}${onSpectra("permittivity")}`);
  const chosenScale = model.chosen.route === "band" ? model.scales.find((s) => s.model === model.chosen!.model) : undefined;
  const chosen =
    model.chosen.route === "band"
      ? `predictions use the band route with ${MODEL_LABELS[model.chosen.model]}, fitted on band positions from ${chosenScale?.source === "spectrum" ? "spectra (ν̃max)" : "colours (apparent band)"}`
      : "predictions use the direct CIELAB fit, which predicted left-out colours better here";
  return `${parts.join("; ")}; ${chosen}.`;
}
