import { csvFileName as safeFileName, writeCsv } from "../csv/write";
import { replicateMeans } from "./replicates";

export type ShortlistCsvRow = { code: string; name: string; dyeClass: string; casNumber: string | null; molarMass: number | null; acceptedMeasurements: number; note: string; hazards: string };

/** The solvent parameters that travel with each colour (units: ET(30) kcal/mol; the others dimensionless). */
export type SolventParameters = { et30: number | null; etn: number | null; alpha: number | null; beta: number | null; piStar: number | null; permittivity: number | null };

/** One accepted measurement of a shortlisted dye, with the condition it was measured in. */
export type ConditionColour = {
  dyeCode: string;
  conditionId: string;
  solvent: string;
  medium: string;
  acidBase: string;
  ph: number | null;
  additive: string;
  temperatureC: number | null;
  secondSolvent: string | null;
  secondSolventMoleFraction: number | null;
  solventParameters: SolventParameters;
  /** Reference white and observer of the stored CIELAB, e.g. "D65, CIE 1931 2°". */
  whitePoint: string;
  /** CIELAB as stored. */
  lab: [number, number, number];
};

/**
 * The colour of a dye in one condition: mean of its accepted replicates, their count and sample standard
 * deviation, and their spread in ΔE00 (null for a single replicate).
 */
export type ConditionSummary = Omit<ConditionColour, "lab"> & {
  n: number;
  mean: [number, number, number];
  sd: [number, number, number] | null;
  /** RMS of the replicates' CIEDE2000 distances from their mean, as the search reports it (lib/search/replicates.ts). */
  spreadDeltaE00: number | null;
  chroma: number;
  hueDeg: number;
};

/** "Acetonitrile, base, pH 11, 25 °C": the condition in words, as the pages name it. */
export function conditionName(c: Pick<ConditionColour, "solvent" | "acidBase" | "ph" | "additive" | "temperatureC" | "secondSolvent" | "secondSolventMoleFraction">): string {
  const parts = [c.secondSolvent && c.secondSolventMoleFraction !== null ? `${c.solvent} + ${c.secondSolvent} (x₂ = ${c.secondSolventMoleFraction})` : c.solvent, c.acidBase];
  if (c.ph !== null) parts.push(`pH ${c.ph}`);
  if (c.additive) parts.push(c.additive);
  if (c.temperatureC !== null) parts.push(`${c.temperatureC} °C`);
  return parts.join(", ");
}

/**
 * Groups accepted measurements by dye and condition. Replicates are summarised as the arithmetic mean
 * of L*, a*, b* with the sample standard deviation (n − 1) of each, so a reader sees the spread and not
 * only a mean; C*ab and hab are computed from the mean (CIE 15:2004, §8.2.1). The ΔE00 spread is the
 * search's (lib/search/replicates.ts), so a shortlist and a search hit agree.
 */
export function summariseByCondition(rows: ConditionColour[]): ConditionSummary[] {
  const groups = new Map<string, ConditionColour[]>();
  for (const r of rows) {
    const key = `${r.dyeCode}\u0000${r.conditionId}\u0000${r.whitePoint}`;
    const list = groups.get(key) ?? [];
    list.push(r);
    groups.set(key, list);
  }
  return [...groups.values()].map((list) => {
    const n = list.length;
    const mean = [0, 1, 2].map((k) => list.reduce((s, r) => s + r.lab[k], 0) / n) as [number, number, number];
    const sd = n > 1 ? ([0, 1, 2].map((k) => Math.sqrt(list.reduce((s, r) => s + (r.lab[k] - mean[k]) ** 2, 0) / (n - 1))) as [number, number, number]) : null;
    const { lab: _lab, ...condition } = list[0];
    const hue = (Math.atan2(mean[2], mean[1]) * 180) / Math.PI;
    const [replicates] = replicateMeans(list.map((r) => ({ dyeId: r.dyeCode, conditionId: r.conditionId, solventId: r.conditionId, acidBase: r.acidBase, ph: r.ph, lab: r.lab })));
    const spreadDeltaE00 = n > 1 ? replicates.spreadDeltaE00 : null;
    return { ...condition, n, mean, sd, spreadDeltaE00, chroma: Math.hypot(mean[1], mean[2]), hueDeg: hue < 0 ? hue + 360 : hue };
  });
}

/** Each dye's condition colours, keyed by dye code, in the order of their condition names. */
export function coloursByDye(colours: ConditionSummary[]): Map<string, ConditionSummary[]> {
  const byDye = new Map<string, ConditionSummary[]>();
  for (const c of colours) byDye.set(c.dyeCode, [...(byDye.get(c.dyeCode) ?? []), c]);
  for (const list of byDye.values()) list.sort((x, y) => conditionName(x).localeCompare(conditionName(y)));
  return byDye;
}

const DYE_FIELDS = ["code", "name", "class", "cas_number", "molar_mass_g_mol", "accepted_measurements", "note", "hazards"];
const COLOUR_FIELDS = [
  "condition", "solvent", "medium", "acid_base", "ph", "additive", "temperature_c", "second_solvent", "second_solvent_mole_fraction",
  "replicates", "L", "a", "b", "C", "h_deg", "sd_L", "sd_a", "sd_b", "white_point",
  "solvent_et30_kcal_mol", "solvent_etn", "solvent_kt_alpha", "solvent_kt_beta", "solvent_kt_pi_star", "solvent_permittivity",
];

const blank = (v: number | string | null | undefined) => (v === null || v === undefined ? "" : v);

/**
 * CSV of a shortlist (through the shared writer in lib/csv): one row per dye and condition, so each colour
 * travels with the condition it was measured in and that solvent's parameters. A dye without accepted
 * colours still gets one row, its colour columns empty. Values are not rounded.
 */
export function shortlistToCsv(rows: ShortlistCsvRow[], colours: ConditionSummary[] = []): string {
  const byDye = coloursByDye(colours);
  const data: (string | number)[][] = [];
  for (const r of rows) {
    const dye = [r.code, r.name, r.dyeClass, r.casNumber ?? "", r.molarMass ?? "", r.acceptedMeasurements, r.note, r.hazards];
    const list = byDye.get(r.code) ?? [];
    if (list.length === 0) data.push([...dye, ...COLOUR_FIELDS.map(() => "")]);
    for (const c of list) {
      const p = c.solventParameters;
      data.push([
        ...dye,
        conditionName(c), c.solvent, c.medium, c.acidBase, blank(c.ph), c.additive, blank(c.temperatureC), blank(c.secondSolvent), blank(c.secondSolventMoleFraction),
        c.n, c.mean[0], c.mean[1], c.mean[2], c.chroma, c.hueDeg, blank(c.sd?.[0]), blank(c.sd?.[1]), blank(c.sd?.[2]), c.whitePoint,
        blank(p.et30), blank(p.etn), blank(p.alpha), blank(p.beta), blank(p.piStar), blank(p.permittivity),
      ]);
    }
  }
  return writeCsv([...DYE_FIELDS, ...COLOUR_FIELDS], data);
}

/** A file name safe on every OS, from the shortlist's name. */
export function csvFileName(name: string): string {
  return safeFileName(name, "shortlist");
}
