import "server-only";
import { cookies, headers } from "next/headers";
import { cache } from "react";
import { db } from "@/db/client";
import { env, trustedProxies } from "@/lib/config/env";
import { forwardedView } from "@/lib/net/client-address";
import { SESSION_COOKIE } from "./lucia";
import { validateSessionId, type AuthUser } from "./service";

/** The signed-in person for this request (server components, server actions), or null. */
export const currentUser = cache(async (): Promise<AuthUser | null> => {
  const store = await cookies();
  const sessionId = store.get(SESSION_COOKIE)?.value;
  if (!sessionId) return null;
  const result = await validateSessionId(db(), sessionId);
  if (!result) return null;
  if (result.fresh) {
    // Renewed sessions need a new cookie; only actions and route handlers may set one.
    try {
      await writeSessionCookie(result.sessionId, result.expiresAt);
    } catch {
      /* rendering a server component: the cookie is renewed on the next action */
    }
  }
  return result.user;
});

async function secureCookies(): Promise<boolean> {
  const setting = env().SECURE_COOKIES;
  if (setting !== "auto") return setting === "true";
  return forwardedView(await headers(), trustedProxies()).proto === "https";
}

export async function writeSessionCookie(sessionId: string, expiresAt: Date): Promise<void> {
  const store = await cookies();
  store.set(SESSION_COOKIE, sessionId, {
    httpOnly: true,
    sameSite: "lax",
    secure: await secureCookies(),
    path: "/",
    expires: expiresAt,
  });
}

export async function clearSessionCookie(): Promise<void> {
  const store = await cookies();
  store.delete(SESSION_COOKIE);
}

export async function sessionIdFromCookie(): Promise<string | null> {
  return (await cookies()).get(SESSION_COOKIE)?.value ?? null;
}

/** The caller's address: the socket peer, or what a trusted proxy (TRUSTED_PROXIES) forwarded. */
export async function clientIp(): Promise<string> {
  return forwardedView(await headers(), trustedProxies()).address;
}
