/**
 * Brings every dye's solvent model and predictions up to date (db/queries/models.ts), and every pH series'
 * stored pKa fit (db/queries/ph-series.ts), so the first search
 * with predictions or tune across dyes does not wait for them. Run by start.ts in the background after a
 * demo seed; safe beside the server (each dye is written in its own transaction, and a model computed twice
 * is written twice with the same content).
 */
import { databaseFile, openDatabase } from "../db/connection";
import { ensureAllDyeModels } from "../db/queries/models";
import { ensureAllPhSeriesFits } from "../db/queries/ph-series";
import { dataDir } from "../lib/config/env";

const db = openDatabase(databaseFile(dataDir()));
try {
  // The pH series first: a handful of fits (≈ 1 s each), read by the pH series page and the pH search.
  const fits = ensureAllPhSeriesFits(db);
  console.error(`pKa fits of pH series brought up to date: ${fits} series.`);
  const n = ensureAllDyeModels(db);
  console.error(`Solvent models brought up to date: ${n} dyes.`);
} catch (error) {
  console.error(`Solvent models could not be computed now (they will be on first use): ${(error as Error).message}`);
} finally {
  db.$client.close();
}
