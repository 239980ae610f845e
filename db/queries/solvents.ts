import { randomUUID } from "node:crypto";
import { asc, eq, sql } from "drizzle-orm";
import { AppError } from "../../lib/errors";
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

/** Adds a solvent (admins): a new name, its parameters with their sources, an audit entry. */
export function addSolvent(db: Db, { actorId, solvent }: { actorId: string; solvent: Omit<NewSolvent, "id"> }) {
  return db.transaction((tx) => {
    const taken = tx
      .select({ id: solvents.id })
      .from(solvents)
      .where(sql`lower(${solvents.name}) = lower(${solvent.name})`)
      .get();
    if (taken) throw new AppError("conflict", `${solvent.name} is already in the solvent table; edit it there instead.`, { name: ["This solvent exists."] });
    const id = `solv_${randomUUID()}`;
    tx.insert(solvents).values({ ...solvent, id }).run();
    const after = tx.select().from(solvents).where(eq(solvents.id, id)).get()!;
    recordAudit(tx, { actorId, action: "solvent.create", entity: "solvent", entityId: id, after });
    return after;
  });
}
