import { z } from "zod";
import { parseHex } from "culori";
import { linearSrgbToXyzD65, srgbDecode } from "@/lib/color/srgb";
import { WHITE_POINTS_2DEG } from "@/lib/color/illuminants";
import { xyzToLab } from "@/lib/color/lab";
import type { Lab } from "@/lib/color/types";

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
    ctx.addIssue({ code: "custom", message: "Give a target colour as hex=rrggbb or lab=L,a,b.", path: ["hex"] });
    return z.NEVER;
  });
