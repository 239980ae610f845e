/**
 * End-to-end set-up: build the app (unless E2E_SKIP_BUILD=1 and a build exists), start it with the demo
 * seed on a fresh DATA_DIR and a free port, and stop it afterwards. Tests read E2E_BASE_URL / E2E_DATA_DIR.
 */
import { execFileSync, spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import type { TestProject } from "vitest/node";
import { freePort } from "../../lib/ops/free-port";

async function waitFor(url: string, child: ChildProcess, timeoutMs: number) {
  const start = Date.now();
  while (Date.now() - start < timeoutMs) {
    if (child.exitCode !== null) throw new Error(`The server exited early with code ${child.exitCode}`);
    try {
      const res = await fetch(url);
      if (res.status < 500) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`The server did not answer at ${url} within ${timeoutMs} ms`);
}

let server: ChildProcess | undefined;

export default async function setup(project: TestProject) {
  const root = process.cwd();
  if (!(process.env.E2E_SKIP_BUILD === "1" && fs.existsSync(path.join(root, ".next", "BUILD_ID")))) {
    execFileSync(process.execPath, [path.join("node_modules", "next", "dist", "bin", "next"), "build"], {
      cwd: root,
      stdio: ["ignore", "ignore", "inherit"],
      env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" },
    });
  }
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-e2e-"));
  const port = await freePort();
  const log = fs.openSync(path.join(dataDir, "server.log"), "a");
  server = spawn(process.execPath, [path.join("node_modules", "tsx", "dist", "cli.mjs"), "scripts/start.ts", "--seed-demo"], {
    cwd: root,
    env: { ...process.env, DATA_DIR: dataDir, PORT: String(port), APP_URL: `http://localhost:${port}`, NEXT_TELEMETRY_DISABLED: "1" },
    stdio: ["ignore", log, log],
    detached: true,
  });
  const base = `http://localhost:${port}`;
  // The demo seed fits solvent models before serving: minutes on a loaded 2-core machine.
  await waitFor(`${base}/sign-in`, server, 300_000);
  project.provide("baseUrl", base);
  project.provide("dataDir", dataDir);

  return async () => {
    if (server?.pid) {
      try {
        process.kill(-server.pid, "SIGTERM");
      } catch {
        /* already gone */
      }
    }
  };
}

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    dataDir: string;
  }
}
