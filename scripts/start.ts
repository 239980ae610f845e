/**
 * `npm start` / `npm run demo`: check the configuration, migrate, seed (the solvent table always when
 * empty; the invented demo scenario with --seed-demo when there are no users), then serve the built
 * app in this process: Next's request handler inside our HTTP server (lib/ops/serve.ts), which logs
 * JSON lines with a request id and on SIGTERM finishes the requests in flight before exiting.
 * While serving, DATA_DIR/server.pid names this process so `restore` refuses to run under it. Once it
 * listens, the colour search's means are built in the background (warmSearch).
 */
import { spawn } from "node:child_process";
import { createRequire } from "node:module";
import path from "node:path";
import { databaseFile, migrateDatabase, openDatabase, type Db } from "../db/connection";
import { warmSearchMeans } from "../db/queries/search";
import { seedDemo, seedSolvents } from "../db/seed/demo";
import { dataDir, env } from "../lib/config/env";
import { createLogger } from "../lib/log/logger";
import { removeServerMark, runningServer, writeServerMark } from "../lib/ops/server-lock";
import { captureConsole, serve } from "../lib/ops/serve";

process.env.NEXT_TELEMETRY_DISABLED = "1";
(process.env as Record<string, string>).NODE_ENV = "production";

const logger = createLogger();

async function main() {
  const settings = env();
  const dir = dataDir();
  process.env.DATA_DIR = dir;
  const other = runningServer(dir);
  if (other) throw new Error(`another Solvatlas server (process ${other.pid}, port ${other.port}) already serves ${dir}; stop it first.`);
  const db = openDatabase(databaseFile(dir));
  try {
    migrateDatabase(db);
    if (process.argv.includes("--seed-demo")) {
      // Solvent models of a fresh demo are computed beside the server, not before it (≈ 1 s of CPU per dye).
      const added = await seedDemo(db, dir);
      logger.info(added ? { added } : {}, added ? "demo data added" : "database already in use; demo seed skipped");
    } else {
      const n = seedSolvents(db);
      if (n) logger.info({ solvents: n }, "solvent table loaded");
    }
  } finally {
    db.$client.close();
  }

  captureConsole(logger);
  // Stamps each request with its socket address before Next sees it (see scripts/peer-address.cjs);
  // it patches http.Server, so the server below gets it too.
  createRequire(import.meta.url)("./peer-address.cjs");
  const { default: next } = await import("next");
  const app = next({ dev: false, dir: path.resolve(".") });
  await app.prepare();
  const handle = app.getRequestHandler();
  await serve({
    handler: (req, res) => handle(req, res),
    port: settings.PORT,
    logger,
    onClosed: () => {
      // The app's database handle (db/client.ts): closing it checkpoints the WAL into the database file.
      (globalThis as { solvatlasDb?: { $client: { close(): void } } }).solvatlasDb?.$client.close();
      removeServerMark(dir);
      process.exit(0);
    },
  });
  writeServerMark(dir, { pid: process.pid, startedAt: new Date().toISOString(), port: settings.PORT });
  logger.info({ dataDir: dir, url: `http://localhost:${settings.PORT}` }, `Serving Solvatlas on http://localhost:${settings.PORT}`);
  warmSearch(dir);
  if (process.argv.includes("--seed-demo")) {
    const models = spawn(process.execPath, [path.join("node_modules", "tsx", "dist", "cli.mjs"), "scripts/precompute-models.ts"], { stdio: "inherit", env: { ...process.env, DATA_DIR: dir } });
    process.on("exit", () => models.exitCode === null && models.kill("SIGTERM"));
  }
}

/**
 * Builds the colour search's means in the background now that the server listens, on the app's own
 * handle (db/client.ts picks up the one made here), so the first search does not wait for them (at a
 * million measurements 7–11 s). Requests, health included, are served meanwhile.
 */
function warmSearch(dir: string) {
  const app = globalThis as { solvatlasDb?: Db };
  app.solvatlasDb ??= openDatabase(databaseFile(dir));
  const started = performance.now();
  warmSearchMeans(app.solvatlasDb).then(
    (means) => logger.info({ means, ms: Math.round(performance.now() - started) }, "search means ready"),
    (error: unknown) => logger.warn({ err: error }, "search means not built in the background; the first search builds them"),
  );
}

main().catch((error) => {
  logger.fatal({ err: error }, `Solvatlas could not start: ${(error as Error).message}`);
  process.exit(1);
});
