/**
 * Integration tests run the real database, auth and actions. Only the Next request context is
 * provided here (cookies/headers of "the current request" and cache revalidation), since that
 * normally comes from a running Next server.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { vi } from "vitest";
import { requestContext } from "./request-context";

process.env.DATA_DIR = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-it-"));

vi.mock("next/headers", () => ({
  cookies: async () => requestContext.cookieStore(),
  headers: async () => requestContext.headers(),
}));

vi.mock("next/cache", () => ({
  revalidatePath: () => undefined,
  revalidateTag: () => undefined,
}));
