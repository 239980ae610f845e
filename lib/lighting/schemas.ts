/** Input schemas for the lighting workflow's actions and routes (form fields arrive as text). */
import { z } from "zod";
import { PROFILE_METHODS } from "./calibration";

const text = (label: string, max: number) => z.string().trim().max(max, { error: `${label} is too long; keep it under ${max} characters.` });
const required = (label: string, max: number) => text(label, max).min(1, { error: `Give the ${label.toLowerCase()}.` });

const optionalNumber = (label: string, min: number, max: number) =>
  z
    .string()
    .trim()
    .transform((v, ctx) => {
      if (v === "") return null;
      const n = Number(v);
      if (!Number.isFinite(n) || n < min || n > max) {
        ctx.addIssue({ code: "custom", message: `${label} must be a number from ${min} to ${max}, or left empty.` });
        return z.NEVER;
      }
      return n;
    });

const date = (label: string, optional: boolean) =>
  z
    .string()
    .trim()
    .transform((v, ctx) => {
      if (v === "" && optional) return null;
      const d = new Date(v.length === 10 ? `${v}T00:00:00Z` : v);
      if (Number.isNaN(d.getTime())) {
        ctx.addIssue({ code: "custom", message: `${label} must be a date such as 2026-12-01${optional ? ", or left empty" : ""}.` });
        return z.NEVER;
      }
      return d;
    });

export const profileFormSchema = z.object({
  id: z.string().max(100).optional(),
  name: required("Name", 120),
  illuminant: z.enum(["D65", "D50", "A"], { error: "Choose the CIE illuminant the light stands for: D65, D50 or A." }),
  lightSource: required("Light source", 300),
  colourTemperatureK: optionalNumber("Colour temperature (K)", 1000, 20000),
  camera: required("Camera", 200),
  cameraSettings: text("Camera settings", 1000),
  targetId: z.string().max(100).transform((v) => v || null),
  method: z.enum(PROFILE_METHODS, { error: "Choose a method: white, 3×3 matrix, root-polynomial or automatic." }),
  validFrom: date("Valid from", false),
  validUntil: date("Valid until", true),
  notes: text("Notes", 4000),
});

export const profileIdSchema = z.object({ id: z.string().min(1).max(100) });

export const approveSchema = z.object({
  id: z.string().min(1).max(100),
  toleranceMean: optionalNumber("Tolerance for the mean", 0.1, 20).transform((v) => v ?? 2),
  toleranceMax: optionalNumber("Tolerance for the worst patch", 0.1, 40).transform((v) => v ?? 4),
});

export const targetFormSchema = z
  .object({
    id: z.string().max(100).optional(),
    name: required("Name", 120),
    description: text("Description", 1000),
    source: text("Source", 300),
    whitePoint: z.enum(["D65", "D50"], { error: "Choose the white point the card's values were measured under: D65 or D50." }),
    gridRows: optionalNumber("Rows", 1, 30),
    gridColumns: optionalNumber("Columns", 1, 30),
    csv: z.string().max(200_000, { error: "The patch list is too long; a card has at most a few hundred patches." }),
  });

const point = z.tuple([z.number().finite(), z.number().finite()]);
export const fitRequestSchema = z.object({
  profileId: z.string().min(1).max(100),
  photoId: z.string().min(1).max(100),
  corners: z.tuple([point, point, point, point]),
});

export const checkStandardSchema = z.object({
  name: required("Name", 120),
  kind: z.enum(["vial", "tile"], { error: "Choose vial or tile." }),
  l: optionalNumber("L*", 0, 100).refine((v) => v !== null, { error: "Give L* (0 to 100)." }),
  a: optionalNumber("a*", -128, 128).refine((v) => v !== null, { error: "Give a* (−128 to 128)." }),
  b: optionalNumber("b*", -128, 128).refine((v) => v !== null, { error: "Give b* (−128 to 128)." }),
  whitePoint: z.enum(["D65", "D50"], { error: "Choose D65 or D50." }),
  sourceInstrument: required("Source instrument", 300),
  notes: text("Notes", 2000),
});

export const checkStandardEditSchema = checkStandardSchema.extend({ id: z.string().min(1, { error: "Choose the check standard to edit." }).max(100) });
export const checkStandardIdSchema = z.object({ id: z.string().min(1, { error: "Choose a check standard." }).max(100) });

export const rederiveSchema = z.object({ id: z.string().min(1).max(100), expected: z.coerce.number().int().min(0) });
