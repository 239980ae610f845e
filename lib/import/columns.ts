/** The columns of the CSV imports (lib/import/csv.ts), apart so the browser can show them without the checks. */
export const DYE_COLUMNS = ["code", "name", "class", "cas_number", "molar_mass", "synonyms", "notes", "hazards"] as const;
export const MEASUREMENT_COLUMNS = [
  "dye",
  "solvent",
  "L",
  "a",
  "b",
  "white_point",
  "observer",
  "instrument",
  "acid_base",
  "pH",
  "concentration_umol_l",
  "additive",
  "additive_mol_l",
  "temperature_c",
  "path_length_mm",
  "second_solvent",
  "second_solvent_x",
  "u_delta_e00",
  "flag_reason",
] as const;

/**
 * The columns of a pH-series import: one vial per row. The dye and the medium come from the form, so
 * dye, solvent, second_solvent and second_solvent_x are not columns here.
 */
export const PH_SERIES_COLUMNS = ["pH", "L", "a", "b", "white_point", "observer", "instrument", "acid_base", "concentration_umol_l", "additive", "additive_mol_l", "temperature_c", "path_length_mm", "u_delta_e00", "flag_reason"] as const;
