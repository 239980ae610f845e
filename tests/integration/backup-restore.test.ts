/**
 * `backup <folder>` and `restore <folder> [--replace]` run as an admin would (child processes of the
 * real CLI) against a live DATA_DIR that this test process keeps writing to, as a server would:
 * the contract in ../shared/CONTRACT.md (JSON on stdout; refusals exit non-zero with one sentence on
 * stderr and change nothing).
 */
import { execFile } from "node:child_process";
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import Database from "better-sqlite3";
import { sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { POST as uploadPhoto } from "@/app/api/photos/route";
import { db } from "@/db/client";
import { measurements, photos } from "@/db/schema";
import { dataDir } from "@/lib/config/env";
import { addMeasurement, buildWorld, PEOPLE, tokenFor } from "../support/world";
import { smallJpeg } from "../support/photos";

const ROOT = process.cwd();
const scratch = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-backup-it-"));

type Run = { code: number; stdout: string; stderr: string };
function cli(args: string[], env: Record<string, string> = {}): Promise<Run> {
  return new Promise((resolve) => {
    execFile(process.execPath, ["--import", "tsx", path.join(ROOT, "lib/cli/main.ts"), ...args], { cwd: ROOT, env: { ...process.env, NODE_NO_WARNINGS: "1", ...env } }, (error, stdout, stderr) => {
      resolve({ code: error ? ((error as { code?: number }).code ?? 1) : 0, stdout, stderr });
    });
  });
}

function expectRefusal(run: Run, pattern: RegExp) {
  expect(run.code, run.stdout).not.toBe(0);
  expect(run.stdout).toBe("");
  const lines = run.stderr.trim().split("\n");
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(/^[A-Z/].*[.]$/);
  expect(lines[0]).toMatch(pattern);
}

let uploadCounter = 1000;
async function upload(): Promise<number> {
  const form = new FormData();
  form.append("file", new File([new Uint8Array(await smallJpeg(uploadCounter++))], "rack.jpg", { type: "image/jpeg" }));
  const res = await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: form, headers: { authorization: `Bearer ${tokenFor("chemist")}` } }));
  return res.status;
}

let measurementCounter = 0;
function acceptMeasurement(): string {
  const id = `ms_bk_${measurementCounter++}`;
  addMeasurement(id, PEOPLE.chemist.id, "accepted");
  return id;
}

const photoCount = () => db().select({ n: sql<number>`count(*)` }).from(photos).get()!.n;

/** Every file under a folder with its sha256: a fingerprint of a data folder that must not change. */
function fingerprint(folder: string): Record<string, string> {
  const out: Record<string, string> = {};
  const walk = (dir: string) => {
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) {
      const full = path.join(dir, e.name);
      if (e.isDirectory()) walk(full);
      else out[path.relative(folder, full)] = createHash("sha256").update(fs.readFileSync(full)).digest("hex");
    }
  };
  walk(folder);
  return out;
}

/** What a restored data folder holds: photo rows (each checked for its files) and accepted measurement ids. */
function inspectRestored(folder: string) {
  const sqlite = new Database(path.join(folder, "solvatlas.db"), { readonly: true });
  try {
    const rows = sqlite.prepare("SELECT sha256, storage_key, thumb_key, display_key FROM photos").all() as { sha256: string; storage_key: string; thumb_key: string | null; display_key: string | null }[];
    const missing: string[] = [];
    for (const r of rows) {
      const original = path.join(folder, "objects", r.storage_key);
      if (!fs.existsSync(original)) missing.push(r.storage_key);
      // An original is stored under its content hash; the restored bytes must still have it.
      else expect(createHash("sha256").update(fs.readFileSync(original)).digest("hex")).toBe(r.sha256);
      for (const k of [r.thumb_key, r.display_key]) if (k && !fs.existsSync(path.join(folder, "objects", k))) missing.push(k);
    }
    const accepted = new Set(sqlite.prepare("SELECT id FROM measurements WHERE review_state = 'accepted'").pluck().all() as string[]);
    return { photos: rows.length, missing, accepted, integrity: sqlite.pragma("integrity_check", { simple: true }) };
  } finally {
    sqlite.close();
  }
}

function readManifest(folder: string) {
  return JSON.parse(fs.readFileSync(path.join(folder, "solvatlas-backup.json"), "utf8"));
}
function writeManifest(folder: string, manifest: unknown) {
  fs.writeFileSync(path.join(folder, "solvatlas-backup.json"), JSON.stringify(manifest));
}
const sha256Of = (file: string) => createHash("sha256").update(fs.readFileSync(file)).digest("hex");

