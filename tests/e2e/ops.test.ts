/**
 * Operations against the built app: the admin's Backups page before and after a backup taken with the
 * CLI while the demo server runs; restore refused under a running server; and graceful shutdown of a
 * second server started with scripts/start.ts: a slow upload in flight when SIGTERM arrives still
 * completes, and the JSON log carries its request id but not the token it was sent with.
 */
import { execFile, spawn } from "node:child_process";
import fs from "node:fs";
import http from "node:http";
import os from "node:os";
import path from "node:path";
import { describe, expect, inject, it } from "vitest";
import { databaseFile, migrateDatabase, openDatabase } from "@/db/connection";
import { createApiToken } from "@/lib/auth/service";
import { smallJpeg } from "../support/photos";
import { useBrowser, watchConsole } from "./browser";
import { SignInPage } from "./pages/sign-in-page";
import { freePort } from "@/lib/ops/free-port";

const base = inject("baseUrl");
const demoDataDir = inject("dataDir");
const browser = useBrowser();
const ROOT = process.cwd();

function cli(args: string[], env: Record<string, string>): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    execFile(process.execPath, ["--import", "tsx", path.join(ROOT, "lib/cli/main.ts"), ...args], { cwd: ROOT, env: { ...process.env, NODE_NO_WARNINGS: "1", ...env } }, (error, stdout, stderr) =>
      resolve({ code: error ? ((error as { code?: number }).code ?? 1) : 0, stdout, stderr }),
    );
  });
}

describe("backups of the running demo", () => {
  it("the admin sees no backup, takes one with the CLI while the server runs, then sees it; restore under the running server is refused", async () => {
    const page = await browser().newPage();
    const errors = watchConsole(page);
    await new SignInPage(page, base).signIn("admin@demo.test");
    await page.goto(`${base}/people/backup`);
    await page.getByText("No backup has been taken of this data folder yet.").waitFor();

    const folder = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-e2e-backup-"));
    const run = await cli(["backup", folder], { DATA_DIR: demoDataDir });
    expect(run.code, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout).backup;
    expect(out.counts.photos).toBeGreaterThan(100);
    expect(out.missingFromStore).toEqual([]);

    await page.reload();
    const record = page.getByTestId("last-backup");
    await record.waitFor();
    expect(await record.innerText()).toContain(folder);
    expect(await record.innerText()).toContain(`${out.counts.photos} photos`);
    expect(errors).toEqual([]);
    await page.close();

    const refused = await cli(["restore", folder, "--replace"], { DATA_DIR: demoDataDir });
    expect(refused.code).not.toBe(0);
    expect(refused.stdout).toBe("");
    expect(refused.stderr.trim()).toMatch(/^A Solvatlas server \(process \d+\) is serving .*stop it before restoring/);
  });
});

describe("graceful shutdown", () => {
  it("finishes a slow upload that is in flight when SIGTERM arrives, refuses new connections, exits 0, and logs JSON without the token", async () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-e2e-stop-"));
    const db = openDatabase(databaseFile(dir));
    migrateDatabase(db);
    db.$client.prepare("INSERT INTO users (id, email, name, role) VALUES ('usr_stop', 'stop@lab.test', 'Stop Test', 'chemist')").run();
    const { token } = createApiToken(db, { userId: "usr_stop", name: "shutdown test", actorId: null });
    db.$client.close();

    const port = await freePort();
    const logFile = path.join(dir, "server.log");
    const log = fs.openSync(logFile, "a");
    const server = spawn(process.execPath, ["--import", "tsx", "scripts/start.ts"], { cwd: ROOT, env: { ...process.env, DATA_DIR: dir, PORT: String(port) }, stdio: ["ignore", log, log] });
    const exited = new Promise<number | null>((resolve) => server.once("exit", (code) => resolve(code)));
    const started = Date.now();
    while ((await fetch(`http://127.0.0.1:${port}/api/health`).then((r) => r.status, () => 0)) !== 200) {
      expect(Date.now() - started).toBeLessThan(80_000);
      await new Promise((r) => setTimeout(r, 300));
    }

    const jpeg = await smallJpeg(4242, 256);
    const boundary = "solvatlasShutdownTest";
    const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="slow.jpg"\r\nContent-Type: image/jpeg\r\n\r\n`);
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
    const half = jpeg.length >> 1;
    const response = new Promise<{ status: number; body: string; requestId: string | undefined }>((resolve, reject) => {
      const req = http.request(
        { host: "127.0.0.1", port, path: "/api/photos", method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": `multipart/form-data; boundary=${boundary}`, "x-request-id": "slow-upload-1" } },
        (res) => {
          let body = "";
          res.on("data", (c) => (body += c));
          res.on("end", () => resolve({ status: res.statusCode!, body, requestId: res.headers["x-request-id"] as string | undefined }));
        },
      );
      req.on("error", reject);
      // Half the photo now; SIGTERM while the rest is still on its way; the rest 1.5 s later.
      req.write(Buffer.concat([head, jpeg.subarray(0, half)]));
      setTimeout(() => {
        server.kill("SIGTERM");
        setTimeout(() => req.end(Buffer.concat([jpeg.subarray(half), tail])), 1500);
      }, 500);
    });
    const answer = await response;
    expect(answer.status, answer.body).toBe(201);
    expect(JSON.parse(answer.body).photo.sha256).toMatch(/^[0-9a-f]{64}$/);
    expect(answer.requestId).toBe("slow-upload-1");
    expect(await exited).toBe(0);
    // Nothing listens any more.
    expect(await fetch(`http://127.0.0.1:${port}/api/health`).then(() => "answered", () => "refused")).toBe("refused");
    expect(fs.existsSync(path.join(dir, "server.pid"))).toBe(false);

    const lines = fs.readFileSync(logFile, "utf8").split("\n").filter(Boolean);
    const json = lines.map((l) => JSON.parse(l));
    const upload = json.find((l) => l.reqId === "slow-upload-1" && l.msg === "request");
    expect(upload).toMatchObject({ method: "POST", url: "/api/photos", status: 201, completed: true });
    expect(json.some((l) => l.signal === "SIGTERM")).toBe(true);
    expect(lines.join("\n")).not.toContain(token);
  });
});
