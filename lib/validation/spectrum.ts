/** Absorbance spectra sent by the write API (POST /api/spectra) and the upload panel on a dye page. */
import { z } from "zod";
import { MAX_SPECTRUM_POINTS, type WavelengthUnit } from "../import/spectrum";
import { instrumentConditionSchema } from "./instrument";

/** Spellings a script may use for the wavelength unit; stored in the canonical form. */
const UNIT_SPELLINGS: Record<string, WavelengthUnit> = { nm: "nm", "µm": "µm", "μm": "µm", um: "µm", "cm⁻¹": "cm⁻¹", "cm-1": "cm⁻¹", "1/cm": "cm⁻¹" };

export const spectrumUploadSchema = z
  .object({
    dye: z.string({ error: "Name the dye by its code or id." }).trim().min(1, { error: "Name the dye by its code or id." }).max(100),
    condition: instrumentConditionSchema.omit({ concentrationUmolL: true, pathLengthMm: true }),
    concentrationUmolL: z
      .number({ error: "Give the dye concentration in µmol/L (e.g. 20)." })
      .finite()
      .positive({ error: "The dye concentration (µmol/L) must be above 0." })
      .max(1e6, { error: "The dye concentration (µmol/L) must be at most 1,000,000." }),
    pathLengthMm: z
      .number({ error: "Give the cell's path length in mm (e.g. 10)." })
      .finite()
      .min(0.01, { error: "The path length (mm) must be at least 0.01." })
      .max(1000, { error: "The path length (mm) must be at most 1000." }),
    instrument: z.string({ error: "Name the instrument, e.g. \"UV-Vis 2, 10 mm quartz cell\"." }).trim().min(1, { error: "Name the instrument, e.g. \"UV-Vis 2, 10 mm quartz cell\"." }).max(200),
    /** `[[wavelength, decadic absorbance], …]` in `wavelengthUnit`; or `csv` instead. */
    points: z
      .array(z.tuple([z.number(), z.number()], { error: "Each point is [wavelength, absorbance]: two numbers." }))
      .max(MAX_SPECTRUM_POINTS, { error: `Send at most ${MAX_SPECTRUM_POINTS} points.` })
      .optional(),
    wavelengthUnit: z
      .string()
      .trim()
      .optional()
      .default("nm")
      .transform((v, ctx) => {
        const unit = UNIT_SPELLINGS[v];
        if (!unit) {
          ctx.addIssue({ code: "custom", message: "wavelengthUnit is nm, µm (um) or cm-1." });
          return z.NEVER;
        }
        return unit;
      }),
    /** The CSV text of an instrument export, header row first (see lib/import/spectrum.ts). */
    csv: z.string().max(5_000_000, { error: "The CSV is larger than 5 MB; send at most one row per 0.1 nm." }).optional(),
    fileName: z.string().trim().max(200).optional().default(""),
  })
  .refine((v) => (v.points === undefined) !== (v.csv === undefined), { error: "Send the spectrum either as points ([[wavelength, absorbance], …]) or as csv text, not both and not neither.", path: ["points"] });

export type SpectrumUpload = z.infer<typeof spectrumUploadSchema>;

const optionalFormNumber = z
  .string()
  .trim()
  .optional()
  .transform((v, ctx) => {
    if (!v) return null;
    const n = Number(v.replace(",", "."));
    if (!Number.isFinite(n)) {
      ctx.addIssue({ code: "custom", message: `“${v.slice(0, 20)}” is not a number.` });
      return z.NEVER;
    }
    return n;
  });

/** The upload panel's form fields, as typed; the action turns them into a `SpectrumUpload`. */
export const spectrumFormSchema = z.object({
  dye: z.string().trim().min(1, { error: "Pick the dye." }).max(100),
  solvent: z.string().trim().min(1, { error: "Pick the solvent the spectrum was measured in." }).max(200),
  acidBase: z.enum(["acid", "neutral", "base"], { error: "Choose acid, neutral or base." }).default("neutral"),
  pH: optionalFormNumber,
  additive: z.string().trim().max(200).optional().default(""),
  temperatureC: optionalFormNumber,
  secondSolvent: z.string().trim().max(200).optional().default(""),
  secondSolventMoleFraction: optionalFormNumber,
  concentrationUmolL: optionalFormNumber.refine((v) => v !== null, { error: "Give the dye concentration in µmol/L (e.g. 20)." }),
  pathLengthMm: optionalFormNumber.refine((v) => v !== null, { error: "Give the cell's path length in mm (e.g. 10)." }),
  instrument: z.string().trim().max(200).optional().default(""),
  csv: z.string().min(1, { error: "Drop a CSV file first." }).max(5_000_000, { error: "The file is larger than 5 MB; send at most one row per 0.1 nm." }),
  fileName: z.string().trim().max(200).optional().default(""),
  mode: z.enum(["preview", "save"]).default("preview"),
});
export type SpectrumForm = z.infer<typeof spectrumFormSchema>;

/** The form's fields in the write API's shape, so both go through the same checks. */
export function spectrumFormToUpload(f: SpectrumForm): unknown {
  return {
    dye: f.dye,
    condition: {
      solvent: f.solvent,
      acidBase: f.acidBase,
      pH: f.pH,
      additive: f.additive,
      temperatureC: f.temperatureC,
      secondSolvent: f.secondSolvent || null,
      secondSolventMoleFraction: f.secondSolventMoleFraction,
    },
    concentrationUmolL: f.concentrationUmolL,
    pathLengthMm: f.pathLengthMm,
    instrument: f.instrument,
    csv: f.csv,
    fileName: f.fileName,
  };
}
