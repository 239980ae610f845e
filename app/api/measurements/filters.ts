/**
 * The measurement filters as URL parameters, shared by GET /api/measurements and the /measurements
 * page, so the page's CSV export link returns exactly the rows on screen (all pages).
 */
import { z } from "zod";
import { ACID_BASE, MEDIA, REVIEW_STATES } from "@/db/schema";
import { MEASUREMENT_SORTS, type MeasurementFilters } from "@/db/queries/measurements";

const id = z.string().trim().max(100).optional().transform((v) => v || undefined);
const day = z
  .string()
  .trim()
  .optional()
  .transform((v) => v || undefined)
  .refine((v) => v === undefined || (/^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(`${v}T00:00:00Z`))), { error: "Give a date as YYYY-MM-DD." });
const optionalEnum = <T extends readonly [string, ...string[]]>(values: T) =>
  z
    .union([z.enum(values), z.literal(""), z.literal("any")])
    .optional()
    .transform((v) => (v === "" || v === "any" ? undefined : v) as T[number] | undefined);

export const filterParams = z.object({
  dyeId: id,
  solventId: id,
  medium: optionalEnum(MEDIA),
  acidBase: optionalEnum(ACID_BASE),
  profileId: id,
  from: day,
  to: day,
  photoId: id,
  /** "me": the signed-in person's own measurements. */
  author: z.enum(["me", "", "any"]).optional(),
});

export type FilterParams = z.infer<typeof filterParams>;

export function toFilters(p: FilterParams, state: MeasurementFilters["state"], userId: string): MeasurementFilters {
  return {
    dyeId: p.dyeId,
    solventId: p.solventId,
    medium: p.medium,
    acidBase: p.acidBase,
    profileId: p.profileId,
    from: p.from ? new Date(`${p.from}T00:00:00Z`) : undefined,
    // "to" is the last day included.
    to: p.to ? new Date(Date.parse(`${p.to}T00:00:00Z`) + 86_400_000) : undefined,
    photoId: p.photoId,
    authorId: p.author === "me" ? userId : undefined,
    state,
  };
}

export const tableParams = filterParams.extend({
  state: optionalEnum(REVIEW_STATES),
  sort: z.enum(MEASUREMENT_SORTS).optional().default("measuredAt"),
  dir: z.enum(["asc", "desc"]).optional().default("desc"),
  page: z.coerce.number().int().min(1).max(100_000).optional().default(1),
  pageSize: z.coerce.number().int().refine((n) => [25, 50, 100, 200].includes(n), { error: "pageSize is 25, 50, 100 or 200." }).optional().default(50),
});
export type TableParams = z.infer<typeof tableParams>;
