import { z } from "zod";

export const MEDIUM_FILTERS = ["any", "protic", "dipolar-aprotic", "nonpolar", "aprotic"] as const;
export type MediumFilter = (typeof MEDIUM_FILTERS)[number];
export const ACID_BASE_FILTERS = ["any", "acid", "neutral", "base"] as const;
export type AcidBaseFilter = (typeof ACID_BASE_FILTERS)[number];

/** The condition a colour must have been measured under to count for a search. */
export type ConditionFilter = {
  medium: MediumFilter;
  acidBase: AcidBaseFilter;
  /** One solvent (its id), or every solvent. */
  solventId?: string;
  /** Inclusive pH range; a condition with no pH recorded fails any pH bound. */
  phMin?: number;
  phMax?: number;
};

export type ConditionFacts = { solventId: string; medium: "protic" | "dipolar-aprotic" | "nonpolar"; acidBase: "acid" | "neutral" | "base"; ph: number | null };

export function conditionMatches(filter: ConditionFilter, c: ConditionFacts): boolean {
  if (filter.solventId && c.solventId !== filter.solventId) return false;
  if (filter.medium !== "any") {
    if (filter.medium === "aprotic" ? c.medium === "protic" : c.medium !== filter.medium) return false;
  }
  if (filter.acidBase !== "any" && c.acidBase !== filter.acidBase) return false;
  if (filter.phMin !== undefined && (c.ph === null || c.ph < filter.phMin)) return false;
  if (filter.phMax !== undefined && (c.ph === null || c.ph > filter.phMax)) return false;
  return true;
}

const optionalNumber = (name: string, lo: number, hi: number) =>
  z
    .string()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v.trim() === "") return undefined;
      const n = Number(v);
      if (!Number.isFinite(n) || n < lo || n > hi) {
        ctx.addIssue({ code: "custom", message: `${name} must be a number from ${lo} to ${hi}.` });
        return z.NEVER;
      }
      return n;
    });

/** Condition filters as they arrive in a URL (`medium=…&acidBase=…&solvent=…&phMin=…&phMax=…`). */
export const conditionFilterSchema = z
  .object({
    medium: z.enum(MEDIUM_FILTERS, { error: "medium must be one of protic, dipolar-aprotic, nonpolar, aprotic or any." }).optional().default("any"),
    acidBase: z.enum(ACID_BASE_FILTERS, { error: "acidBase must be one of acid, neutral, base or any." }).optional().default("any"),
    solvent: z.string().max(100, "solvent is at most 100 characters").optional(),
    phMin: optionalNumber("phMin", -2, 16),
    phMax: optionalNumber("phMax", -2, 16),
  })
  .refine((v) => v.phMin === undefined || v.phMax === undefined || v.phMin <= v.phMax, { message: "phMin must not be above phMax.", path: ["phMin"] });

const MEDIUM_ORDER = { protic: 0, "dipolar-aprotic": 1, nonpolar: 2 } as const;
const ACID_BASE_ORDER = { acid: 0, neutral: 1, base: 2 } as const;

/**
 * The condition class stored as the fourth R*Tree dimension (migration 0003): 3·medium + acid/base,
 * medium protic 0, dipolar-aprotic 1, nonpolar 2; acid 0, neutral 1, base 2.
 */
export function conditionClass(medium: ConditionFacts["medium"], acidBase: ConditionFacts["acidBase"]): number {
  return 3 * MEDIUM_ORDER[medium] + ACID_BASE_ORDER[acidBase];
}

/** Sorted class codes as contiguous [from, to] runs, one R*Tree range per run. */
export function classRuns(codes: Iterable<number>): [number, number][] {
  const sorted = [...new Set(codes)].sort((x, y) => x - y);
  const runs: [number, number][] = [];
  for (const k of sorted) {
    const last = runs[runs.length - 1];
    if (last && k === last[1] + 1) last[1] = k;
    else runs.push([k, k]);
  }
  return runs;
}
