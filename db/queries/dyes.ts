import { randomUUID } from "node:crypto";
import { and, desc, eq, sql } from "drizzle-orm";
import { AppError } from "../../lib/errors";
import type { Db } from "../connection";
import { conditions, dyes, measurements, solvents, type Dye, type NewDye } from "../schema";
import { recordAudit } from "./audit";

export type DyeSummary = Dye & { measurementCount: number; acceptedCount: number };

export function listDyes(db: Db): DyeSummary[] {
  const counts = db
    .select({
      dyeId: measurements.dyeId,
      n: sql<number>`count(*)`,
      accepted: sql<number>`sum(case when ${measurements.reviewState} = 'accepted' then 1 else 0 end)`,
    })
    .from(measurements)
    .groupBy(measurements.dyeId)
    .all();
  const byDye = new Map(counts.map((c) => [c.dyeId, c]));
  return db
    .select()
    .from(dyes)
    .orderBy(dyes.code)
    .all()
    .map((d) => ({ ...d, measurementCount: byDye.get(d.id)?.n ?? 0, acceptedCount: byDye.get(d.id)?.accepted ?? 0 }));
}

const dyeListCache = new WeakMap<Db["$client"], { version: number; list: DyeSummary[] }>();

/** The dye-list version (migration 0009): changes whenever a dye, or a measurement's dye or review state, changes. */
export function dyesVersion(db: Db): number {
  return Number(db.$client.prepare("SELECT n FROM change_counters WHERE name = 'dyes'").pluck().get() ?? 0);
}

/**
 * listDyes() kept in memory per database handle until the dye-list version changes: the counts are a
 * group-by over every measurement, too costly per API call. The version is read before the list, so a
 * write in between leaves a newer list under an older version (reloaded next time), never the reverse.
 * Callers get the same array while nothing changed (the text-search index is cached on it); do not mutate it.
 */
export function listDyesCached(db: Db): readonly DyeSummary[] {
  const version = dyesVersion(db);
  const hit = dyeListCache.get(db.$client);
  if (hit && hit.version === version) return hit.list;
  const list = listDyes(db);
  dyeListCache.set(db.$client, { version, list });
  return list;
}

export function findDyeByCode(db: Db, { code }: { code: string }): Dye | undefined {
  return db.select().from(dyes).where(eq(dyes.code, code)).get();
}

export function findDyeById(db: Db, { id }: { id: string }): Dye | undefined {
  return db.select().from(dyes).where(eq(dyes.id, id)).get();
}

/** Every measurement of a dye with its condition and solvent, newest first. */
export function dyeMeasurements(db: Db, { dyeId, acceptedOnly = false }: { dyeId: string; acceptedOnly?: boolean }) {
  return db
    .select({ m: measurements, condition: conditions, solvent: solvents })
    .from(measurements)
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .where(acceptedOnly ? and(eq(measurements.dyeId, dyeId), eq(measurements.reviewState, "accepted")) : eq(measurements.dyeId, dyeId))
    .orderBy(desc(measurements.createdAt))
    .all();
}

export function updateDye(db: Db, { actorId, id, changes }: { actorId: string; id: string; changes: Partial<NewDye> }) {
  return db.transaction((tx) => {
    const before = tx.select().from(dyes).where(eq(dyes.id, id)).get();
    if (!before) return undefined;
    tx.update(dyes).set({ ...changes, updatedAt: new Date() }).where(eq(dyes.id, id)).run();
    const after = tx.select().from(dyes).where(eq(dyes.id, id)).get();
    recordAudit(tx, { actorId, action: "dye.update", entity: "dye", entityId: id, before, after });
    return after;
  });
}

export function createDye(db: Db, { actorId, dye }: { actorId: string; dye: NewDye & { id: string } }) {
  db.transaction((tx) => {
    tx.insert(dyes).values({ ...dye, createdBy: actorId }).run();
    recordAudit(tx, { actorId, action: "dye.create", entity: "dye", entityId: dye.id, after: dye });
  });
  return findDyeById(db, { id: dye.id });
}

/** Adds a dye with a new code (refused as a conflict when the code is taken), with its audit entry. */
export function addDye(db: Db, { actorId, dye }: { actorId: string; dye: Omit<NewDye, "id" | "createdBy"> }): Dye {
  return db.transaction((tx) => {
    if (tx.select({ id: dyes.id }).from(dyes).where(sql`lower(${dyes.code}) = lower(${dye.code})`).get()) {
      throw new AppError("conflict", `A dye with the code ${dye.code} is already in the catalogue; open it there, or choose another code.`, { code: ["This code is taken."] });
    }
    const id = `dye_${randomUUID()}`;
    tx.insert(dyes).values({ ...dye, id, createdBy: actorId }).run();
    const after = tx.select().from(dyes).where(eq(dyes.id, id)).get()!;
    recordAudit(tx, { actorId, action: "dye.create", entity: "dye", entityId: id, after });
    return after;
  });
}

/** Changes a dye; a new code must be free. Returns undefined when no dye has that id. */
export function changeDye(db: Db, { actorId, id, changes }: { actorId: string; id: string; changes: Partial<NewDye> }) {
  if (changes.code) {
    const taken = db.select({ id: dyes.id }).from(dyes).where(sql`lower(${dyes.code}) = lower(${changes.code})`).get();
    if (taken && taken.id !== id) throw new AppError("conflict", `Another dye already has the code ${changes.code}; choose another.`, { code: ["This code is taken."] });
  }
  return updateDye(db, { actorId, id, changes });
}

/** Adds several dyes in one transaction (CSV import): all or nothing, one audit entry each. */
export function addDyes(db: Db, { actorId, list }: { actorId: string; list: Omit<NewDye, "id" | "createdBy">[] }): number {
  return db.transaction((tx) => {
    for (const dye of list) {
      if (tx.select({ id: dyes.id }).from(dyes).where(sql`lower(${dyes.code}) = lower(${dye.code})`).get()) {
        throw new AppError("conflict", `A dye with the code ${dye.code} is already in the catalogue; nothing was imported.`);
      }
      const id = `dye_${randomUUID()}`;
      tx.insert(dyes).values({ ...dye, id, createdBy: actorId }).run();
      recordAudit(tx, { actorId, action: "dye.create", entity: "dye", entityId: id, after: { ...dye, imported: true } });
    }
    return list.length;
  });
}

/** Which of these codes are already in the catalogue (any letter case). */
export function existingDyeCodes(db: Db, codes: string[]): Set<string> {
  const wanted = new Set(codes.map((c) => c.toLowerCase()));
  return new Set(
    db
      .select({ code: dyes.code })
      .from(dyes)
      .all()
      .map((d) => d.code.toLowerCase())
      .filter((c) => wanted.has(c)),
  );
}
