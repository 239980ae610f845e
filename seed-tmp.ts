import { openDatabase, migrateDatabase, databaseFile } from "@/db/connection";
import { seedDemo } from "@/db/seed/demo";
import { phSeriesForDye, spectraForDye } from "@/db/queries/acid-base";
import { dyes } from "@/db/schema";
import fs from "node:fs"; import os from "node:os"; import path from "node:path";
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "ab-"));
const db = openDatabase(databaseFile(dir)); migrateDatabase?.(db as any);
await seedDemo(db, dir);
for (const d of db.select().from(dyes).all()) { const s = phSeriesForDye(db, { dyeId: d.id }); const sp = spectraForDye(db, { dyeId: d.id }); if (s.length || sp.length) console.log(d.code, d.name, "series", s.map(x => `${x.solvent.name}:${x.vials.length}`).join(","), "spectra", sp.length); }
