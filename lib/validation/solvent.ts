import { z } from "zod";
import { MEDIA } from "@/db/schema";

/** A published value with the source it comes from; both empty means "no value". */
function sourcedNumber(label: string, min: number, max: number) {
  return z
    .object({ value: z.string().trim(), source: z.string().trim().max(300) })
    .transform((v, ctx) => {
      if (v.value === "") return { value: null, source: null };
      const n = Number(v.value);
      if (!Number.isFinite(n) || n < min || n > max) {
        ctx.addIssue({ code: "custom", message: `${label} must be a number from ${min} to ${max}.`, path: ["value"] });
        return z.NEVER;
      }
      if (!v.source) {
        ctx.addIssue({ code: "custom", message: `Give the source of ${label} (authors, year, table).`, path: ["source"] });
        return z.NEVER;
      }
      return { value: n, source: v.source };
    });
}

export const solventEditSchema = z
  .object({
    id: z.string().min(1).max(100),
    medium: z.enum(MEDIA, { error: "Choose protic, dipolar aprotic or non-polar." }),
    mediumSource: z.string().trim().min(1, { error: "Say why the solvent is in this class." }).max(300),
    cautions: z.string().trim().max(2000),
    et30Value: z.string(),
    et30Source: z.string(),
    alphaValue: z.string(),
    alphaSource: z.string(),
    betaValue: z.string(),
    betaSource: z.string(),
    piStarValue: z.string(),
    piStarSource: z.string(),
    permittivityValue: z.string(),
    permittivitySource: z.string(),
  })
  .transform((v, ctx) => {
    const parse = (label: string, key: string, value: string, source: string, min: number, max: number) => {
      const r = sourcedNumber(label, min, max).safeParse({ value, source });
      if (!r.success) {
        for (const issue of r.error.issues) ctx.addIssue({ code: "custom", message: issue.message, path: [`${key}${issue.path[0] === "source" ? "Source" : "Value"}`] });
        return { value: null, source: null };
      }
      return r.data;
    };
    return {
      id: v.id,
      medium: v.medium,
      mediumSource: v.mediumSource,
      cautions: v.cautions,
      et30: parse("ET(30)", "et30", v.et30Value, v.et30Source, 30, 70),
      alpha: parse("α", "alpha", v.alphaValue, v.alphaSource, -0.5, 2.5),
      beta: parse("β", "beta", v.betaValue, v.betaSource, -0.5, 1.5),
      piStar: parse("π*", "piStar", v.piStarValue, v.piStarSource, -0.5, 1.5),
      permittivity: parse("εr", "permittivity", v.permittivityValue, v.permittivitySource, 1, 200),
    };
  });
