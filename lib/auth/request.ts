/**
 * Who is calling: from `Authorization: Bearer <token>` or the session cookie. Works on a plain
 * Request, so route handlers stay testable without a running Next server.
 */
import type { Db } from "@/db/connection";
import { authenticateApiToken, validateSessionId, type AuthUser } from "./service";
import { SESSION_COOKIE } from "./lucia";

export type Caller =
  | { kind: "anonymous" }
  | { kind: "invalid"; reason: string }
  | { kind: "user"; user: AuthUser; via: "token" | "session" };

export function readCookie(header: string | null, name: string): string | null {
  if (!header) return null;
  for (const part of header.split(";")) {
    const [k, ...v] = part.trim().split("=");
    if (k === name) return decodeURIComponent(v.join("="));
  }
  return null;
}

export async function identifyCaller(db: Db, headers: Headers): Promise<Caller> {
  const authorization = headers.get("authorization");
  if (authorization !== null) {
    const match = /^Bearer\s+(\S+)$/i.exec(authorization.trim());
    if (!match) return { kind: "invalid", reason: "The Authorization header must be 'Bearer <token>'." };
    const user = authenticateApiToken(db, match[1]);
    return user
      ? { kind: "user", user, via: "token" }
      : { kind: "invalid", reason: "This API token is unknown, revoked, expired, or belongs to a deactivated account." };
  }
  const sessionId = readCookie(headers.get("cookie"), SESSION_COOKIE);
  if (!sessionId) return { kind: "anonymous" };
  const result = await validateSessionId(db, sessionId);
  return result ? { kind: "user", user: result.user, via: "session" } : { kind: "invalid", reason: "Your session has ended. Sign in again." };
}
