/**
 * Dye input as JSON (write API, CSV import): turned into the strings the catalogue form sends and
 * checked by the very same dyeEditSchema, so the API, the import and the form refuse the same things.
 */
import { z } from "zod";
import { dyeEditSchema } from "./schemas";

export const dyeCodeSchema = z
  .string({ error: "Give the dye's code, e.g. KB-AZ-210." })
  .trim()
  .min(1, { error: "Give the dye's code, e.g. KB-AZ-210." })
  .max(40, { error: "A dye code has at most 40 characters." })
  .regex(/^[A-Za-z0-9][A-Za-z0-9._\-]*$/, { error: "A dye code uses letters, digits, dots and dashes, e.g. KB-AZ-210." });

const text = (max: number) => z.union([z.string().max(max), z.null()]).optional();

/** The JSON fields of a dye; `class` is the dye class. */
export const dyeJsonFields = z.object({
  code: dyeCodeSchema,
  name: z.string({ error: "A dye needs a name." }),
  class: z.string({ error: "Give the dye class, e.g. azo or merocyanine." }),
  casNumber: text(40),
  molarMass: z.union([z.number(), z.string(), z.null()]).optional(),
  synonyms: z.union([z.array(z.string().max(200)).max(50), z.string().max(2000)]).optional(),
  notes: text(5000),
  hazards: text(2000),
});

export type DyeJson = z.input<typeof dyeJsonFields>;

/** JSON → the form's strings → dyeEditSchema. */
export function dyeJsonToForm(v: z.infer<typeof dyeJsonFields>) {
  return {
    name: v.name,
    dyeClass: v.class,
    casNumber: v.casNumber ?? "",
    molarMass: v.molarMass === null || v.molarMass === undefined ? "" : String(v.molarMass),
    synonyms: Array.isArray(v.synonyms) ? v.synonyms.join(", ") : (v.synonyms ?? ""),
    notes: v.notes ?? "",
    hazards: v.hazards ?? "",
  };
}

export const dyeCreateJsonSchema = dyeJsonFields.transform((v, ctx) => {
  const r = dyeEditSchema.safeParse(dyeJsonToForm(v));
  if (!r.success) {
    for (const issue of r.error.issues) ctx.addIssue({ code: "custom", message: issue.message, path: [issue.path[0] === "dyeClass" ? "class" : String(issue.path[0])] });
    return z.NEVER;
  }
  return { code: v.code, ...r.data };
});

/** PATCH: any subset of the fields; merged with the stored dye and then checked as a whole. */
export const dyePatchJsonSchema = dyeJsonFields.partial().refine((v) => Object.keys(v).length > 0, { error: "Send at least one field to change." });

/** The catalogue's "Add a dye" form: the edit form's fields plus the code. */
export const dyeCreateFormSchema = dyeEditSchema.extend({ code: dyeCodeSchema });
