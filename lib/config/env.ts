/**
 * Settings read from the environment, checked once with zod so a wrong value fails fast with its name.
 */
import path from "node:path";
import { z } from "zod";

const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("development"),
  DATA_DIR: z.string().min(1).default("data"),
  PORT: z.coerce.number().int().min(1).max(65535).default(3000),
  /** Public address used in links sent by e-mail. */
  APP_URL: z.url().optional(),
  SMTP_URL: z
    .string()
    .regex(/^smtps?:\/\//, "SMTP_URL must start with smtp:// or smtps://")
    .optional(),
  MAIL_FROM: z.string().min(3).default("Solvatlas <solvatlas@localhost>"),
  /** Set to "false" only behind plain HTTP on a trusted bench network. */
  SECURE_COOKIES: z.enum(["auto", "true", "false"]).default("auto"),
  MAX_UPLOAD_MB: z.coerce.number().positive().max(500).default(40),
});

export type Env = z.infer<typeof schema>;

let cached: Env | undefined;

export function env(): Env {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid configuration in the environment:\n${lines.join("\n")}`);
  }
  cached = parsed.data;
  return cached;
}

export function dataDir(): string {
  return path.resolve(env().DATA_DIR);
}

export function appUrl(): string {
  return env().APP_URL ?? `http://localhost:${env().PORT}`;
}
