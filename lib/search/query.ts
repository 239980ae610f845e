import { z } from "zod";
import { parseHex } from "culori";
import { linearSrgbToXyzD65, srgbDecode } from "@/lib/color/srgb";
import { WHITE_POINTS_2DEG } from "@/lib/color/illuminants";
import { xyzToLab } from "@/lib/color/lab";
import type { Lab } from "@/lib/color/types";
import { COLOUR_WORDS, findColourWord, prototypeLab, type ColourWord } from "./colour-words";
import { ACID_BASE_FILTERS, conditionFilterSchema, MEDIUM_FILTERS, type ConditionFilter } from "./filters";
import { VIEWER_KINDS, type ShiftQuery, type ViewerKind } from "./shift";

export function hexToLabD65(hex: string): Lab | null {
  const parsed = parseHex(hex.startsWith("#") ? hex : `#${hex}`);
  if (!parsed) return null;
  const lin: [number, number, number] = [srgbDecode(parsed.r), srgbDecode(parsed.g), srgbDecode(parsed.b)];
  return xyzToLab(linearSrgbToXyzD65(lin), WHITE_POINTS_2DEG.D65);
}

export function parseLabText(text: string): Lab | null {
  const parts = text.split(",").map((p) => p.trim());
  if (parts.length !== 3 || parts.some((p) => p === "" || !Number.isFinite(Number(p)))) return null;
  const [l, a, b] = parts.map(Number);
  if (l < 0 || l > 100 || Math.abs(a) > 200 || Math.abs(b) > 200) return null;
  return [l, a, b];
}

/** A colour target from `hex=rrggbb` or `lab=L,a,b` (CIELAB D65). */
export const colorTargetSchema = z
  .object({ hex: z.string().optional(), lab: z.string().optional() })
  .transform((v, ctx) => {
    if (v.lab) {
      const lab = parseLabText(v.lab);
      if (!lab) {
        ctx.addIssue({ code: "custom", message: "lab must be three numbers L,a,b with 0 ≤ L ≤ 100, e.g. 40,45,-50.", path: ["lab"] });
        return z.NEVER;
      }
      return { lab };
    }
    if (v.hex) {
      const lab = /^#?[0-9a-fA-F]{6}$/.test(v.hex) ? hexToLabD65(v.hex) : null;
      if (!lab) {
        ctx.addIssue({ code: "custom", message: "hex must be six hexadecimal digits, e.g. 7a3fa0.", path: ["hex"] });
        return z.NEVER;
      }
      return { lab };
    }
    ctx.addIssue({ code: "custom", message: "Give a target colour as hex=rrggbb, lab=L,a,b or word=violet.", path: ["hex"] });
    return z.NEVER;
  });

/**
 * The query of `GET /api/search` and the search page: a target (`lab`, `hex`, or a colour `word`),
 * condition filters and `limit`. Exactly one kind of target; the colour word is checked against
 * lib/search/colour-words.ts.
 */
export const colourSearchQuerySchema = z
  .object({
    hex: z.string().max(20).optional(),
    lab: z.string().max(100).optional(),
    word: z.string().max(40).optional(),
    limit: z.coerce
      .number({ error: "limit must be a whole number from 1 to 200." })
      .int("limit must be a whole number from 1 to 200.")
      .min(1, "limit must be a whole number from 1 to 200.")
      .max(200, "limit must be a whole number from 1 to 200.")
      .optional()
      .default(20),
  })
  .and(conditionFilterSchema)
  .transform((v, ctx) => {
    const given = [v.hex, v.lab, v.word].filter((x) => x !== undefined && x !== "").length;
    if (given > 1) {
      ctx.addIssue({ code: "custom", message: "Give one target: hex=rrggbb, lab=L,a,b or word=violet, not several.", path: ["hex"] });
      return z.NEVER;
    }
    let target: { lab: Lab; word?: ColourWord };
    if (v.word) {
      const word = findColourWord(v.word);
      if (!word) {
        ctx.addIssue({ code: "custom", message: `word must be one of ${COLOUR_WORDS.map((w) => w.word).join(", ")}.`, path: ["word"] });
        return z.NEVER;
      }
      target = { lab: prototypeLab(word), word };
    } else {
      const parsed = colorTargetSchema.safeParse({ hex: v.hex || undefined, lab: v.lab || undefined });
      if (!parsed.success) {
        for (const issue of parsed.error.issues) ctx.addIssue({ code: "custom", message: issue.message, path: issue.path });
        return z.NEVER;
      }
      target = parsed.data;
    }
    return {
      target,
      limit: v.limit,
      filter: { medium: v.medium, acidBase: v.acidBase, phMin: v.phMin, phMax: v.phMax } satisfies ConditionFilter,
      solvent: v.solvent?.trim() || undefined,
    };
  });
