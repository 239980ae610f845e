/**
 * Checks behind GET /api/health, for a process supervisor: the database answers a query, every
 * migration this code ships has been applied (none missing, none unknown), and the photo store takes
 * a write. Answers carry no paths, names or settings.
 */
import type { ObjectStore } from "../../lib/storage/driver";
import type { Db } from "../connection";
import { appliedMigrations, migrationJournal } from "../schema-level";

export type Check = { ok: boolean; message?: string };
export type HealthReport = {
  status: "ok" | "unavailable";
  checks: { database: Check; migrations: Check & { applied: number; expected: number }; storage: Check & { driver: string } };
};

const STORAGE_TIMEOUT_MS = 3000;

function withTimeout<T>(work: Promise<T>, ms: number): Promise<T> {
  return Promise.race([work, new Promise<T>((_, reject) => setTimeout(() => reject(new Error(`no answer within ${ms} ms`)), ms).unref())]);
}

export async function checkHealth(open: () => Db, store: () => ObjectStore, driver: string): Promise<HealthReport> {
  const database: Check = { ok: false };
  const migrations = { ok: false, applied: 0, expected: migrationJournal().length } as HealthReport["checks"]["migrations"];
  try {
    const db = open();
    db.$client.prepare("SELECT count(*) FROM users").pluck().get();
    database.ok = true;
    const applied = appliedMigrations(db.$client);
    const known = new Set(migrationJournal().map((e) => e.when));
    migrations.applied = applied.length;
    migrations.ok = applied.length === migrations.expected && applied.every((w) => known.has(w));
    if (!migrations.ok) migrations.message = applied.length < migrations.expected ? "migrations are missing; restart the server to apply them" : "the database has migrations this version does not know";
  } catch {
    database.message = "the database cannot be read";
    migrations.message = "not checked";
  }
  const storage = { ok: false, driver } as HealthReport["checks"]["storage"];
  try {
    const s = store();
    // A key outside the swept prefixes, removed again at once.
    const key = `health/probe-${process.pid}-${Date.now()}`;
    await withTimeout(s.write(key, new TextEncoder().encode("ok"), "text/plain"), STORAGE_TIMEOUT_MS);
    await withTimeout(s.remove(key), STORAGE_TIMEOUT_MS);
    storage.ok = true;
  } catch {
    storage.message = "the photo store does not accept writes";
  }
  const ok = database.ok && migrations.ok && storage.ok;
  return { status: ok ? "ok" : "unavailable", checks: { database, migrations, storage } };
}
