import { Card } from "@/components/ui/card";
import { spectraForDye } from "@/db/queries/spectra";
import type { Db } from "@/db/connection";
import { SpectraChart } from "./spectra-chart";

const amount = (v: number | null, unit: string) => (v === null ? `unrecorded ${unit === "mm" ? "path" : "concentration"}` : `${v} ${unit}`);

/** The dye page's spectra: overlays across solvents, λmax, colour by Beer–Lambert under a chosen light. */
export function SpectraSection({ db, dyeId }: { db: Db; dyeId: string }) {
  const list = spectraForDye(db, { dyeId });
  if (list.length === 0) return null;
  const spectra = list.map((s) => ({
    id: s.id,
    label: `${s.solvent}${s.acidBase !== "neutral" ? `, ${s.acidBase}` : ""}${s.pH !== null ? ` pH ${s.pH}` : ""}`,
    points: s.points,
    concentrationUmolL: s.concentrationUmolL,
    pathLengthMm: s.pathLengthMm,
    source: [
      `${amount(s.concentrationUmolL, "µmol/L")}, ${amount(s.pathLengthMm, "mm")}`,
      s.instrument || "instrument not recorded",
      s.originalName ? `file ${s.originalName}${s.wavelengthUnit !== "nm" ? ` (sent in ${s.wavelengthUnit})` : ""}` : null,
      s.createdAt.toISOString().slice(0, 10),
    ]
      .filter(Boolean)
      .join(" · "),
  }));
  return (
    <Card title={`Absorption spectra (${list.length})`} className="lg:col-span-3">
      <SpectraChart spectra={spectra} />
      <p className="mt-3 text-xs text-ink-soft">
        Each spectrum as measured, with its concentration, path length and instrument beside it. λmax is the maximum of the longest-wavelength band in the visible (380–780 nm), the
        band E<sub>T</sub>(30)-type scales use, not the strongest band (“no band in the visible” when there is only a rising UV tail); E<sub>T</sub> = 28591/λmax kcal/mol (Reichardt 1994). Neutral spectra
        in neat solvents give the solvent model its band positions ν̃max = 10⁷/λmax cm⁻¹ where there are enough of them. Colours: CIE 015 summation at 1 nm, CIE 1931 2° observer,
        CIELAB relative to the chosen illuminant&apos;s white, absorbance scaled by Beer–Lambert to the concentration × path length given. UV–visible work: shield UV sources and follow
        your lab&apos;s safety officer and local regulations.
      </p>
    </Card>
  );
}