export type ColourSearchQuery = z.infer<typeof colourSearchQuerySchema>;

const optionalTarget = (name: string) =>
  z
    .string()
    .max(60)
    .optional()
    .transform((v, ctx): Lab | undefined => {
      if (v === undefined || v.trim() === "") return undefined;
      const t = v.trim();
      const word = findColourWord(t);
      if (word) return prototypeLab(word);
      if (/^#?[0-9a-fA-F]{6}$/.test(t)) return hexToLabD65(t)!;
      const lab = parseLabText(t);
      if (lab) return lab;
      ctx.addIssue({ code: "custom", message: `${name} must be a colour word (e.g. violet), a hex colour (7a3fa0) or L,a,b (40,45,-50).` });
      return z.NEVER;
    });

const prefixed = (prefix: "a" | "b") =>
  z.object({
    [`${prefix}Medium`]: z.enum(MEDIUM_FILTERS, { error: `${prefix}Medium must be one of protic, dipolar-aprotic, nonpolar, aprotic or any.` }).optional().default("any"),
    [`${prefix}AcidBase`]: z.enum(ACID_BASE_FILTERS, { error: `${prefix}AcidBase must be one of acid, neutral, base or any.` }).optional().default("any"),
  }) as z.ZodType<Record<string, string>>;

/** The query of `GET /api/search/shift` and the shift search page. */
export const shiftSearchQuerySchema = z
  .object({
    from: optionalTarget("from"),
    to: optionalTarget("to"),
    minShift: z.coerce.number({ error: "minShift must be a number (ΔE00) from 0 to 150." }).min(0, "minShift must be a number (ΔE00) from 0 to 150.").max(150, "minShift must be a number (ΔE00) from 0 to 150.").optional().default(0),
    sameSolvent: z.enum(["true", "false", "on", ""], { error: "sameSolvent must be true or false." }).optional().transform((v) => v === "true" || v === "on"),
    viewers: z
      .string()
      .optional()
      .transform((v, ctx) => {
        const kinds = (v ?? "").split(",").map((s) => s.trim()).filter(Boolean);
        const bad = kinds.filter((k) => !(VIEWER_KINDS as readonly string[]).includes(k));
        if (bad.length) {
          ctx.addIssue({ code: "custom", message: `viewers must be a comma-separated list of protan, deutan, tritan (got ${bad.join(", ")}).` });
          return z.NEVER;
        }
        return [...new Set(kinds)] as ViewerKind[];
      }),
    viewerMinShift: z.coerce.number({ error: "viewerMinShift must be a number (ΔE00) from 0 to 150." }).min(0).max(150).optional().default(10),
    limit: z.coerce.number({ error: "limit must be a whole number from 1 to 200." }).int("limit must be a whole number from 1 to 200.").min(1, "limit must be a whole number from 1 to 200.").max(200, "limit must be a whole number from 1 to 200.").optional().default(20),
  })
  .and(prefixed("a"))
  .and(prefixed("b"))
  .transform((v) => ({
    a: { medium: v.aMedium, acidBase: v.aAcidBase } as ConditionFilter,
    b: { medium: v.bMedium, acidBase: v.bAcidBase } as ConditionFilter,
    query: { from: v.from, to: v.to, minShift: v.minShift, sameSolvent: v.sameSolvent, viewers: v.viewers, viewerMinShift: v.viewerMinShift } satisfies ShiftQuery,
    limit: v.limit,
  }));
