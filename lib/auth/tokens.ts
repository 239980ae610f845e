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

/**
 * `last_used_at` is shown as "last used" on the Account page, to the minute at best. Writing it on
 * every call made each token-authenticated read a database write (a write lock per request); it is
 * written only when the stored time is older than this.
 */
export const TOKEN_LAST_USED_RESOLUTION_MS = 60_000;

export function lastUsedNeedsWrite(lastUsedAt: Date | null, now: Date): boolean {
  return !lastUsedAt || now.getTime() - lastUsedAt.getTime() >= TOKEN_LAST_USED_RESOLUTION_MS;
}
