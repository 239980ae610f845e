import Link from "next/link";
import { Badge, Card, Notice } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import type { Lab } from "@/lib/color/types";
import type { DyeModel } from "@/lib/models/dye-model";
import { kirkwoodOnsager, TERM_LABELS, type ScaleFit } from "@/lib/models/solvent-scales";
import { MODEL_LABELS, modelSentence } from "@/lib/models/summary";
import { ObservedPredictedChart, ScaleChart, type ScalePoint } from "./model-charts";
import { PredictedSwatch } from "./predicted-swatch";

export type ModelSolvent = { id: string; name: string; ktAlpha: number | null; ktBeta: number | null; ktPiStar: number | null; et30: number | null; permittivity: number | null };

const COEFFICIENT_UNITS: Record<string, string> = {
  intercept: "cm⁻¹",
  pi_star: "cm⁻¹ per unit π*",
  alpha: "cm⁻¹ per unit α",
  beta: "cm⁻¹ per unit β",
  delta: "cm⁻¹ per unit δ",
  et30: "cm⁻¹ per kcal/mol",
  f_epsilon: "cm⁻¹ per unit f(εr)",
};
const SYMBOL: Record<string, string> = { intercept: "ν̃0", pi_star: "s", alpha: "a", beta: "b", delta: "d", et30: "m", f_epsilon: "m" };
const n0 = (v: number) => Math.round(v).toLocaleString("en-GB");

function xOf(fit: ScaleFit, row: readonly number[]): number {
  if (fit.model === "kamlet-taft") return fit.terms.reduce((s, t, j) => s + fit.coefficients[t].value * row[j], 0);
  return row[0];
}
function xLabel(fit: ScaleFit): string {
  if (fit.model === "kamlet-taft") return "s·π* + a·α + b·β / cm⁻¹ (fitted combination)";
  if (fit.model === "et30") return "ET(30) / kcal/mol";
  return "f(εr) = (εr − 1)/(2εr + 1)";
}
function rowOf(fit: ScaleFit, s: ModelSolvent): number[] | null {
  const values = fit.terms.map((t) =>
    t === "pi_star" ? s.ktPiStar : t === "alpha" ? s.ktAlpha : t === "beta" ? s.ktBeta : t === "et30" ? s.et30 : t === "f_epsilon" ? (s.permittivity === null ? null : kirkwoodOnsager(s.permittivity)) : null,
  );
  return values.every((v) => v !== null) ? (values as number[]) : null;
}

/** Each solvent's band position from its colour and from its spectra, and which of them the chosen fit used. */
function bandPositionRows(model: DyeModel, inFit: Set<string>, source: "spectrum" | "colour" | null) {
  const rows = new Map<string, { solventId: string; solvent: string; colour: number | null; spectrum: { value: number; n: number } | null; inFit: string | null }>();
  for (const p of model.points) rows.set(p.solventId, { solventId: p.solventId, solvent: p.solvent, colour: p.used ? p.wavenumberCm1 : null, spectrum: null, inFit: null });
  for (const s of model.spectra) {
    const r = rows.get(s.solventId) ?? { solventId: s.solventId, solvent: s.solvent, colour: null, spectrum: null, inFit: null };
    r.spectrum = { value: s.wavenumberCm1, n: s.spectra };
    rows.set(s.solventId, r);
  }
  for (const r of rows.values()) {
    if (!inFit.has(r.solvent) || !source) continue;
    if (source === "spectrum" && r.spectrum) r.inFit = "spectrum";
    if (source === "colour" && r.colour !== null) r.inFit = "colour";
  }
  return [...rows.values()].sort((p, q) => p.solvent.localeCompare(q.solvent));
}

/**
 * The dye page's solvent-model section: what drives the colour (one sentence, coefficients ± SE, the fits
 * side by side with their leave-one-out errors), the chart of ν̃ against the scale, and the colour strip with
 * predicted swatches (hatched, ± ΔE00) in the solvents not measured, ordered by Kamlet–Taft β.
 */
