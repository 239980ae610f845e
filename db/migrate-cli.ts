/** `npm run db:migrate`: applies migrations to DATA_DIR's database and reports failures loudly. */
import { dataDir } from "../lib/config/env";
import { databaseFile, migrateDatabase, openDatabase } from "./connection";

const file = databaseFile(dataDir());
try {
  const db = openDatabase(file);
  migrateDatabase(db);
  db.$client.close();
  console.error(`Migrations applied to ${file}`);
} catch (error) {
  console.error(`Migration failed on ${file}: ${(error as Error).message}`);
  process.exit(1);
}
