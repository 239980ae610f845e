/** `npm run db:seed`: migrates, then seeds the solvent table and the demo scenario if the database is empty. */
import { dataDir } from "../lib/config/env";
import { databaseFile, migrateDatabase, openDatabase } from "./connection";
import { seedDemo } from "./seed/demo";

const dir = dataDir();
const db = openDatabase(databaseFile(dir));
try {
  migrateDatabase(db);
  const result = await seedDemo(db, dir, { models: true });
  console.error(result ? `Demo data added: ${JSON.stringify(result)}` : "Database already has users; demo seed skipped.");
} catch (error) {
  console.error(`Seeding failed: ${(error as Error).message}`);
  process.exitCode = 1;
} finally {
  db.$client.close();
}
