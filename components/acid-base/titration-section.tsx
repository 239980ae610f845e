import { Badge, Card } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { phSeriesForDye, type PhSeries } from "@/db/queries/acid-base";
import type { Db } from "@/db/connection";
import { labD65ToHex } from "@/lib/color/display";
import { ColorInputError } from "@/lib/color/errors";
import { TwoFormModel, apparentBaseFraction, baseFraction, daviesCorrectedPka, fitPkaFromColours, type PkaFit } from "@/lib/color/pka";
import { TitrationChart } from "./titration-chart";

/** Fits are deterministic in their vials; keep them while the process runs (a fit takes a second or two). */
const fits = new Map<string, PkaFit | { error: string }>();

function fitFor(series: PhSeries): PkaFit | { error: string } {
  const key = JSON.stringify(series.vials.map((v) => [v.pH, ...v.lab]));
  let fit = fits.get(key);
  if (!fit) {
    try {
      fit = fitPkaFromColours(series.vials);
    } catch (error) {
      if (!(error instanceof ColorInputError)) throw error;
      fit = { error: error.message };
    }
    fits.set(key, fit);
  }
  return fit;
}

/** The dye page's acid–base section: one titration curve and pKa per pH series. */
export function TitrationSection({ db, dyeId }: { db: Db; dyeId: string }) {
  const series = phSeriesForDye(db, { dyeId });
  if (series.length === 0) return null;
  return (
    <Card title="pKa and titration curve" className="lg:col-span-3">
      <div className="space-y-6">
        {series.map((s) => (
          <SeriesBlock key={s.solvent.id} series={s} />
        ))}
      </div>
      <p className="mt-4 text-xs text-ink-soft">
        Fit: each form is one absorption band (Gaussian in wavenumber); every vial is the CIE colour (D65, CIE 1931 2°) of the two forms mixed per wavelength by
        Beer–Lambert, with the base fraction from Henderson–Hasselbalch; pKa and both bands minimise the sum of squared ΔE00 over the vials. ± is the standard deviation
        of refits over vials resampled with replacement (bootstrap). Vials are plotted at the base fraction their colour corresponds to on the fitted path. The shaded
        band is the visual transition: where the colour differs from both end colours by ΔE00 ≥ 3 (common practice, no source).
      </p>
    </Card>
  );
}

function SeriesBlock({ series }: { series: PhSeries }) {
  const fit = fitFor(series);
  const medium = `${series.solvent.name}${series.additives.length ? ` (${series.additives.join("; ")})` : ""}`;
  if ("error" in fit) {
    return (
      <div>
        <h3 className="text-sm font-semibold">{medium}</h3>
        <p className="text-sm text-ink-soft">{series.vials.length} vials; no pKa: {fit.error}</p>
      </div>
    );
  }
  const model = new TwoFormModel(fit.acidBand, fit.baseBand);
  const vials = series.vials.map((v) => ({ pH: v.pH, fraction: apparentBaseFraction(model, v.lab), hex: labD65ToHex(v.lab) }));
  const lo = Math.min(series.vials[0].pH, fit.transition[0]) - 0.5;
  const hi = Math.max(series.vials[series.vials.length - 1].pH, fit.transition[1]) + 0.5;
  const curve = Array.from({ length: 121 }, (_, i) => lo + ((hi - lo) * i) / 120).map((pH) => ({ pH, fraction: baseFraction(pH, fit.pKa) }));
  const ionic = series.ionicStrengthsMolL.length === 1 ? series.ionicStrengthsMolL[0] : null;
  const isWater = series.solvent.name === "Water";
  return (
    <div className="grid gap-4 md:grid-cols-3">
      <div className="space-y-2 text-sm">
        <h3 className="font-semibold">{medium}</h3>
        <p data-testid="pka-value" className="text-lg font-semibold tabular-nums">
          pKa {fit.pKa.toFixed(2)} ± {fit.pKaStdErr.toFixed(2)}
        </p>
        <p className="text-ink-soft">
          Apparent pKa in {series.solvent.name}
          {ionic !== null ? ` at ionic strength ${ionic} mol/L` : ", ionic strength not recorded"}
          {isWater ? "" : "; pH in this medium is not aqueous pH"}.{" "}
          {ionic !== null && isWater && <>Davies-corrected to I = 0 (neutral acid form): {daviesCorrectedPka(fit.pKa, ionic).toFixed(2)}.</>}
        </p>
        <p className="tabular-nums">
          Visual transition pH {fit.transition[0].toFixed(1)}–{fit.transition[1].toFixed(1)} · {series.vials.length} vials · fit RMS ΔE00 {fit.rmsDeltaE00.toFixed(2)}
        </p>
        <div className="flex items-center gap-4">
          <span className="flex flex-col items-center text-xs">
            <Swatch lab={fit.acidLab} size="lg" label="acid form" />
            acid form
          </span>
          <span className="flex flex-col items-center text-xs">
            <Swatch lab={fit.baseLab} size="lg" label="base form" />
            base form
          </span>
          <span className="text-xs text-ink-soft">contrast ΔE00 {fit.contrastDeltaE00.toFixed(0)}</span>
        </div>
        {fit.messages.length > 0 && (
          <ul className="space-y-1">
            {fit.messages.map((m) => (
              <li key={m}>
                <Badge tone="warn">check</Badge> {m}
              </li>
            ))}
          </ul>
        )}
      </div>
      <div className="md:col-span-2">
        <TitrationChart vials={vials} curve={curve} pKa={fit.pKa} transition={fit.transition} label={medium} />
      </div>
    </div>
  );
}
