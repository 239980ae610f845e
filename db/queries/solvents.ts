import { asc, eq } from "drizzle-orm";
import type { Db } from "../connection";
import { solvents, type NewSolvent } from "../schema";
import { recordAudit } from "./audit";

export function listSolvents(db: Db) {
  return db.select().from(solvents).orderBy(asc(solvents.name)).all();
}

export function findSolvent(db: Db, { id }: { id: string }) {
  return db.select().from(solvents).where(eq(solvents.id, id)).get();
}

export function updateSolvent(db: Db, { actorId, id, changes }: { actorId: string; id: string; changes: Partial<NewSolvent> }) {
  return db.transaction((tx) => {
    const before = tx.select().from(solvents).where(eq(solvents.id, id)).get();
    if (!before) return undefined;
    tx.update(solvents).set({ ...changes, updatedAt: new Date() }).where(eq(solvents.id, id)).run();
    const after = tx.select().from(solvents).where(eq(solvents.id, id)).get();
    recordAudit(tx, { actorId, action: "solvent.update", entity: "solvent", entityId: id, before, after });
    return after;
  });
}
