/**
 * Runs before every page and server action (Next 16's proxy, formerly middleware): refuses changes
 * that did not come from our own pages (403), bodies over MAX_BODY_MB (413, counted as they stream
 * when no Content-Length is sent), and sets the security headers with a fresh script nonce.
 * /api/* is left to apiRoute(), which does the same checks itself, so uploads are not copied here.
 */
import { NextResponse, type NextRequest } from "next/server";
import { bodyLimitBytes, trustedProxies } from "@/lib/config/env";
import { forwardedView } from "@/lib/net/client-address";
import { checkDeclaredLength, readLimited } from "@/lib/net/limited-body";
import { checkSameOrigin, CSRF_MESSAGE } from "@/lib/net/same-origin";
import { commonSecurityHeaders, newNonce, pageCsp } from "@/lib/net/security-headers";
import { isAppError } from "@/lib/errors";

function refuse(status: number, code: string, message: string): NextResponse {
  return NextResponse.json({ error: { code, message } }, { status, headers: { "x-content-type-options": "nosniff", "cache-control": "no-store" } });
}

export async function proxy(request: NextRequest): Promise<NextResponse> {
  const https = forwardedView(request.headers, trustedProxies()).proto === "https" || request.nextUrl.protocol === "https:";
  if (!["GET", "HEAD", "OPTIONS"].includes(request.method)) {
    const verdict = checkSameOrigin(request.headers, trustedProxies());
    if (!verdict.ok) return refuse(403, "forbidden", CSRF_MESSAGE);
    const limit = bodyLimitBytes();
    try {
      checkDeclaredLength(request.headers, limit);
      // Chunked (no Content-Length): count the copy Next hands us; Next buffers at most
      // experimental.proxyClientMaxBodySize of it, which next.config.mjs keeps just above the limit.
      if (!request.headers.has("content-length") && request.body) await readLimited(request.body, limit);
    } catch (error) {
      if (isAppError(error)) return refuse(error.status, error.code, error.message);
      throw error;
    }
  }
  const nonce = newNonce();
  const csp = pageCsp(nonce, { dev: process.env.NODE_ENV === "development", https });
  const requestHeaders = new Headers(request.headers);
  // Next reads the nonce from the request's CSP header and puts it on its own scripts.
  requestHeaders.set("content-security-policy", csp);
  requestHeaders.set("x-nonce", nonce);
  const response = NextResponse.next({ request: { headers: requestHeaders } });
  response.headers.set("content-security-policy", csp);
  for (const [name, value] of Object.entries(commonSecurityHeaders({ https }))) response.headers.set(name, value);
  return response;
}

export const config = {
  // Everything but the API (apiRoute checks bodies and origins itself) and Next's static files.
  matcher: [{ source: "/((?!api/|_next/static|_next/image|icon.png|favicon.ico).*)" }],
};
