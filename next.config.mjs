/**
 * MAX_BODY_MB is checked by zod in lib/config/env.ts at start-up; it is read here raw because this
 * file is plain JavaScript loaded by Next before the app.
 */
const bodyMb = Number(process.env.MAX_BODY_MB ?? "2") || 2;

// Headers for answers that do not pass through proxy.ts (the API, static files). See lib/net/security-headers.ts.
const apiHeaders = [
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "X-Frame-Options", value: "DENY" },
];

/** @type {import('next').NextConfig} */
const nextConfig = {
  // Native modules stay outside the server bundle.
  serverExternalPackages: ["better-sqlite3", "sharp", "piscina"],
  poweredByHeader: false,
  experimental: {
    // Over-limit server actions are refused with 413 by proxy.ts before Next reads them.
    serverActions: { bodySizeLimit: `${bodyMb}mb` },
    // Next copies page/action bodies for proxy.ts up to this size; just above our limit so that
    // proxy.ts can tell an over-limit body from one that fits.
    proxyClientMaxBodySize: `${bodyMb + 1}mb`,
  },
  async headers() {
    return [
      { source: "/api/:path*", headers: [...apiHeaders, { key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'; sandbox" }] },
      {
        source: "/api/:path*",
        has: [{ type: "header", key: "x-forwarded-proto", value: "https" }],
        headers: [{ key: "Strict-Transport-Security", value: "max-age=31536000; includeSubDomains" }],
      },
      { source: "/_next/static/:path*", headers: apiHeaders },
    ];
  },
};

export default nextConfig;
