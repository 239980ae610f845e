import { createHash, randomBytes } from "node:crypto";

/** Random secret for links and API tokens: 32 bytes, base64url. */
export function newSecret(): string {
  return randomBytes(32).toString("base64url");
}

export function sha256Hex(text: string): string {
  return createHash("sha256").update(text).digest("hex");
}

export const API_TOKEN_PREFIX = "sva_";

export function newApiToken(): { token: string; prefix: string; hash: string } {
  const token = API_TOKEN_PREFIX + newSecret();
  return { token, prefix: token.slice(0, 10), hash: sha256Hex(token) };
}

export function newId(prefix: string): string {
  return `${prefix}_${randomBytes(10).toString("base64url")}`;
}
