import "server-only";
import { dataDir } from "@/lib/config/env";
import { databaseFile, migrateDatabase, openDatabase, type Db } from "./connection";

const globalForDb = globalThis as unknown as { solvatlasDb?: Db };

/** The app's one database handle, created on first use and cached across hot reloads. */
export function db(): Db {
  if (!globalForDb.solvatlasDb) {
    const handle = openDatabase(databaseFile(dataDir()));
    migrateDatabase(handle);
    globalForDb.solvatlasDb = handle;
  }
  return globalForDb.solvatlasDb;
}
