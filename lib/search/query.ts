import { z } from "zod";
import { parseHex } from "culori";
import { linearSrgbToXyzD65, srgbDecode } from "@/lib/color/srgb";
import { WHITE_POINTS_2DEG } from "@/lib/color/illuminants";
import { xyzToLab } from "@/lib/color/lab";
import type { Lab } from "@/lib/color/types";
import { COLOUR_WORDS, findColourWord, prototypeLab, type ColourWord } from "./colour-words";
import { conditionFilterSchema, type ConditionFilter } from "./filters";

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
