import Papa from "papaparse";

export type ShortlistCsvRow = { code: string; name: string; dyeClass: string; casNumber: string | null; molarMass: number | null; acceptedMeasurements: number; note: string; hazards: string };

/** CSV (RFC 4180 quoting via papaparse) of a shortlist, one dye per row, header first. */
export function shortlistToCsv(rows: ShortlistCsvRow[]): string {
  return Papa.unparse({
    fields: ["code", "name", "class", "cas_number", "molar_mass_g_mol", "accepted_measurements", "note", "hazards"],
    data: rows.map((r) => [r.code, r.name, r.dyeClass, r.casNumber ?? "", r.molarMass ?? "", r.acceptedMeasurements, r.note, r.hazards]),
  });
}

/** A file name safe on every OS, from the shortlist's name. */
export function csvFileName(name: string): string {
  const base = name.normalize("NFKD").replace(/[^\w.-]+/g, "-").replace(/^-+|-+$/g, "").slice(0, 60);
  return `${base || "shortlist"}.csv`;
}
