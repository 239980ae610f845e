/**
 * `npm run bench:load`: HTTP throughput of the built server on loopback, in one run.
 *
 * Seeds a temporary DATA_DIR with 100,000 accepted measurements (1,000 invented dyes × 100, generated
 * like bench:search), makes an API token, starts the built app with scripts/start.ts on a free
 * 127.0.0.1 port, then drives it with autocannon (10 connections, bounded in time):
 *   floor   GET /api/dyes without credentials → 401 (the framework and the wrapper, no work)
 *   search  GET /api/search?lab=…&limit=20 with a Bearer token, 500 different targets in turn
 *   dyes    GET /api/dyes?limit=50 with a Bearer token
 *   dyes?q  GET /api/dyes?q=… with a Bearer token (fuzzy text search), 50 different words in turn
 * and prints requests/s, p50/p99 latency, errors (socket errors, timeouts and unexpected statuses),
 * the ratio of each to the floor's requests/s, and the server's resident memory.
 *
 * Options: --duration s (default 10 per run), --connections n (default 10), --measurements n (default 100000).
 * Needs a build (`npm run build`); builds first when there is none.
 */
import { execFileSync, spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import autocannon from "autocannon";
import { migrateDatabase, openDatabase, databaseFile } from "../db/connection";
import { seedSolvents } from "../db/seed/demo";
import { gaussian, rng } from "../db/seed/demo-model";
import { createApiToken } from "../lib/auth/service";
import { freePort } from "../lib/ops/free-port";

const arg = (name: string, fallback: number) => {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? Number(process.argv[i + 1]) : fallback;
};
const DURATION = arg("duration", 10);
const CONNECTIONS = arg("connections", 10);
const N = arg("measurements", 100_000);
const PER_DYE = 100;
const root = process.cwd();

function seed(dir: string): string {
  const db = openDatabase(databaseFile(dir));
  migrateDatabase(db);
  seedSolvents(db);
  const client = db.$client;
  client.prepare("INSERT INTO users (id, email, name, role) VALUES ('usr_load', 'load@bench.test', 'Load bench', 'chemist')").run();
  const solventIds = client.prepare("SELECT id FROM solvents").pluck().all() as string[];
  const insCond = client.prepare("INSERT INTO conditions (id, solvent_id, acid_base, ph) VALUES (?, ?, ?, ?)");
  const conds: string[] = [];
  const insDye = client.prepare("INSERT INTO dyes (id, code, name, dye_class) VALUES (?, ?, ?, 'bench')");
  const insMeas = client.prepare(
    `INSERT INTO measurements (id, dye_id, condition_id, raw_r, raw_g, raw_b, x, y, z, l, a, b, pixel_count, rejected_count, spread, review_state, created_by)
     VALUES (?, ?, ?, 0, 0, 0, 0, 0, 0, ?, ?, ?, 1000, 0, 0.5, 'accepted', 'usr_load')`,
  );
  const random = rng(11);
  client.transaction(() => {
    for (const s of solventIds)
      for (const ab of ["acid", "neutral", "base"] as const) {
        const id = `cond_l_${conds.length}`;
        insCond.run(id, s, ab, ab === "acid" ? 3 : ab === "base" ? 11 : 7);
        conds.push(id);
      }
    let inserted = 0;
    for (let d = 0; inserted < N; d++) {
      insDye.run(`dye_l_${d}`, `L-${d}`, `Load dye ${d}`);
      const base = [30 + random() * 60, (random() - 0.5) * 120, (random() - 0.5) * 120];
      for (let j = 0; j < PER_DYE && inserted < N; j++, inserted++) {
        const c = conds[Math.floor(random() * conds.length)];
        insMeas.run(`ms_l_${inserted}`, `dye_l_${d}`, c, base[0] + gaussian(random) * 4, base[1] + gaussian(random) * 10, base[2] + gaussian(random) * 10);
      }
    }
  })();
  const { token } = createApiToken(db, { userId: "usr_load", name: "load bench", actorId: null });
  client.close();
  return token;
}

async function waitForHealth(base: string, timeoutMs: number) {
  const start = Date.now();
  while (Date.now() - start < timeoutMs) {
    try {
      if ((await fetch(`${base}/api/health`)).status === 200) return;
    } catch {
      /* not up yet */
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`the server did not become healthy within ${timeoutMs} ms`);
}

function rssMiB(pid: number): number {
  const status = fs.readFileSync(`/proc/${pid}/status`, "utf8");
  return Math.round(Number(/VmRSS:\s+(\d+)/.exec(status)![1]) / 1024);
}

/** CPU time (user + system) the process has used, in ms, from /proc (clock ticks of 10 ms). */
function cpuMs(pid: number): number {
  const fields = fs.readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
  return (Number(fields[11]) + Number(fields[12])) * 10;
}

type Row = { name: string; rps: number; p50: number; p99: number; requests: number; errors: number; serverCpuMsPerRequest: number };

let serverPid = 0;

async function load(name: string, base: string, paths: string[], headers: Record<string, string>, expected: number, duration = DURATION): Promise<Row> {
  let i = 0;
  const cpu0 = cpuMs(serverPid);
  let unexpected = 0;
  const result = await autocannon({
    url: base,
    connections: CONNECTIONS,
    duration,
    headers,
    requests: [{ method: "GET", setupRequest: (req) => ({ ...req, path: paths[i++ % paths.length] }) }],
  });
  // Statuses other than the expected one count as errors (autocannon counts only socket errors and timeouts).
  const codes = result.statusCodeStats as unknown as Record<string, { count: number }>;
  for (const [code, { count }] of Object.entries(codes ?? {})) if (Number(code) !== expected) unexpected += count;
  const cpu = cpuMs(serverPid) - cpu0;
  return {
    name,
    rps: result.requests.average,
    p50: result.latency.p50,
    p99: result.latency.p99,
    requests: result.requests.total,
    errors: result.errors + result.timeouts + unexpected,
    serverCpuMsPerRequest: Number((cpu / Math.max(1, result.requests.total)).toFixed(2)),
  };
}

async function main() {
  if (!fs.existsSync(path.join(root, ".next", "BUILD_ID"))) {
    console.error("No build found; running next build first.");
    execFileSync(process.execPath, [path.join("node_modules", "next", "dist", "bin", "next"), "build"], { cwd: root, stdio: ["ignore", "ignore", "inherit"], env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" } });
  }
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-load-"));
  const t0 = Date.now();
  const token = seed(dir);
  const seedSeconds = (Date.now() - t0) / 1000;
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const log = fs.openSync(path.join(dir, "server.log"), "a");
  const server = spawn(process.execPath, ["--import", "tsx", "scripts/start.ts"], {
    cwd: root,
    env: { ...process.env, DATA_DIR: dir, PORT: String(port), LOG_LEVEL: "warn" },
    stdio: ["ignore", log, log],
  });
  serverPid = server.pid!;
  try {
    await waitForHealth(base, 120_000);
    const bearer = { authorization: `Bearer ${token}` };
    const random = rng(5);
    const searchPaths = Array.from({ length: 500 }, () => `/api/search?lab=${(20 + random() * 70).toFixed(1)},${((random() - 0.5) * 100).toFixed(1)},${((random() - 0.5) * 100).toFixed(1)}&limit=20`);
    const words = Array.from({ length: 50 }, (_, k) => `/api/dyes?q=${encodeURIComponent(k % 2 ? `Load dye ${k * 7}` : `L-${k * 13}`)}`);
    // Warm-up (not reported): JIT, page cache, the search grid and the dye-list cache.
    await load("warm-up", base, ["/api/dyes", ...searchPaths.slice(0, 50), "/api/dyes?limit=50", ...words.slice(0, 5)].map(String), bearer, 200, 3);
    const rows: Row[] = [];
    rows.push(await load("floor: GET /api/dyes, no credentials (401)", base, ["/api/dyes"], {}, 401));
    rows.push(await load("GET /api/search?lab=…&limit=20 (Bearer)", base, searchPaths, bearer, 200));
    rows.push(await load("GET /api/dyes?limit=50 (Bearer)", base, ["/api/dyes?limit=50"], bearer, 200));
    rows.push(await load("GET /api/dyes?q=… (Bearer, fuzzy text)", base, words, bearer, 200));
    const floor = rows[0].rps;
    const rss = rssMiB(server.pid!);
    const report = {
      machine: { cpus: os.cpus().length, loadAverage1m: Number(os.loadavg()[0].toFixed(1)) },
      measurements: N,
      dyes: Math.ceil(N / PER_DYE),
      seedSeconds,
      connections: CONNECTIONS,
      secondsPerRun: DURATION,
      serverRssMiB: rss,
      // ratioToFloor: requests/s over the floor's; cpuRatioToFloor: the floor's server CPU per request over
      // this run's, i.e. the same ratio for a server with the CPU to itself (less sensitive to other load).
      runs: rows.map((r) => ({
        ...r,
        rps: Math.round(r.rps),
        ratioToFloor: Number((r.rps / floor).toFixed(2)),
        cpuRatioToFloor: Number((rows[0].serverCpuMsPerRequest / r.serverCpuMsPerRequest).toFixed(2)),
      })),
    };
    console.log(JSON.stringify(report, null, 2));
    const search = rows[1];
    console.log(
      [
        `goal authenticated search >= 0.8 x floor rps: ${search.rps >= 0.8 * floor ? "met" : "NOT met"} (${(search.rps / floor).toFixed(2)}: ${Math.round(search.rps)} vs ${Math.round(floor)} req/s)`,
        `goal search p99 < 50 ms: ${search.p99 < 50 ? "met" : "NOT met"} (${search.p99} ms)`,
        `goal 0 errors: ${rows.every((r) => r.errors === 0) ? "met" : "NOT met"} (${rows.map((r) => r.errors).join(", ")})`,
      ].join("\n"),
    );
  } finally {
    server.kill("SIGTERM");
    await new Promise((r) => server.once("exit", r));
    fs.rmSync(dir, { recursive: true, force: true });
  }
}

main().catch((error) => {
  console.error(`bench:load failed: ${(error as Error).message}`);
  process.exit(1);
});
