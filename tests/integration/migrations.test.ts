import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { migrateDatabase, openDatabase } from "@/db/connection";
import { conditions, dyes, measurements, solvents, users } from "@/db/schema";

function freshDb() {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-mig-"));
  return openDatabase(path.join(dir, "t.db"));
}

describe("migrations", () => {
  it("apply to an empty database and are idempotent", () => {
    const db = freshDb();
    migrateDatabase(db);
    migrateDatabase(db);
    const tables = db.$client.prepare("select name from sqlite_master where type in ('table') order by name").all() as { name: string }[];
    const names = tables.map((t) => t.name);
    for (const t of ["users", "sessions", "invitations", "password_resets", "api_tokens", "dyes", "solvents", "conditions", "lighting_profiles", "calibration_targets", "photos", "measurements", "spectra", "shortlists", "shortlist_items", "audit_log", "measurement_lab_rtree"]) {
      expect(names, t).toContain(t);
    }
    expect(db.$client.pragma("journal_mode", { simple: true })).toBe("wal");
    expect(db.$client.pragma("foreign_keys", { simple: true })).toBe(1);
    expect(db.$client.pragma("busy_timeout", { simple: true })).toBe(5000);
  });

  it("keep the Lab R*Tree in step with accepted measurements only", () => {
    const db = freshDb();
    migrateDatabase(db);
    db.insert(users).values({ id: "u", email: "u@x.test", name: "U", role: "chemist" }).run();
    db.insert(solvents).values({ id: "s", name: "S", medium: "protic", mediumSource: "test" }).run();
    db.insert(dyes).values({ id: "d", code: "D", name: "D", dyeClass: "azo" }).run();
    db.insert(conditions).values({ id: "c", solventId: "s", acidBase: "neutral" }).run();
    const base = { dyeId: "d", conditionId: "c", rawR: 0.1, rawG: 0.1, rawB: 0.1, x: 1, y: 1, z: 1, pixelCount: 1, rejectedCount: 0, spread: 0, createdBy: "u" };
    db.insert(measurements).values({ ...base, id: "m1", l: 50, a: 10, b: -20, reviewState: "accepted" }).run();
    db.insert(measurements).values({ ...base, id: "m2", l: 60, a: 0, b: 0, reviewState: "pending" }).run();
    const boxCount = () => (db.$client.prepare("select count(*) n from measurement_lab_rtree").get() as { n: number }).n;
    expect(boxCount()).toBe(1);
    const inBox = db.$client.prepare("select m.measurement_id id from measurement_lab_rtree r join measurement_rtree_ids m on m.rowid_key = r.id where l_min <= 50.001 and l_max >= 49.999 and a_min <= 10.001 and a_max >= 9.999").all();
    expect(inBox).toEqual([{ id: "m1" }]);
    db.update(measurements).set({ reviewState: "accepted" }).where(eq(measurements.id, "m2")).run();
    expect(boxCount()).toBe(2);
    db.update(measurements).set({ reviewState: "rejected" }).where(eq(measurements.id, "m1")).run();
    expect(boxCount()).toBe(1);
    db.delete(measurements).where(eq(measurements.id, "m2")).run();
    expect(boxCount()).toBe(0);
  });

  it("refuse a measurement pointing at a dye that does not exist (foreign keys on)", () => {
    const db = freshDb();
    migrateDatabase(db);
    expect(() =>
      db.insert(measurements).values({ id: "x", dyeId: "nope", conditionId: "nope", rawR: 0, rawG: 0, rawB: 0, x: 0, y: 0, z: 0, l: 0, a: 0, b: 0, pixelCount: 0, rejectedCount: 0, spread: 0, createdBy: "nobody" }).run(),
    ).toThrow(/FOREIGN KEY/);
  });
});
