import { csvFileName as safeFileName, writeCsv } from "../csv/write";

export type ShortlistCsvRow = { code: string; name: string; dyeClass: string; casNumber: string | null; molarMass: number | null; acceptedMeasurements: number; note: string; hazards: string };

/** CSV of a shortlist, one dye per row, header first (through the shared writer in lib/csv). */
export function shortlistToCsv(rows: ShortlistCsvRow[]): string {
  return writeCsv(
    ["code", "name", "class", "cas_number", "molar_mass_g_mol", "accepted_measurements", "note", "hazards"],
    rows.map((r) => [r.code, r.name, r.dyeClass, r.casNumber, r.molarMass, r.acceptedMeasurements, r.note, r.hazards]),
  );
}

/** A file name safe on every OS, from the shortlist's name. */
export function csvFileName(name: string): string {
  return safeFileName(name, "shortlist");
}
