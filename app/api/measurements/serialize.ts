import { writeCsv } from "@/lib/csv/write";
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
    instrument: m.instrument,
    region: m.region,
    pixels: m.pixelCount,
    rejected: m.rejectedCount,
    spread: m.spread,
    /** Standard uncertainties of L*, a*, b* and the combined ± ΔE00 (null for rows made before they were stored). */
    uncertainty: m.uDeltaE00 === null ? null : { l: m.uL, a: m.uA, b: m.uB },
    uncertaintyDeltaE00: m.uDeltaE00,
    /** "white-card-only": corrected by an in-photo white reference alone, with no lighting profile. */
    correctionBasis: m.lightingProfileId ? "profile" : m.correctionKind === "white-scaling" ? "white-card-only" : m.correctionKind && m.correctionKind !== "none" ? "other" : "uncorrected",
    flags: m.flags,
    flagReason: m.flagReason,
    reviewState: m.reviewState,
    measuredAt: m.createdAt.toISOString(),
    measuredBy: r.author,
  };
}

export const CSV_COLUMNS = [
  "id", "dye_code", "dye_name", "solvent", "medium", "acid_base", "ph", "additive", "concentration_umol_l",
  "L", "a", "b", "C", "h", "X", "Y", "Z", "raw_linear_r", "raw_linear_g", "raw_linear_b", "illuminant", "observer",
  "lighting_profile", "pixels", "rejected", "spread", "flags", "flag_reason", "review_state", "measured_at", "measured_by", "photo_id",
  "solvent_et30_kcal_mol", "solvent_etn", "solvent_kt_alpha", "solvent_kt_beta", "solvent_kt_pi_star", "solvent_permittivity",
  // Standard uncertainties (JCGM 100:2008, k = 1) of L*, a*, b* in CIELAB units, and the combined ± in ΔE00; empty when not recorded.
  "u_L_cielab", "u_a_cielab", "u_b_cielab", "u_delta_e00",
] as const;

/** The shared writer (lib/csv) defuses formula-looking text; numbers stay numbers. */
export function measurementsCsv(rows: MeasurementRow[]): string {
  const data = rows.map((r) => {
    const { m } = r;
    return [
      m.id, r.dye.code, r.dye.name, r.solvent.name, r.solvent.medium, r.condition.acidBase, r.condition.ph ?? "",
      r.condition.additive, r.condition.concentrationUmolL ?? "", m.l, m.a, m.b, r.chroma, r.hue, m.x, m.y, m.z, m.rawR, m.rawG, m.rawB,
      m.illuminant, m.observer, r.profile?.name ?? "", m.pixelCount, m.rejectedCount, m.spread, m.flags.join(" "), m.flagReason,
      m.reviewState, m.createdAt.toISOString(), r.author, m.photoId ?? "",
      r.solvent.et30 ?? "", r.solvent.etn ?? "", r.solvent.ktAlpha ?? "", r.solvent.ktBeta ?? "", r.solvent.ktPiStar ?? "", r.solvent.permittivity ?? "",
      m.uL ?? "", m.uA ?? "", m.uB ?? "", m.uDeltaE00 ?? "",
    ];
  });
  return writeCsv(CSV_COLUMNS, data);
}
