/**
 * Settings read from the environment, checked once with zod so a wrong value fails fast with its name.
 */
import { BlockList } from "node:net";
import path from "node:path";
import { z } from "zod";
import { parseTrustedProxies } from "../net/client-address";

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
  /**
   * Reverse proxies whose X-Forwarded-For/-Host/-Proto are believed: comma-separated addresses or CIDR
   * ranges. Empty (the default) believes no forwarded header; the socket address is the client.
   */
  TRUSTED_PROXIES: z
    .string()
    .default("")
    .superRefine((text, ctx) => {
      const parsed = parseTrustedProxies(text);
      if ("error" in parsed) ctx.addIssue({ code: "custom", message: `TRUSTED_PROXIES: ${parsed.error}; give addresses or ranges such as 127.0.0.1, 10.0.0.0/8` });
    }),
  /** Largest request body in megabytes for anything but a photo upload (JSON, forms, server actions). */
  MAX_BODY_MB: z.coerce.number().positive().max(100).default(2),
  /** Memory for decoded photos kept while people mark them (least recently used dropped first). */
  DECODED_CACHE_MB: z.coerce.number().positive().max(16384).default(256),
  MAX_UPLOAD_MB: z.coerce.number().positive().max(500).default(40),
  /** Largest photo accepted in megapixels (after decoding); refuses decompression bombs. */
  MAX_PHOTO_MEGAPIXELS: z.coerce.number().positive().max(1000).default(100),
  /** Where photos are stored: "local" (DATA_DIR/objects) or "s3" (an S3-compatible bucket, S3_* below). */
  STORAGE_DRIVER: z.enum(["local", "s3"]).default("local"),
  S3_BUCKET: z.string().min(3).optional(),
  S3_REGION: z.string().min(1).default("us-east-1"),
  /** e.g. http://127.0.0.1:9000 for MinIO; unset for AWS S3 itself. */
  S3_ENDPOINT: z.url().optional(),
  /** Path-style addressing (bucket in the path), which most self-hosted S3 servers need. */
  S3_FORCE_PATH_STYLE: z.enum(["true", "false"]).default("false"),
  /** Unset means the SDK's usual credential chain (instance role, ~/.aws, AWS_* variables). */
  S3_ACCESS_KEY_ID: z.string().min(1).optional(),
  S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
  /** Folder inside the bucket, e.g. "solvatlas/". */
  S3_KEY_PREFIX: z
    .string()
    .regex(/^([A-Za-z0-9._-]+\/)*$/, "S3_KEY_PREFIX must be empty or end with a slash, e.g. solvatlas/")
    .default(""),
}).refine((e) => e.STORAGE_DRIVER !== "s3" || !!e.S3_BUCKET, { error: "S3_BUCKET is needed when STORAGE_DRIVER=s3", path: ["S3_BUCKET"] });

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

let proxies: BlockList | undefined;

/** TRUSTED_PROXIES as a matcher (checked by the schema above). */
export function trustedProxies(): BlockList {
  if (proxies) return proxies;
  const parsed = parseTrustedProxies(env().TRUSTED_PROXIES);
  proxies = "list" in parsed ? parsed.list : new BlockList();
  return proxies;
}

/** MAX_BODY_MB in bytes: the most any request body may carry except a photo upload. */
export function bodyLimitBytes(): number {
  return Math.round(env().MAX_BODY_MB * 1048576);
}