export function DyeModelSection({ model, solvents, dyeCode }: { model: DyeModel; solvents: ModelSolvent[]; dyeCode: string }) {
  const byId = new Map(solvents.map((s) => [s.id, s]));
  if (!model.chosen) {
    return (
      <Card title="Solvent model" className="lg:col-span-3">
        <p className="text-sm" data-testid="model-sentence">
          No model: {model.reason}
        </p>
      </Card>
    );
  }
  const chosenScale = model.chosen.route === "band" ? model.scales.find((s) => s.model === model.chosen!.model)! : (model.scales.find((s) => s.fit) ?? null);
  const fit = chosenScale?.fit ?? null;
  const points: ScalePoint[] = fit
    ? fit.solvents.map((solvent, i) => ({ solvent, x: xOf(fit, fit.design[i]), observed: fit.observed[i], fitted: fit.fitted[i], loo: fit.looPredicted[i] }))
    : [];
  const chartPredictions = fit && model.chosen.route === "band"
    ? model.predictions.flatMap((p) => {
        const s = byId.get(p.solventId);
        const row = s ? rowOf(fit, s) : null;
        return row && p.wavenumberCm1 !== null ? [{ solvent: p.solvent, x: xOf(fit, row), value: p.wavenumberCm1, halfWidth: p.wavenumberHalfWidthCm1 ?? 0 }] : [];
      })
    : [];
  const routes = [
    ...model.scales.map((s) => ({
      key: `band-${s.model}`,
      label: `Band position on ${MODEL_LABELS[s.model]}`,
      source: s.source === "spectrum" ? "spectra (ν̃max)" : "colours (apparent band)",
      sourceNote: s.sourceNote,
      loo: s.looDeltaE00,
      r2: s.fit?.r2 ?? null,
      refusal: s.refusal,
      chosen: model.chosen!.route === "band" && model.chosen!.model === s.model,
    })),
    { key: "cielab", label: `L*, a*, b* directly on ${MODEL_LABELS[model.direct.model]} (baseline)`, source: "colours (L*, a*, b*)", sourceNote: "", loo: model.direct.looDeltaE00, r2: null, refusal: model.direct.refusal, chosen: model.chosen.route === "cielab" },
  ];
  const fromSpectra = chosenScale?.source === "spectrum" && model.chosen.route === "band";
  const bandRows = bandPositionRows(model, fit ? new Set(fit.solvents) : new Set(), chosenScale?.source ?? null);
  const flagged = model.points.filter((p) => !p.used);
  const strip = [
    ...model.points.map((p) => ({ id: p.solventId, name: p.solvent, beta: byId.get(p.solventId)?.ktBeta ?? null, measured: { lab: p.lab, n: p.replicates } as { lab: Lab; n: number } | null, predicted: null as null | DyeModel["predictions"][number] })),
    ...model.predictions.map((p) => ({ id: p.solventId, name: p.solvent, beta: byId.get(p.solventId)?.ktBeta ?? null, measured: null, predicted: p })),
  ].sort((x, y) => (x.beta ?? Infinity) - (y.beta ?? Infinity));
  const usedCount = model.points.filter((p) => p.used).length;

  return (
    <>
      <Card title="What drives its colour (solvent model)" className="lg:col-span-3">
        <p className="text-sm" data-testid="model-sentence">
          {modelSentence(model)}
        </p>
        <div className="mt-3">
          <Notice tone="caution">
            A model fitted on {fit?.n ?? (usedCount || model.points.length)} solvents is a guide, not a guarantee: specific interactions the scales do not describe (and solvents far from the measured ones,
            marked “extrapolated”) can move the real colour further than the ± shown. Confirm a predicted colour at the bench before relying on it.
          </Notice>
        </div>
        <div className="mt-4 overflow-x-auto">
          <table className="w-full min-w-[40rem] text-left text-sm" aria-label="Fits side by side">
            <thead className="text-xs text-ink-soft">
              <tr>
                <th className="py-1 pr-3">Route</th>
                <th className="py-1 pr-3">Band positions from</th>
                <th className="py-1 pr-3 text-right">Leave-one-out error (mean ΔE00)</th>
                <th className="py-1 pr-3 text-right">R² (ν̃)</th>
                <th className="py-1 pr-3">Status</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-line">
              {routes.map((r) => (
                <tr key={r.key}>
                  <td className="py-1.5 pr-3">{r.label}</td>
                  <td className="py-1.5 pr-3" data-testid="route-source">
                    {r.source}
                    {r.sourceNote && <span className="block text-xs text-ink-soft">{r.sourceNote}</span>}
                  </td>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{r.loo === null ? "—" : r.loo.toFixed(2)}</td>
                  <td className="py-1.5 pr-3 text-right tabular-nums">{r.r2 === null ? "—" : r.r2.toFixed(3)}</td>
                  <td className="py-1.5 pr-3">{r.chosen ? <Badge tone="ok">used for predictions</Badge> : r.refusal ? <span className="text-xs text-ink-soft">not fitted: {r.refusal}</span> : <span className="text-xs text-ink-soft">predicts worse</span>}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-1 text-xs text-ink-soft">
            Leave-one-out: each solvent’s colour predicted from a fit without it, compared with its measured colour (CIEDE2000, D65). The band route keeps the dye’s shared band width
            ({n0(model.band.fwhmCm1)} cm⁻¹) and strength (peak absorbance {model.band.peakAbsorbance.toFixed(2)}) fixed while leaving a solvent out. Band model: one Gaussian absorption band per colour, CIE 015 colour under D65; its colours match the measured ones to {model.band.rmsDeltaE00.toFixed(2)} ΔE00 (RMS).
          </p>
          {fromSpectra && chosenScale?.offset && (
            <p className="mt-1 text-xs text-ink-soft">
              The chosen fit is on band maxima from spectra. Its predictions reach a colour through the colour band shifted by the apparent-minus-spectral offset measured in the{" "}
              {chosenScale.offset.solvents} solvents with both: {n0(chosenScale.offset.meanCm1)} ± {n0(chosenScale.offset.sdCm1)} cm⁻¹ (a Gaussian of the same colour sits above the maximum of
              a skewed band); that spread is part of the ± ΔE00. Its leave-one-out ΔE00 counts only those solvents.
            </p>
          )}
          {flagged.length > 0 && (
            <p className="mt-1 text-xs text-ink-soft">
              Left out of the band fits ({flagged.length}): {flagged.map((p) => `${p.solvent} (${p.status === "too-pale" ? "too pale to place a band" : `no single band, ΔE00 ${p.bandDeltaE00.toFixed(1)}`})`).join("; ")}.
            </p>
          )}
        </div>
        {fit && (
          <div className="mt-4 grid gap-4 lg:grid-cols-2">
            <div>
              <h3 className="mb-1 text-sm font-semibold">
                Band position against {MODEL_LABELS[fit.model]} ({fit.n} solvents)
              </h3>
              <ScaleChart
                points={points}
                xLabel={xLabel(fit)}
                xDecimals={fit.model === "kamlet-taft" ? 0 : fit.model === "et30" ? 1 : 2}
                predictions={chartPredictions}
                observedLabel={fromSpectra ? "ν̃max from spectra" : "apparent band from colour"}
              />
            </div>
            <div>
              <h3 className="mb-1 text-sm font-semibold">Observed against predicted ν̃ (leave-one-out triangles)</h3>
              <ObservedPredictedChart points={points} />
            </div>
            <div className="lg:col-span-2 overflow-x-auto">
              <table className="w-full text-left text-sm" aria-label="Coefficients with standard errors">
                <caption className="mb-1 text-left text-sm font-semibold">
                  ν̃ = {fit.terms.length === 1 ? `ν̃0 + m·${TERM_LABELS[fit.terms[0]]}` : `ν̃0 + ${fit.terms.map((t) => `${SYMBOL[t]}·${TERM_LABELS[t]}`).join(" + ")}`} — least squares, standard errors from s²(XᵀX)⁻¹
                </caption>
                <thead className="text-xs text-ink-soft">
                  <tr>
                    <th className="py-1 pr-3">Term</th>
                    <th className="py-1 pr-3 text-right">Value ± standard error</th>
                    <th className="py-1 pr-3">Unit</th>
                    <th className="py-1 pr-3 text-right">VIF</th>
                  </tr>
                </thead>
                <tbody className="divide-y divide-line">
                  {["intercept", ...fit.terms].map((t) => (
                    <tr key={t}>
                      <td className="py-1.5 pr-3">
                        {SYMBOL[t]} ({TERM_LABELS[t]})
                      </td>
                      <td className="py-1.5 pr-3 text-right tabular-nums">
                        {n0(fit.coefficients[t].value)} ± {n0(fit.coefficients[t].stdErr)}
                      </td>
                      <td className="py-1.5 pr-3 text-xs">{COEFFICIENT_UNITS[t]}</td>
                      <td className="py-1.5 pr-3 text-right tabular-nums">{t === "intercept" ? "—" : fit.vif[t].toFixed(2)}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
              <p className="mt-1 text-xs text-ink-soft">
                n = {fit.n}, R² = {fit.r2.toFixed(3)}, residual standard error {n0(fit.residualStdErr)} cm⁻¹, leave-one-out RMSE {n0(fit.looRmse)} cm⁻¹, condition number {fit.conditionNumber.toFixed(1)}.
                Sources: Kamlet, Abboud, Abraham &amp; Taft 1983 (LSER); Reichardt 1994 (ET(30)); Kirkwood–Onsager f(εr); solvent parameters from the <Link href="/solvents" className="underline">solvent table</Link>.
              </p>
            </div>
          </div>
        )}
        {bandRows.length > 0 && (
          <div className="mt-4 overflow-x-auto">
            <table className="w-full text-left text-sm" aria-label="Band position per solvent and its source" data-testid="band-sources">
              <caption className="mb-1 text-left text-sm font-semibold">Band position per solvent, and which one the fit shown above uses</caption>
              <thead className="text-xs text-ink-soft">
                <tr>
                  <th className="py-1 pr-3">Solvent</th>
                  <th className="py-1 pr-3 text-right">Apparent band from colour (cm⁻¹)</th>
                  <th className="py-1 pr-3 text-right">ν̃max from spectra (cm⁻¹)</th>
                  <th className="py-1 pr-3">In the fit shown</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-line">
                {bandRows.map((r) => (
                  <tr key={r.solventId}>
                    <td className="py-1 pr-3">{r.solvent}</td>
                    <td className="py-1 pr-3 text-right tabular-nums">{r.colour === null ? "—" : n0(r.colour)}</td>
                    <td className="py-1 pr-3 text-right tabular-nums">{r.spectrum === null ? "—" : `${n0(r.spectrum.value)}${r.spectrum.n > 1 ? ` (mean of ${r.spectrum.n})` : ""}`}</td>
                    <td className="py-1 pr-3">{r.inFit ?? "—"}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Card>
      <Card title="Measured and predicted colours, ordered by Kamlet–Taft β" className="lg:col-span-3">
        <p className="mb-3 text-xs text-ink-soft">
          Solid swatches are measured (mean of accepted replicates); hatched swatches with a dashed border are <strong>predicted</strong> by the model above, with their uncertainty (± ΔE00,
          RMS over the prediction interval, combined with the band model’s own colour error). Neutral form, neat solvents, CIELAB D65; screen colours are approximate.
        </p>
        <ul className="flex flex-wrap gap-2" data-testid="model-strip">
          {strip.map((it) => (
            <li key={it.id} className="flex w-24 flex-col items-center text-center text-[11px] leading-tight">
              {it.measured ? <Swatch lab={it.measured.lab} size="lg" label={it.name} /> : <PredictedSwatch lab={it.predicted!.lab} uncertaintyDeltaE00={it.predicted!.uncertaintyDeltaE00} label={it.name} />}
              <span className="mt-1 font-medium">{it.name}</span>
              <span className="text-ink-soft">β {it.beta === null ? "—" : it.beta.toFixed(2)}</span>
              {it.measured ? (
                <span className="text-ink-soft">measured ×{it.measured.n}</span>
              ) : (
                <span className="font-medium text-ink">
                  predicted ± {it.predicted!.uncertaintyDeltaE00.toFixed(1)} ΔE00
                  {it.predicted!.extrapolated && <span className="block text-warn">extrapolated</span>}
                </span>
              )}
            </li>
          ))}
        </ul>
        <form method="get" action="/tune" className="mt-4 flex flex-wrap items-end gap-2 text-sm" aria-label="Tune this dye">
          <input type="hidden" name="dye" value={dyeCode} />
          <label className="block">
            <span className="font-medium">Find a solvent or blend for a colour</span>
            <input name="target" placeholder="7a3fa0, 40,45,-50 or violet" className="mt-1 block w-56 rounded-md border border-line px-2 py-2" />
          </label>
          <button type="submit" className="rounded-md border border-accent bg-accent px-3 py-2 font-medium text-white">
            Tune
          </button>
        </form>
      </Card>
    </>
  );
}
