/**
 * Opens a Solvatlas SQLite database with the settings the app relies on. Kept free of "server-only" so
 * the CLI, the seed and tests can use it too; app code goes through db/client.ts.
 */
import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { drizzle, type BetterSQLite3Database } from "drizzle-orm/better-sqlite3";
import { migrate } from "drizzle-orm/better-sqlite3/migrator";
import * as schema from "./schema";

export type Db = BetterSQLite3Database<typeof schema> & { $client: Database.Database };

export const MIGRATIONS_DIR = path.join(process.cwd(), "db", "migrations");

export function openDatabase(file: string): Db {
  if (file !== ":memory:") fs.mkdirSync(path.dirname(file), { recursive: true });
  const sqlite = new Database(file);
  sqlite.pragma("journal_mode = WAL");
  sqlite.pragma("foreign_keys = ON");
  sqlite.pragma("busy_timeout = 5000");
  sqlite.pragma("synchronous = NORMAL");
  // Search walks the Lab R*Tree and the measurement rows: a 64 MiB page cache and memory-mapped reads
  // keep a lab-sized database (and the 1 M-row benchmark) in memory.
  sqlite.pragma("cache_size = -65536");
  sqlite.pragma("mmap_size = 268435456");
  return drizzle(sqlite, { schema }) as Db;
}

/** Applies every committed migration; throws (with SQLite's message) on the first that fails. */
export function migrateDatabase(db: Db, migrationsFolder = MIGRATIONS_DIR): void {
  migrate(db, { migrationsFolder });
}

export function databaseFile(dataDirectory: string): string {
  return path.join(dataDirectory, "solvatlas.db");
}
