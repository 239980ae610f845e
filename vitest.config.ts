import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

const root = fileURLToPath(new URL(".", import.meta.url));

export default defineConfig({
  resolve: {
    alias: {
      "@/": root,
      // db/client and the auth session module refuse to load outside the Next server; tests load them directly.
      "server-only": `${root}tests/support/empty-module.ts`,
    },
  },
  test: {
    projects: [
      {
        extends: true,
        // Generous timeout: the brute-force cross-checks run long on a shared 2-core machine.
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node", testTimeout: 60_000 },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          setupFiles: ["tests/support/integration-setup.ts"],
          pool: "forks",
          // CLI tests spawn several processes per test; on a loaded shared machine each can take seconds.
          testTimeout: 60_000,
          // Set-up hooks build worlds, photos and servers: generous on a shared 2-core machine.
          hookTimeout: 60_000,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          globalSetup: ["tests/e2e/global-setup.ts"],
          fileParallelism: false,
          testTimeout: 90_000,
          hookTimeout: 120_000,
        },
      },
    ],
  },
});