const first = path.join(scratch, "first");
let firstBackupPhotos = 0;

beforeAll(async () => {
  await buildWorld();
  for (let i = 0; i < 4; i++) expect(await upload()).toBe(201);
  for (let i = 0; i < 10; i++) acceptMeasurement();
});

describe("backup while uploads go on, then restore into an empty folder", () => {
  it("restores every photo with its files and every measurement accepted before the backup began", { timeout: 180_000 }, async () => {
    const acceptedBefore = db().select({ id: measurements.id }).from(measurements).where(sql`review_state = 'accepted'`).all().map((r) => r.id);
    const photosBefore = photoCount();

    // Uploads and accepted measurements keep arriving until the backup process has finished.
    let done = false;
    const backup = cli(["backup", first]).finally(() => (done = true));
    let uploadsDuring = 0;
    while (!done) {
      expect(await upload()).toBe(201);
      acceptMeasurement();
      uploadsDuring++;
    }
    const run = await backup;
    expect(run.code, run.stderr).toBe(0);
    expect(run.stderr).toBe("");
    const out = JSON.parse(run.stdout).backup;
    expect(uploadsDuring).toBeGreaterThan(0);
    expect(out.counts.photos).toBeGreaterThanOrEqual(photosBefore);
    expect(out.missingFromStore).toEqual([]);
    firstBackupPhotos = out.counts.photos;
    // The record the admin page shows.
    const record = JSON.parse(fs.readFileSync(path.join(dataDir(), "last-backup.json"), "utf8"));
    expect(record.folder).toBe(first);
    expect(record.photos).toBe(out.counts.photos);

    const target = path.join(scratch, "restored-empty");
    const restored = await cli(["restore", first], { DATA_DIR: target });
    expect(restored.code, restored.stderr).toBe(0);
    expect(JSON.parse(restored.stdout).restored.counts.photos).toBe(out.counts.photos);
    const seen = inspectRestored(target);
    expect(seen.integrity).toBe("ok");
    expect(seen.photos).toBe(out.counts.photos);
    expect(seen.missing).toEqual([]);
    for (const id of acceptedBefore) expect(seen.accepted.has(id), id).toBe(true);
    // No staging folder is left beside the target.
    expect(fs.readdirSync(scratch).filter((n) => n.includes("restoring"))).toEqual([]);
  });

  it("a second backup into the same folder copies only the new files", { timeout: 120_000 }, async () => {
    for (let i = 0; i < 2; i++) expect(await upload()).toBe(201);
    // Photos uploaded while the first backup ran and after it: each brings its original, a thumbnail and a display copy.
    const newFiles = 3 * (photoCount() - firstBackupPhotos);
    const run = await cli(["backup", first]);
    expect(run.code, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout).backup;
    expect(out.objects.copied).toBe(newFiles);
    expect(out.objects.reused).toBe(3 * firstBackupPhotos);
    expect(out.objects.total).toBe(3 * photoCount());
    // One database snapshot in the folder: the earlier one is removed once the new manifest is in place.
    expect(fs.readdirSync(first).filter((n) => n.endsWith(".db"))).toEqual([out.database.path]);
  });
});

