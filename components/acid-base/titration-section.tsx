import { formColours, pkaText, transitionText } from "@/components/acid-base/format";
import Link from "next/link";
import { ButtonLink } from "@/components/ui/button";
import { Badge, Card } from "@/components/ui/card";
import { Swatch } from "@/components/ui/swatch";
import { phSeriesForDye, type PhSeries } from "@/db/queries/acid-base";
import { phSeriesWithFits, type PhSeriesSummary, type SeriesVial, type StoredPhFit } from "@/db/queries/ph-series";
import type { Lab } from "@/lib/color/types";
import type { Db } from "@/db/connection";
import { labD65ToHex } from "@/lib/color/display";
import { ColorInputError } from "@/lib/color/errors";
import { TwoFormModel, apparentBaseFraction, baseFraction, daviesCorrectedPka, fitPkaFromColours, type PkaFit } from "@/lib/color/pka";
import { ThreeFormModel, apparentProtonsReleased, protonsReleased } from "@/lib/color/pka-two-step";
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

const oneStep = (fit: PkaFit | { error: string }, vials: number): Fitted | { error: string } => ("error" in fit ? fit : { ok: true, steps: 1, fit, vials });

/** One block of the section: a grouped series with its stored fit, or an ungrouped one fitted here. */
type Block = {
  key: string;
  heading: string;
  solventName: string;
  additives: string[];
  ionicStrengthMolL: number | null;
  vials: { pH: number; lab: Lab }[];
  pending: number;
  fit: Fitted | { error: string };
  editHref?: string;
};

type Fitted = Extract<StoredPhFit, { ok: true }>;

/** The block of a grouped series with its stored fit (dye page and the series page). */
export function seriesBlock(s: PhSeriesSummary & { vials: SeriesVial[] }, fit: StoredPhFit, editHref?: string): Block {
  return {
    key: s.id,
    heading: `${s.name} · ${s.mediumLabel}`,
    solventName: s.mediumLabel,
    additives: [],
    ionicStrengthMolL: s.ionicStrengthMolL,
    vials: s.vials.filter((v) => v.reviewState === "accepted"),
    pending: s.vials.filter((v) => v.reviewState === "pending").length,
    fit: fit.ok ? fit : { error: fit.error },
    editHref,
  };
}

