import type { PhSeriesSummary, StoredPhFit } from "@/db/queries/ph-series";
import type { Lab } from "@/lib/color/types";
import { count } from "@/lib/text/count";

/** A pKa's standard error for display: two decimals, or "—" when the bootstrap could not give one. */
export function seText(se: number | null | undefined): string {
  return se === null || se === undefined || !Number.isFinite(se) ? "—" : se.toFixed(2);
}

type Fitted = Extract<StoredPhFit, { ok: true }>;

/** The fitted constants with their SEs: "pKa 7.30 ± 0.01" or "pKa₁ 1.66 ± 0.01, pKa₂ 9.19 ± 0.01". */
export function pkaText(r: Fitted): string {
  if (r.steps === 1) return `pKa ${r.fit.pKa.toFixed(2)} ± ${seText(r.fit.pKaStdErr)}`;
  return `pKa₁ ${r.fit.pKas[0].toFixed(2)} ± ${seText(r.fit.pKaStdErrs[0])}, pKa₂ ${r.fit.pKas[1].toFixed(2)} ± ${seText(r.fit.pKaStdErrs[1])}`;
}

/** The visual transition interval(s): "pH 6.2–8.1" or "pH 0.5–3.0 and 7.9–10.4". */
export function transitionText(r: Fitted): string {
  const one = ([lo, hi]: [number, number]) => `${lo.toFixed(1)}–${hi.toFixed(1)}`;
  return r.steps === 1 ? `pH ${one(r.fit.transition)}` : `pH ${one(r.fit.transitions[0])} and ${one(r.fit.transitions[1])}`;
}

/** The forms' colours, most acidic first, with their names. */
export function formColours(r: Fitted): { lab: Lab; name: string }[] {
  if (r.steps === 1) return [{ lab: r.fit.acidLab, name: "acid form" }, { lab: r.fit.baseLab, name: "base form" }];
  return r.fit.labs.map((lab, i) => ({ lab, name: ["H2In (acid form)", "HIn⁻ (middle form)", "In²⁻ (base form)"][i] }));
}

/** The headings the series list uses, the same in its table (md and up) and its cards (phones). */
export const SERIES_LABELS = {
  dye: "Dye",
  series: "Series",
  medium: "Medium",
  ionicStrength: "Ionic strength",
  pka: "Apparent pKa",
  transition: "Visual transition",
  forms: "Acid → base form",
} as const;

/** One series as the list shows it: every text formatted once, for both layouts. */
export type SeriesRowView = {
  id: string;
  href: string;
  name: string;
  dye: { code: string; name: string; href: string };
  medium: string;
  ionicStrength: string;
  vials: string;
  fitted: { pka: string; transition: string; colours: { lab: Lab; name: string }[]; messages: string[] } | null;
  /** Why there is no pKa, when there is none. */
  refusal: string | null;
};

export function seriesRowView(s: PhSeriesSummary & { fit: StoredPhFit }): SeriesRowView {
  const vials = count(s.fit.vials, "accepted vial");
  return {
    id: s.id,
    href: `/acid-base/${encodeURIComponent(s.id)}`,
    name: s.name,
    dye: { code: s.dye.code, name: s.dye.name, href: `/catalogue/${encodeURIComponent(s.dye.code)}` },
    medium: s.mediumLabel,
    ionicStrength: s.ionicStrengthMolL === null ? "not recorded" : `${s.ionicStrengthMolL} mol/L`,
    vials,
    // pKa is a pH on the medium's own scale: apparent, for this medium and ionic strength.
    fitted: s.fit.ok ? { pka: `${pkaText(s.fit)} pH units`, transition: transitionText(s.fit), colours: formColours(s.fit), messages: s.fit.fit.messages } : null,
    refusal: s.fit.ok ? null : `No pKa (${vials}): ${s.fit.error}`,
  };
}
