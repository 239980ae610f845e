/** Input shapes of the bench: regions, references, vials, templates (zod, shared by route and actions). */
import { z } from "zod";

const px = z.number({ error: "Give pixel positions as numbers." }).finite();

export const regionSchema = z.object({
  shape: z.enum(["rect", "ellipse"], { error: "A region is a rect or an ellipse." }),
  x: px.min(0, { error: "A region must start inside the photo (x ≥ 0)." }),
  y: px.min(0, { error: "A region must start inside the photo (y ≥ 0)." }),
  w: px.positive({ error: "A region needs a width of at least one pixel." }),
  h: px.positive({ error: "A region needs a height of at least one pixel." }),
});

const labSchema = z.tuple([z.number().min(0).max(100), z.number().min(-200).max(200), z.number().min(-200).max(200)], {
  error: "Give the reference's known L*, a*, b* (L* 0–100).",
});

export const referenceSchema = z.object({
  region: regionSchema,
  lab: labSchema,
  label: z.string().trim().max(80).optional(),
  /** White point the known Lab is given under (D65 when left out); D50 values are Bradford-adapted. */
  whitePoint: z.enum(["D65", "D50"], { error: "A reference's white point is D65 or D50." }).optional(),
});

const profileId = z
  .string()
  .trim()
  .max(100)
  .nullable()
  .optional()
  .transform((v) => v || null);

export const measureRequestSchema = z.object({
  lightingProfileId: profileId,
  references: z.array(referenceSchema).max(10, { error: "Mark at most 10 references." }).default([]),
  vials: z.array(z.object({ key: z.string().max(64), region: regionSchema })).max(200, { error: "Measure at most 200 vials at once." }),
  /** Regions holding a check standard: read through the same correction as the vials, and only when there is one. */
  checks: z.array(z.object({ key: z.string().max(64), region: regionSchema })).max(10, { error: "Mark at most 10 check standards." }).default([]),
});

const optionalNumber = (min: number, max: number, what: string) =>
  z
    .union([z.number(), z.null()])
    .optional()
    .transform((v) => (v === undefined ? null : v))
    .refine((v) => v === null || (Number.isFinite(v) && v >= min && v <= max), { error: `${what} must be between ${min} and ${max}.` });

/**
 * The condition fields a vial (or a place in a solvent panel) records, in the units of `conditions`:
 * acid/base and the additive that made it (name and mol/L), pH, temperature (°C), path length (mm),
 * a second solvent with its mole fraction x₂.
 */
export const conditionFieldsSchema = z
  .object({
    solventId: z.string({ error: "Choose the solvent in this vial." }).min(1, { error: "Choose the solvent in this vial." }).max(100),
    acidBase: z.enum(["acid", "neutral", "base"], { error: "Choose acid, neutral or base." }),
    ph: optionalNumber(-2, 16, "pH"),
    concentrationUmolL: optionalNumber(0.000001, 1e6, "The concentration (µmol/L)"),
    additive: z.string().trim().max(200, { error: "Name the acid or base in at most 200 characters." }).default(""),
    additiveConcentrationMolL: optionalNumber(0, 20, "The amount of acid or base (mol/L)"),
    temperatureC: optionalNumber(-100, 250, "The temperature (°C)"),
    pathLengthMm: optionalNumber(0.01, 1000, "The path length (mm)"),
    secondSolventId: z
      .string()
      .max(100)
      .nullable()
      .optional()
      .transform((v) => v || null),
    secondSolventMoleFraction: optionalNumber(0, 1, "The mole fraction of the second solvent"),
  })
  .refine((v) => !v.secondSolventId || (v.secondSolventMoleFraction !== null && v.secondSolventMoleFraction > 0 && v.secondSolventMoleFraction < 1), {
    error: "Give the second solvent's mole fraction, between 0 and 1 (e.g. 0.25).",
    path: ["secondSolventMoleFraction"],
  })
  .refine((v) => !v.secondSolventId || v.secondSolventId !== v.solventId, { error: "The second solvent must differ from the first.", path: ["secondSolventId"] })
  .refine((v) => v.additiveConcentrationMolL === null || v.additive.length > 0, { error: "Name the acid or base whose amount you gave (e.g. HCl).", path: ["additive"] });

export const vialSchema = z.intersection(
  conditionFieldsSchema,
  z.object({
    region: regionSchema,
    dyeId: z.string({ error: "Choose the dye in this vial." }).min(1, { error: "Choose the dye in this vial." }).max(100),
    flagReason: z.string().trim().max(1000).default(""),
  }),
);

export const panelSchema = z.object({
  name: z.string().trim().min(1, { error: "Name the panel, e.g. “8 solvents, polarity ladder”." }).max(120),
  entries: z.array(conditionFieldsSchema).min(1, { error: "Give every vial its solvent before saving them as a panel." }).max(200),
});

/** Live replicate check: each vial's colour with its dye and condition (nothing is stored). */
export const replicateCheckSchema = z.object({
  vials: z
    .array(
      z.intersection(
        conditionFieldsSchema,
        z.object({
          key: z.string().max(64),
          dyeId: z.string().min(1).max(100),
          lab: z.tuple([z.number().finite(), z.number().finite(), z.number().finite()]),
          uncertaintyDeltaE00: z.number().finite().nonnegative().nullable().optional(),
        }),
      ),
    )
    .max(200),
});

export const saveRequestSchema = z
  .object({
    photoId: z.string().min(1).max(100),
    lightingProfileId: profileId,
    references: z.array(referenceSchema).max(10).default([]),
    vials: z.array(vialSchema).max(200, { error: "Save at most 200 vials at once." }).default([]),
    /** Regions holding a registered check standard: each one's ΔE00 to its known value is recorded (a photo may hold only these). */
    checkStandards: z.array(z.object({ region: regionSchema, standardId: z.string().min(1).max(100) })).max(10, { error: "Mark at most 10 check standards." }).default([]),
  })
  .refine((v) => v.vials.length + v.checkStandards.length > 0, { error: "Mark at least one vial or check standard before saving.", path: ["vials"] });
export type SaveRequest = z.infer<typeof saveRequestSchema>;

export const templateRegionSchema = z.object({
  shape: z.enum(["rect", "ellipse"]),
  x: z.number().min(0).max(1),
  y: z.number().min(0).max(1),
  w: z.number().positive().max(1),
  h: z.number().positive().max(1),
  role: z.enum(["vial", "reference", "check"]),
  label: z.string().trim().max(80),
});

export const templateSchema = z.object({
  name: z.string().trim().min(1, { error: "Name the layout, e.g. “8-vial rack, light box North”." }).max(120),
  regions: z.array(templateRegionSchema).min(1, { error: "Mark at least one region before saving a layout." }).max(200),
});
