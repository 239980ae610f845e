/**
 * Which migrations a database has applied, against the migrations this code ships (the drizzle journal).
 * Used by the health check and by backup/restore to refuse a newer schema.
 */
import fs from "node:fs";
import path from "node:path";
import type Database from "better-sqlite3";
import { MIGRATIONS_DIR } from "./connection";

export type JournalEntry = { idx: number; when: number; tag: string };

export function migrationJournal(migrationsFolder = MIGRATIONS_DIR): JournalEntry[] {
  const journal = JSON.parse(fs.readFileSync(path.join(migrationsFolder, "meta", "_journal.json"), "utf8")) as { entries: JournalEntry[] };
  return journal.entries;
}

/** The migrations a database has applied, as drizzle's migrator records them (created_at = the journal's `when`). */
export function appliedMigrations(sqlite: Database.Database): number[] {
  const table = sqlite.prepare("SELECT name FROM sqlite_master WHERE type = 'table' AND name = '__drizzle_migrations'").get();
  if (!table) return [];
  return (sqlite.prepare("SELECT created_at FROM __drizzle_migrations ORDER BY created_at").pluck().all() as (number | string)[]).map(Number);
}
