/** The tune page's query: a dye (code, or all), a target colour (hex, L,a,b, colour word or picker), blends on/off. */
import { z } from "zod";
import type { Lab } from "../color/types";
import { COLOUR_WORDS, findColourWord, prototypeLab } from "../search/colour-words";
import { hexToLabD65, parseLabText } from "../search/query";

export const tuneQuerySchema = z
  .object({
    dye: z.string().max(60).optional(),
    target: z.string().max(60).optional(),
    picker: z.string().max(10).optional(),
    blends: z.string().max(5).optional(),
  })
  .transform((v, ctx) => {
    const text = v.target?.trim() || v.picker?.trim() || "";
    let lab: Lab | null = null;
    let word: string | null = null;
    if (text) {
      const w = findColourWord(text);
      if (w) {
        lab = prototypeLab(w);
        word = w.word;
      } else if (/^#?[0-9a-fA-F]{6}$/.test(text)) lab = hexToLabD65(text);
      else lab = parseLabText(text);
      if (!lab) {
        ctx.addIssue({ code: "custom", path: ["target"], message: `Give the target colour as a hex colour (7a3fa0), as L*,a*,b* (40,45,-50) or as a colour word (${COLOUR_WORDS.slice(0, 4).map((c) => c.word).join(", ")}…).` });
        return z.NEVER;
      }
    }
    return { dyeCode: v.dye?.trim() && v.dye !== "all" ? v.dye.trim() : null, target: lab, word, text, blends: v.blends !== "off" };
  });
