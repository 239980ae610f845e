/**
 * Security headers for pages and the API. The page policy follows Next.js's nonce pattern for its
 * scripts (a fresh nonce per request, 'strict-dynamic' so the scripts those load are allowed too);
 * header meanings per MDN and the OWASP Secure Headers Project. Pure: no Next imports.
 */

/** Content-Security-Policy for an HTML page. Styles stay 'unsafe-inline': React style attributes and SVG charts set them. */
export function pageCsp(nonce: string, { dev = false, https = false }: { dev?: boolean; https?: boolean } = {}): string {
  return [
    "default-src 'self'",
    `script-src 'self' 'nonce-${nonce}' 'strict-dynamic'${dev ? " 'unsafe-eval'" : ""}`,
    "style-src 'self' 'unsafe-inline'",
    "img-src 'self' blob: data:",
    "font-src 'self'",
    "connect-src 'self'",
    "object-src 'none'",
    "base-uri 'self'",
    "form-action 'self'",
    "frame-ancestors 'none'",
    ...(https ? ["upgrade-insecure-requests"] : []),
  ].join("; ");
}

/** For JSON, CSV and image answers: nothing in them may run, and nobody may frame them. */
export const API_CSP = "default-src 'none'; frame-ancestors 'none'; sandbox";

/** One year, sub-domains included: the value OWASP's HTTP Strict Transport Security cheat sheet suggests. */
export const HSTS = "max-age=31536000; includeSubDomains";

/** Headers every answer carries; HSTS only when the client reached us over HTTPS (browsers ignore it on HTTP). */
export function commonSecurityHeaders({ https }: { https: boolean }): Record<string, string> {
  return {
    "x-content-type-options": "nosniff",
    "referrer-policy": "strict-origin-when-cross-origin",
    "x-frame-options": "DENY",
    "permissions-policy": "camera=(self), microphone=(), geolocation=()",
    ...(https ? { "strict-transport-security": HSTS } : {}),
  };
}

/** A random nonce, base64 (Web Crypto, so it also works where node:crypto does not). */
export function newNonce(): string {
  const bytes = crypto.getRandomValues(new Uint8Array(16));
  return btoa(String.fromCharCode(...bytes));
}
