import Papa from "papaparse";
import type { MeasurementRow } from "@/db/queries/measurements";

/** The public JSON shape of a measurement (CONTRACT.md: id, dye, lab, condition; the rest added). */
export function measurementJson(r: MeasurementRow) {
  const { m } = r;
  return {
    id: m.id,
    dye: r.dye,
    lab: [m.l, m.a, m.b],
    lch: [m.l, r.chroma, r.hue],
    condition: {
      solvent: r.solvent.name,
      solventId: r.solvent.id,
      medium: r.solvent.medium,
      acidBase: r.condition.acidBase,
      pH: r.condition.ph,
      additive: r.condition.additive,
      concentrationUmolL: r.condition.concentrationUmolL,
    },
    illuminant: m.illuminant,
    observer: m.observer,
    xyz: [m.x, m.y, m.z],
    rawLinearRgb: [m.rawR, m.rawG, m.rawB],
    correction: m.correctionKind ? { kind: m.correctionKind, values: m.correction ?? [] } : null,
    lightingProfile: r.profile?.id ? r.profile : null,
    photoId: m.photoId,
    region: m.region,
    pixels: m.pixelCount,
    rejected: m.rejectedCount,
    spread: m.spread,
    flags: m.flags,
    flagReason: m.flagReason,
    reviewState: m.reviewState,
    measuredAt: m.createdAt.toISOString(),
    measuredBy: r.author,
  };
}

/** Spreadsheet programs run a cell starting with = + - @ as a formula; text cells get a leading quote. */
function safeText(v: string | null | undefined): string {
  const s = v ?? "";
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
}

export const CSV_COLUMNS = [
  "id", "dye_code", "dye_name", "solvent", "medium", "acid_base", "ph", "additive", "concentration_umol_l",
  "L", "a", "b", "C", "h", "X", "Y", "Z", "raw_linear_r", "raw_linear_g", "raw_linear_b", "illuminant", "observer",
  "lighting_profile", "pixels", "rejected", "spread", "flags", "flag_reason", "review_state", "measured_at", "measured_by", "photo_id",
  "solvent_et30_kcal_mol", "solvent_etn", "solvent_kt_alpha", "solvent_kt_beta", "solvent_kt_pi_star", "solvent_permittivity",
] as const;

export function measurementsCsv(rows: MeasurementRow[]): string {
  const data = rows.map((r) => {
    const { m } = r;
    return [
      m.id, safeText(r.dye.code), safeText(r.dye.name), safeText(r.solvent.name), r.solvent.medium, r.condition.acidBase, r.condition.ph ?? "",
      safeText(r.condition.additive), r.condition.concentrationUmolL ?? "", m.l, m.a, m.b, r.chroma, r.hue, m.x, m.y, m.z, m.rawR, m.rawG, m.rawB,
      m.illuminant, m.observer, safeText(r.profile?.name ?? ""), m.pixelCount, m.rejectedCount, m.spread, m.flags.join(" "), safeText(m.flagReason),
      m.reviewState, m.createdAt.toISOString(), safeText(r.author), m.photoId ?? "",
      r.solvent.et30 ?? "", r.solvent.etn ?? "", r.solvent.ktAlpha ?? "", r.solvent.ktBeta ?? "", r.solvent.ktPiStar ?? "", r.solvent.permittivity ?? "",
    ];
  });
  return Papa.unparse({ fields: [...CSV_COLUMNS], data }, { newline: "\r\n" }) + "\r\n";
}
