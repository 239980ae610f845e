import { seText } from "@/components/acid-base/format";
import Link from "next/link";
import { ButtonLink } from "@/components/ui/button";
import { Badge, Card } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { phSeriesForDye, type PhSeries } from "@/db/queries/acid-base";
import { phSeriesWithFits } from "@/db/queries/ph-series";
import type { Lab } from "@/lib/color/types";
import type { Db } from "@/db/connection";
import { labD65ToHex } from "@/lib/color/display";
import { ColorInputError } from "@/lib/color/errors";
import { TwoFormModel, apparentBaseFraction, baseFraction, daviesCorrectedPka, fitPkaFromColours, type PkaFit } from "@/lib/color/pka";
import { TitrationChart } from "./titration-chart";

/** Fits of ungrouped series are deterministic in their vials; keep them while the process runs (a fit takes a second or two). */
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

/** One block of the section: a grouped series with its stored fit, or an ungrouped one fitted here. */
type Block = {
  key: string;
  heading: string;
  solventName: string;
  additives: string[];
  ionicStrengthMolL: number | null;
  vials: { pH: number; lab: Lab }[];
  pending: number;
  fit: PkaFit | { error: string };
  editHref?: string;
};

function blocksFor(db: Db, dyeId: string, canEdit: boolean): { blocks: Block[]; grouped: boolean } {
  const grouped = phSeriesWithFits(db, { dyeId });
  if (grouped.length > 0) {
    return {
      grouped: true,
      blocks: grouped.map((s) => ({
        key: s.id,
        heading: `${s.name} · ${s.mediumLabel}`,
        solventName: s.mediumLabel,
        additives: [],
        ionicStrengthMolL: s.ionicStrengthMolL,
        vials: s.fitted,
        pending: s.pending,
        fit: s.fit.ok ? s.fit.fit : { error: s.fit.error },
        editHref: canEdit ? `/acid-base/${encodeURIComponent(s.id)}` : undefined,
      })),
    };
  }
  return {
    grouped: false,
    blocks: phSeriesForDye(db, { dyeId }).map((s) => ({
      key: s.solvent.id,
      heading: `${s.solvent.name}${s.additives.length ? ` (${s.additives.join("; ")})` : ""}, not grouped yet`,
      solventName: s.solvent.name,
      additives: s.additives,
      ionicStrengthMolL: s.ionicStrengthsMolL.length === 1 ? s.ionicStrengthsMolL[0] : null,
      vials: s.vials,
      pending: 0,
      fit: fitFor(s),
    })),
  };
}

/** The dye page's acid–base section: one titration curve and pKa per pH series. */
export function TitrationSection({ db, dyeId, canEdit = false }: { db: Db; dyeId: string; canEdit?: boolean }) {
  const { blocks, grouped } = blocksFor(db, dyeId, canEdit);
  if (blocks.length === 0) return null;
  return (
    <Card
      title="pKa and titration curve"
      className="lg:col-span-3"
      actions={
        canEdit ? (
          <ButtonLink href={`/acid-base/new?dyeId=${encodeURIComponent(dyeId)}`} variant="secondary">
            Group vials into a pH series
          </ButtonLink>
        ) : undefined
      }
    >
      {!grouped && (
        <p className="mb-4 text-sm text-ink-soft">
          These vials are not grouped into a named pH series yet: they are the dye's accepted colours with a recorded pH, one series per solvent, fitted on this page. Group them to store
          the fit and to let the pH search find this dye.
        </p>
      )}
      <div className="space-y-6">
        {blocks.map((b) => (
          <SeriesBlock key={b.key} block={b} />
        ))}
      </div>
      <p className="mt-4 text-xs text-ink-soft">
        Fit: each form is one absorption band (Gaussian in wavenumber); every vial is the CIE colour (D65, CIE 1931 2°) of the two forms mixed per wavelength by
        Beer–Lambert, with the base fraction from Henderson–Hasselbalch; pKa and both bands minimise the sum of squared ΔE00 over the accepted vials. ± is the standard
        deviation of refits over vials resampled with replacement (bootstrap). Vials are plotted at the base fraction their colour corresponds to on the fitted path. The
        shaded band is the visual transition: where the colour differs from both end colours by ΔE00 ≥ 3 (common practice, no source).
      </p>
    </Card>
  );
}

function SeriesBlock({ block }: { block: Block }) {
  const { fit, vials: points } = block;
  const title = (
    <h3 className="flex flex-wrap items-center gap-2 text-sm font-semibold">
      {block.heading}
      {block.editHref && (
        <Link href={block.editHref} className="text-xs font-normal underline">
          edit series
        </Link>
      )}
    </h3>
  );
  const pendingNote = block.pending > 0 ? ` ${block.pending} more vial${block.pending === 1 ? " waits" : "s wait"} for review and ${block.pending === 1 ? "is" : "are"} not fitted yet.` : "";
  if ("error" in fit) {
    return (
      <div>
        {title}
        <p className="text-sm text-ink-soft">
          {points.length} accepted vials; no pKa: {fit.error}
          {pendingNote}
        </p>
      </div>
    );
  }
  const model = new TwoFormModel(fit.acidBand, fit.baseBand);
  const vials = points.map((v) => ({ pH: v.pH, fraction: apparentBaseFraction(model, v.lab), hex: labD65ToHex(v.lab) }));
  const lo = Math.min(...points.map((v) => v.pH), fit.transition[0]) - 0.5;
  const hi = Math.max(...points.map((v) => v.pH), fit.transition[1]) + 0.5;
  const curve = Array.from({ length: 121 }, (_, i) => lo + ((hi - lo) * i) / 120).map((pH) => ({ pH, fraction: baseFraction(pH, fit.pKa) }));
  const ionic = block.ionicStrengthMolL;
  const isWater = block.solventName === "Water";
  const medium = block.heading;
  return (
    <div className="grid gap-4 md:grid-cols-3">
      <div className="space-y-2 text-sm">
        {title}
        <p data-testid="pka-value" className="text-lg font-semibold tabular-nums">
          pKa {fit.pKa.toFixed(2)} ± {seText(fit.pKaStdErr)}
        </p>
        <p className="text-ink-soft">
          Apparent pKa in {block.solventName}
          {ionic !== null ? ` at ionic strength ${ionic} mol/L` : ", ionic strength not recorded"}
          {isWater ? "" : "; pH in this medium is not aqueous pH"}.{" "}
          {ionic !== null && isWater && <>Davies-corrected to I = 0 (neutral acid form): {daviesCorrectedPka(fit.pKa, ionic).toFixed(2)}.</>}
        </p>
        <p className="tabular-nums">
          Visual transition pH {fit.transition[0].toFixed(1)}–{fit.transition[1].toFixed(1)} · {points.length} vials · fit RMS ΔE00 {fit.rmsDeltaE00.toFixed(2)}
        </p>
        {pendingNote && <p className="text-ink-soft">{pendingNote.trim()}</p>}
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
