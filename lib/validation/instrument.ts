/** Colours measured with an instrument, as the write API and the CSV import take them. */
import { z } from "zod";
import { ACID_BASE } from "../../db/schema";

const optionalNumber = (min: number, max: number, what: string) =>
  z
    .union([z.number(), z.null()])
    .optional()
    .transform((v) => (v === undefined ? null : v))
    .refine((v) => v === null || (Number.isFinite(v) && v >= min && v <= max), { error: `${what} must be between ${min} and ${max}.` });

export const instrumentConditionSchema = z.object({
  solvent: z.string({ error: "Name the solvent (a name, synonym or id from the solvent table)." }).trim().min(1, { error: "Name the solvent (a name, synonym or id from the solvent table)." }).max(200),
  acidBase: z.enum(ACID_BASE, { error: "acidBase is acid, neutral or base." }).optional().default("neutral"),
  pH: optionalNumber(-2, 16, "pH"),
  concentrationUmolL: optionalNumber(0.000001, 1e6, "The dye concentration (µmol/L)"),
  additive: z.string().trim().max(200).optional().default(""),
  additiveConcentrationMolL: optionalNumber(0, 20, "The amount of acid or base (mol/L)"),
  temperatureC: optionalNumber(-100, 250, "The temperature (°C)"),
  pathLengthMm: optionalNumber(0.01, 1000, "The path length (mm)"),
  secondSolvent: z.string().trim().max(200).nullable().optional(),
  secondSolventMoleFraction: optionalNumber(0, 1, "The second solvent's mole fraction"),
});

export const OBSERVERS = ["CIE 1931 2°", "2", "2°"] as const;

export const instrumentMeasurementSchema = z.object({
  dye: z.string({ error: "Name the dye by its code or id." }).trim().min(1, { error: "Name the dye by its code or id." }).max(100),
  lab: z.tuple([z.number().finite().min(0).max(120), z.number().finite().min(-200).max(200), z.number().finite().min(-200).max(200)], {
    error: "lab is [L*, a*, b*]: three numbers, L* from 0 (L* above 100 is kept but flagged).",
  }),
  whitePoint: z.enum(["D65", "D50"], { error: "whitePoint is D65 or D50 (the white the CIELAB values are relative to)." }),
  observer: z
    .string({ error: "observer is the CIE 1931 2° observer: send \"2\"." })
    .refine((v) => (OBSERVERS as readonly string[]).includes(v.trim()), { error: "Only the CIE 1931 2° observer is stored; convert 10° data from the spectrum first, or send the spectrum." }),
  condition: instrumentConditionSchema,
  instrument: z.string({ error: "Name the instrument, e.g. \"plate reader 2, 1 cm cell\"." }).trim().min(1, { error: "Name the instrument, e.g. \"plate reader 2, 1 cm cell\"." }).max(200),
  uncertaintyDeltaE00: z.number().finite().nonnegative().nullable().optional(),
  flagReason: z.string().trim().max(1000).optional().default(""),
});
export type InstrumentMeasurement = z.infer<typeof instrumentMeasurementSchema>;

export const instrumentBatchSchema = z.union([
  instrumentMeasurementSchema,
  z.object({ measurements: z.array(instrumentMeasurementSchema).min(1, { error: "Send at least one measurement." }).max(1000, { error: "Send at most 1000 measurements at once." }) }),
]);
