/**
 * Cross-site request forgery checks for cookie-authenticated changes: the Origin header (or, when a
 * browser leaves it out, the Referer) must name the host the request was sent to. A request with
 * neither is refused (OWASP CSRF Prevention Cheat Sheet, "Verifying Origin with standard headers").
 */
import type { BlockList } from "node:net";
import { forwardedView } from "./client-address";

export type OriginVerdict = { ok: true } | { ok: false; reason: "missing" | "foreign" };

export function checkSameOrigin(headers: Headers, trusted: BlockList): OriginVerdict {
  const { host } = forwardedView(headers, trusted);
  const claimed = headers.get("origin") ?? headers.get("referer");
  if (!claimed || claimed === "null") return { ok: false, reason: "missing" };
  if (!host) return { ok: false, reason: "foreign" };
  try {
    return new URL(claimed).host === host ? { ok: true } : { ok: false, reason: "foreign" };
  } catch {
    return { ok: false, reason: "foreign" };
  }
}

export const CSRF_MESSAGE = "This request did not come from a Solvatlas page; reload the page and try again.";
