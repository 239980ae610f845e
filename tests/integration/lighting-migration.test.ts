/**
 * Migration 0005 keeps old rows readable: lighting profiles approved before profile states existed
 * come out "approved" with their correction as the method; unapproved ones come out as drafts.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { migrateDatabase, openDatabase } from "@/db/connection";

const MIGRATIONS = path.join(process.cwd(), "db", "migrations");

describe("migration 0005", () => {
  it("turns the profiles approved before it into approved profiles, the others into drafts", () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-mig5-"));
    // The migrations up to 0004, as a database made before this change has them.
    const before = path.join(dir, "migrations");
    fs.mkdirSync(path.join(before, "meta"), { recursive: true });
    const journal = JSON.parse(fs.readFileSync(path.join(MIGRATIONS, "meta", "_journal.json"), "utf8"));
    const upTo4 = journal.entries.filter((e: { idx: number }) => e.idx <= 4);
    for (const e of upTo4) fs.copyFileSync(path.join(MIGRATIONS, `${e.tag}.sql`), path.join(before, `${e.tag}.sql`));
    fs.writeFileSync(path.join(before, "meta", "_journal.json"), JSON.stringify({ ...journal, entries: upTo4 }));
    const db = openDatabase(path.join(dir, "t.db"));
    migrateDatabase(db, before);
    const sqlite = db.$client;
    sqlite.prepare("insert into users (id, email, name, role) values ('u', 'u@x.test', 'U', 'admin')").run();
    const insert = sqlite.prepare(
      "insert into lighting_profiles (id, name, illuminant, light_source, camera, correction_kind, correction, valid_from, approved_by, approved_at) values (?, ?, 'D65', 'LED', 'cam', 'matrix-3x3', '[1,0,0,0,1,0,0,0,1]', 1700000000000, ?, ?)",
    );
    insert.run("lp_old_ok", "Old approved", "u", 1700000100000);
    insert.run("lp_old_draft", "Old unapproved", null, null);

    migrateDatabase(db, MIGRATIONS);
    const rows = sqlite.prepare("select id, state, method, correction_kind, approved_at from lighting_profiles order by id").all();
    expect(rows).toEqual([
      { id: "lp_old_draft", state: "draft", method: "matrix-3x3", correction_kind: "matrix-3x3", approved_at: null },
      { id: "lp_old_ok", state: "approved", method: "matrix-3x3", correction_kind: "matrix-3x3", approved_at: 1700000100000 },
    ]);
    const tables = (sqlite.prepare("select name from sqlite_master where type = 'table'").all() as { name: string }[]).map((t) => t.name);
    for (const t of ["check_standards", "check_readings", "drift_readings"]) expect(tables).toContain(t);
  });
});
