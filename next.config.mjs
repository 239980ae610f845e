/** @type {import('next').NextConfig} */
const nextConfig = {
  // Native modules stay outside the server bundle.
  serverExternalPackages: ["better-sqlite3", "sharp"],
  poweredByHeader: false,
  experimental: {
    serverActions: { bodySizeLimit: "30mb" },
  },
};

export default nextConfig;
