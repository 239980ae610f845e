/** Input schemas shared by server actions, route handlers and the CLI. */
import { z } from "zod";
import { ROLES } from "@/db/schema";
import { PASSWORD_MIN_LENGTH } from "@/lib/auth/password";
import { checkCasNumber } from "@/lib/chem/cas";

export const emailSchema = z
  .string({ error: "Enter an e-mail address." })
  .trim()
  .toLowerCase()
  .pipe(z.email({ error: "Enter a valid e-mail address, like name@lab.example." }));

export const passwordSchema = z
  .string({ error: "Enter a password." })
  .min(PASSWORD_MIN_LENGTH, { error: `Use at least ${PASSWORD_MIN_LENGTH} characters.` })
  .max(200, { error: "Use at most 200 characters." });

export const roleSchema = z.enum(ROLES, { error: "Choose admin, chemist or formulator." });

/** Only same-site relative paths may be used as a post-sign-in destination. */
export const nextPathSchema = z
  .string()
  .optional()
  .transform((v) => (v && v.startsWith("/") && !v.startsWith("//") ? v : "/"));

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string().min(1, { error: "Enter your password." }).max(200),
  next: nextPathSchema,
});

export const newPasswordSchema = z
  .object({ token: z.string().min(20).max(200), password: passwordSchema, confirm: z.string() })
  .refine((v) => v.password === v.confirm, { error: "The two passwords differ; type the same one twice.", path: ["confirm"] });

export const inviteSchema = z.object({
  email: emailSchema,
  name: z.string().trim().min(1, { error: "Enter the person's name." }).max(120),
  role: roleSchema,
});

export const casNumberSchema = z
  .string()
  .trim()
  .transform((v, ctx) => {
    if (v === "") return null;
    const check = checkCasNumber(v);
    if (!check.ok) {
      ctx.addIssue({ code: "custom", message: check.reason });
      return z.NEVER;
    }
    return check.normalized;
  });

export const dyeEditSchema = z.object({
  name: z.string().trim().min(1, { error: "A dye needs a name." }).max(200),
  dyeClass: z.string().trim().min(1, { error: "Give the dye class, e.g. azo or merocyanine." }).max(80),
  casNumber: casNumberSchema,
  molarMass: z
    .string()
    .trim()
    .transform((v, ctx) => {
      if (v === "") return null;
      const n = Number(v);
      if (!Number.isFinite(n) || n <= 0 || n > 10000) {
        ctx.addIssue({ code: "custom", message: "Molar mass is a positive number in g/mol, e.g. 551.6." });
        return z.NEVER;
      }
      return n;
    }),
  synonyms: z
    .string()
    .max(2000)
    .transform((v) => v.split(/[,;\n]/).map((s) => s.trim()).filter(Boolean)),
  notes: z.string().max(5000),
  hazards: z.string().max(2000),
});

export const tokenNameSchema = z.object({
  name: z.string().trim().min(1, { error: "Name the token after the script that will use it." }).max(80),
});
