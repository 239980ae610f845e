/**
 * `npm start` / `npm run demo`: check the configuration, migrate, seed (the solvent table always when
 * empty; the invented demo scenario with --seed-demo when there are no users), then serve `next start`.
 */
import { spawn } from "node:child_process";
import path from "node:path";
import { databaseFile, migrateDatabase, openDatabase } from "../db/connection";
import { seedDemo, seedSolvents } from "../db/seed/demo";
import { dataDir, env } from "../lib/config/env";

async function main() {
  const settings = env();
  const dir = dataDir();
  const db = openDatabase(databaseFile(dir));
  try {
    migrateDatabase(db);
    if (process.argv.includes("--seed-demo")) {
      const added = await seedDemo(db, dir, { models: true });
      console.error(added ? `Demo data added: ${added.dyes} dyes, ${added.measurements} measurements, ${added.photos} photos.` : "Database already in use; demo seed skipped.");
    } else {
      const n = seedSolvents(db);
      if (n) console.error(`Solvent table loaded: ${n} solvents.`);
    }
  } finally {
    db.$client.close();
  }
  console.error(`Data directory: ${dir}`);
  console.error(`Serving Solvatlas on http://localhost:${settings.PORT}`);
  // The preload stamps each request with its socket address (see scripts/peer-address.cjs).
  const child = spawn(process.execPath, ["--require", path.resolve("scripts", "peer-address.cjs"), path.join("node_modules", "next", "dist", "bin", "next"), "start", "-p", String(settings.PORT)], {
    stdio: "inherit",
    env: { ...process.env, DATA_DIR: dir, NEXT_TELEMETRY_DISABLED: "1", NODE_ENV: "production" },
  });
  for (const signal of ["SIGINT", "SIGTERM"] as const) process.on(signal, () => child.kill(signal));
  child.on("exit", (code, signal) => process.exit(code ?? (signal ? 0 : 1)));
}

main().catch((error) => {
  console.error(`Solvatlas could not start: ${(error as Error).message}`);
  process.exit(1);
});