function blocksFor(db: Db, dyeId: string, canEdit: boolean): { blocks: Block[]; grouped: boolean } {
  const grouped = phSeriesWithFits(db, { dyeId });
  if (grouped.length > 0) {
    return {
      grouped: true,
      blocks: grouped.map((s) => seriesBlock(s, s.fit, canEdit ? `/acid-base/${encodeURIComponent(s.id)}` : undefined)),
    };
  }
  return {
    grouped: false,
    blocks: phSeriesForDye(db, { dyeId }).map((s): Block => ({
      key: s.solvent.id,
      heading: `${s.solvent.name}${s.additives.length ? ` (${s.additives.join("; ")})` : ""}, not grouped yet`,
      solventName: s.solvent.name,
      additives: s.additives,
      ionicStrengthMolL: s.ionicStrengthsMolL.length === 1 ? s.ionicStrengthsMolL[0] : null,
      vials: s.vials,
      pending: 0,
      fit: oneStep(fitFor(s), s.vials.length),
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
        shaded band is the visual transition: where the colour differs from both end colours by ΔE00 ≥ 3 (common practice, no source). {TWO_STEP_NOTE}
      </p>
    </Card>
  );
}

/** A series fitted with two steps is drawn as protons released per dye; its notes say how. */
export const TWO_STEP_NOTE =
  "A series fitted with two steps (H2In ⇌ HIn⁻ ⇌ In²⁻, the chemist's choice on the series page) has three forms, each one band, with fractions [H⁺]² : [H⁺]·Ka1 : Ka1·Ka2, and is drawn as protons released per dye (0–2), with one shaded band per step.";

/** The fitted curve and the vials placed on it, for either fit. */
function curveOf(fit: Fitted, points: { pH: number; lab: Lab }[]) {
  const transitions = fit.steps === 1 ? [fit.fit.transition] : fit.fit.transitions;
  const lo = Math.min(...points.map((v) => v.pH), ...transitions.map((t) => t[0])) - 0.5;
  const hi = Math.max(...points.map((v) => v.pH), ...transitions.map((t) => t[1])) + 0.5;
  const grid = Array.from({ length: 161 }, (_, i) => lo + ((hi - lo) * i) / 160);
  if (fit.steps === 1) {
    const model = new TwoFormModel(fit.fit.acidBand, fit.fit.baseBand);
    return {
      pKas: [fit.fit.pKa],
      transitions,
      vials: points.map((v) => ({ pH: v.pH, fraction: apparentBaseFraction(model, v.lab), hex: labD65ToHex(v.lab) })),
      curve: grid.map((pH) => ({ pH, fraction: baseFraction(pH, fit.fit.pKa) })),
      yLabel: "base fraction",
      yMax: 1,
    };
  }
  const [p1, p2] = fit.fit.pKas;
  const model = new ThreeFormModel(fit.fit.bands);
  return {
    pKas: fit.fit.pKas,
    transitions,
    vials: points.map((v) => ({ pH: v.pH, fraction: apparentProtonsReleased(model, v.lab, p1, p2), hex: labD65ToHex(v.lab) })),
    curve: grid.map((pH) => ({ pH, fraction: protonsReleased(pH, p1, p2) })),
    yLabel: "H⁺ released per dye",
    yMax: 2,
  };
}

/** Davies-corrected constants (I → 0) in water: the first step's acid form neutral, the second's charged −1. */
function daviesText(fit: Fitted, ionic: number): string {
  if (fit.steps === 1) return `Davies-corrected to I = 0 (neutral acid form): ${daviesCorrectedPka(fit.fit.pKa, ionic).toFixed(2)}.`;
  return `Davies-corrected to I = 0 (H2In neutral, HIn⁻ charged −1): pKa₁ ${daviesCorrectedPka(fit.fit.pKas[0], ionic, 0).toFixed(2)}, pKa₂ ${daviesCorrectedPka(fit.fit.pKas[1], ionic, -1).toFixed(2)}.`;
}

export function SeriesBlock({ block }: { block: Block }) {
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
  const chart = curveOf(fit, points);
  const ionic = block.ionicStrengthMolL;
  const isWater = block.solventName === "Water";
  const medium = block.heading;
  return (
    <div className="grid gap-4 md:grid-cols-3">
      <div className="space-y-2 text-sm">
        {title}
        <p data-testid="pka-value" className="text-lg font-semibold tabular-nums">
          {pkaText(fit)}
        </p>
        <p className="text-ink-soft">
          Apparent {fit.steps === 1 ? "pKa" : "pKa's"} in {block.solventName}
          {ionic !== null ? ` at ionic strength ${ionic} mol/L` : ", ionic strength not recorded"}
          {isWater ? "" : "; pH in this medium is not aqueous pH"}.{" "}
          {ionic !== null && isWater && daviesText(fit, ionic)}
        </p>
        <p className="tabular-nums">
          Visual transition {transitionText(fit)} · {points.length} vials · fit RMS ΔE00 {fit.fit.rmsDeltaE00.toFixed(2)}
        </p>
        {pendingNote && <p className="text-ink-soft">{pendingNote.trim()}</p>}
        <div className="flex items-center gap-4">
          {formColours(fit).map((c) => (
            <span key={c.name} className="flex flex-col items-center text-xs" data-testid="form-colour">
              <Swatch lab={c.lab} size="lg" label={c.name} />
              {c.name}
            </span>
          ))}
          {fit.steps === 1 && <span className="text-xs text-ink-soft">contrast ΔE00 {fit.fit.contrastDeltaE00.toFixed(0)}</span>}
        </div>
        {fit.fit.messages.length > 0 && (
          <ul className="space-y-1">
            {fit.fit.messages.map((m) => (
              <li key={m}>
                <Badge tone="warn">check</Badge> {m}
              </li>
            ))}
          </ul>
        )}
      </div>
      <div className="md:col-span-2">
        <TitrationChart vials={chart.vials} curve={chart.curve} pKas={chart.pKas} transitions={chart.transitions} yLabel={chart.yLabel} yMax={chart.yMax} label={medium} />
      </div>
    </div>
  );
}
