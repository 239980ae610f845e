import type { Dye } from "@/db/schema";

/** The public JSON of one dye (the list's fields plus notes, hazards and times). */
export function dyeJson(d: Dye) {
  return {
    id: d.id,
    code: d.code,
    name: d.name,
    class: d.dyeClass,
    synonyms: d.synonyms,
    casNumber: d.casNumber,
    molarMass: d.molarMass,
    notes: d.notes,
    hazards: d.hazards,
    createdAt: d.createdAt.toISOString(),
    updatedAt: d.updatedAt ? d.updatedAt.toISOString() : null,
  };
}