describe("refusals change nothing", () => {
  function copyBackup(name: string): string {
    const to = path.join(scratch, name);
    fs.cpSync(first, to, { recursive: true });
    return to;
  }

  it("refuses a damaged backup (a changed photo file, a missing one) and leaves the live data untouched", { timeout: 120_000 }, async () => {
    const damaged = copyBackup("damaged");
    const manifest = readManifest(damaged);
    const victim = path.join(damaged, manifest.objects[0].path);
    const bytes = fs.readFileSync(victim);
    bytes[bytes.length >> 1] ^= 0xff;
    fs.writeFileSync(victim, bytes);
    db().$client.pragma("wal_checkpoint(TRUNCATE)");
    const before = fingerprint(dataDir());
    expectRefusal(await cli(["restore", damaged, "--replace"]), /damaged.*checksum/);
    expect(fingerprint(dataDir())).toEqual(before);

    const missing = copyBackup("missing");
    fs.rmSync(path.join(missing, readManifest(missing).objects[1].path));
    expectRefusal(await cli(["restore", missing, "--replace"]), /damaged.*missing/);
    expect(fingerprint(dataDir())).toEqual(before);
  });

  it("refuses a backup from a newer schema, whether the manifest says so or only its database does", { timeout: 120_000 }, async () => {
    const FUTURE = 4_102_444_800_000; // 2100-01-01: a migration this code cannot know.
    for (const honestManifest of [true, false]) {
      const newer = copyBackup(`newer-${honestManifest}`);
      const manifest = readManifest(newer);
      const dbFile = path.join(newer, manifest.database.path);
      const sqlite = new Database(dbFile);
      sqlite.prepare("INSERT INTO __drizzle_migrations (hash, created_at) VALUES ('future', ?)").run(FUTURE);
      sqlite.close();
      manifest.database.sha256 = sha256Of(dbFile);
      manifest.database.bytes = fs.statSync(dbFile).size;
      if (honestManifest) manifest.schema = { migrations: manifest.schema.migrations + 1, last: "0099_future", lastWhen: FUTURE };
      writeManifest(newer, manifest);
      const target = path.join(scratch, `newer-target-${honestManifest}`);
      expectRefusal(await cli(["restore", newer], { DATA_DIR: target }), /newer.*schema|schema.*newer/);
      expect(fs.existsSync(target)).toBe(false);
    }
  });

  it("refuses a folder that is not a Solvatlas backup", { timeout: 120_000 }, async () => {
    const foreign = path.join(scratch, "foreign");
    fs.mkdirSync(foreign);
    fs.writeFileSync(path.join(foreign, "solvatlas.db"), "not a backup");
    const target = path.join(scratch, "foreign-target");
    expectRefusal(await cli(["restore", foreign], { DATA_DIR: target }), /not a Solvatlas backup/);
    fs.writeFileSync(path.join(foreign, "solvatlas-backup.json"), JSON.stringify({ format: "something-else" }));
    expectRefusal(await cli(["restore", foreign], { DATA_DIR: target }), /not a Solvatlas backup/);
    expect(fs.existsSync(target)).toBe(false);
  });

  it("refuses to restore over existing data without --replace, and to back up into a folder with other files", { timeout: 120_000 }, async () => {
    db().$client.pragma("wal_checkpoint(TRUNCATE)");
    const before = fingerprint(dataDir());
    expectRefusal(await cli(["restore", first]), /already holds.*--replace/);
    expect(fingerprint(dataDir())).toEqual(before);
    const busy = path.join(scratch, "busy");
    fs.mkdirSync(busy);
    fs.writeFileSync(path.join(busy, "notes.txt"), "mine");
    expectRefusal(await cli(["backup", busy]), /not empty/);
    expect(fs.readdirSync(busy)).toEqual(["notes.txt"]);
  });

  it("refuses while a server is serving the data folder (its DATA_DIR/server.pid names a live process)", { timeout: 120_000 }, async () => {
    const target = path.join(scratch, "served");
    expect((await cli(["restore", first], { DATA_DIR: target })).code).toBe(0);
    const before = fingerprint(target);
    // What scripts/start.ts writes while serving; a live process stands in for the server.
    fs.writeFileSync(path.join(target, "server.pid"), JSON.stringify({ pid: process.pid, startedAt: new Date().toISOString(), port: 3000 }));
    expectRefusal(await cli(["restore", first, "--replace"], { DATA_DIR: target }), /server .*is serving.*stop it/);
    fs.rmSync(path.join(target, "server.pid"));
    expect(fingerprint(target)).toEqual(before);
  });

  it("with --replace, replaces existing data and keeps the old folder aside", { timeout: 120_000 }, async () => {
    const target = path.join(scratch, "replaced");
    expect((await cli(["restore", first], { DATA_DIR: target })).code).toBe(0);
    const sqlite = new Database(path.join(target, "solvatlas.db"));
    sqlite.prepare("DELETE FROM measurements").run();
    sqlite.close();
    const run = await cli(["restore", first, "--replace"], { DATA_DIR: target });
    expect(run.code, run.stderr).toBe(0);
    const out = JSON.parse(run.stdout).restored;
    expect(out.previousDataMovedTo).toMatch(/replaced\.before-restore-/);
    expect(inspectRestored(target).accepted.size).toBe(out.counts.acceptedMeasurements);
    expect(inspectRestored(out.previousDataMovedTo).accepted.size).toBe(0);
  });
});
