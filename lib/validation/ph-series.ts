/** A pH series as the series form and the series import send it (db/queries/ph-series.ts stores it). */
import { z } from "zod";

const optionalNumber = (min: number, max: number, what: string) =>
  z
    .union([z.number(), z.null()])
    .optional()
    .transform((v) => (v === undefined ? null : v))
    .refine((v) => v === null || (Number.isFinite(v) && v >= min && v <= max), { error: `${what} must be between ${min} and ${max}.` });

/** The series' medium and name: everything but its vials. */
export const phSeriesHeadSchema = z
  .object({
    dyeId: z.string({ error: "Choose the dye." }).trim().min(1, { error: "Choose the dye." }).max(100),
    name: z.string({ error: "Name the series, e.g. “Water, universal buffer, 23 °C”." }).trim().min(1, { error: "Name the series, e.g. “Water, universal buffer, 23 °C”." }).max(120, { error: "Keep the name under 120 characters." }),
    solventId: z.string({ error: "Choose the solvent of the medium." }).trim().min(1, { error: "Choose the solvent of the medium." }).max(100),
    secondSolventId: z.string().trim().max(100).nullable().optional().transform((v) => v || null),
    secondSolventMoleFraction: optionalNumber(0, 1, "The second solvent's mole fraction"),
    ionicStrengthMolL: optionalNumber(0, 10, "The ionic strength (mol/L)"),
    notes: z.string().trim().max(2000, { error: "Keep the notes under 2000 characters." }).optional().default(""),
  })
  .refine((v) => !v.secondSolventId || (v.secondSolventMoleFraction !== null && v.secondSolventMoleFraction > 0 && v.secondSolventMoleFraction < 1), {
    error: "Give the second solvent's mole fraction x₂, between 0 and 1, or clear the second solvent.",
    path: ["secondSolventMoleFraction"],
  })
  .refine((v) => v.secondSolventId !== v.solventId, { error: "The second solvent must differ from the first.", path: ["secondSolventId"] });
export type PhSeriesHead = z.infer<typeof phSeriesHeadSchema>;

export const phSeriesVialSchema = z.object({
  measurementId: z.string().trim().min(1).max(100),
  pH: z.number({ error: "Give each selected vial its pH." }).finite().min(-2, { error: "A vial's pH must be between −2 and 16." }).max(16, { error: "A vial's pH must be between −2 and 16." }),
});

/** A whole series: head, vials (2 at least; a pKa needs 5 accepted vials at 4 or more pH values). */
export const phSeriesSchema = z.object({
  id: z.string().trim().max(100).optional(),
  head: phSeriesHeadSchema,
  vials: z
    .array(phSeriesVialSchema)
    .min(2, { error: "Select at least two vials (a pKa needs five accepted vials at four or more pH values)." })
    .max(500, { error: "A series holds at most 500 vials." })
    .refine((vs) => new Set(vs.map((v) => v.measurementId)).size === vs.length, { error: "A vial can be in the series once only." }),
});
export type PhSeriesInput = z.infer<typeof phSeriesSchema>;
