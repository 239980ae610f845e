import { and, asc, desc, eq, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import type { ConditionColour } from "@/lib/search/shortlist-csv";
import type { Db } from "../connection";
import { conditions, dyes, measurements, shortlistItems, shortlists, solvents, users, type Shortlist } from "../schema";
import { recordAudit } from "./audit";

export function listShortlists(db: Db, { ownerId }: { ownerId?: string } = {}) {
  const q = db
    .select({
      list: shortlists,
      owner: users.name,
      items: sql<number>`(select count(*) from ${shortlistItems} where ${shortlistItems.shortlistId} = ${shortlists.id})`,
    })
    .from(shortlists)
    .innerJoin(users, eq(shortlists.ownerId, users.id))
    .orderBy(desc(shortlists.createdAt));
  return ownerId ? q.where(eq(shortlists.ownerId, ownerId)).all() : q.all();
}

export function findShortlist(db: Db, { id }: { id: string }) {
  return db.select({ list: shortlists, owner: users.name, ownerEmail: users.email }).from(shortlists).innerJoin(users, eq(shortlists.ownerId, users.id)).where(eq(shortlists.id, id)).get();
}

export function shortlistDyes(db: Db, { shortlistId }: { shortlistId: string }) {
  return db
    .select({
      item: shortlistItems,
      dye: dyes,
      accepted: sql<number>`(select count(*) from ${measurements} where ${measurements.dyeId} = ${dyes.id} and ${measurements.reviewState} = 'accepted')`,
    })
    .from(shortlistItems)
    .innerJoin(dyes, eq(shortlistItems.dyeId, dyes.id))
    .where(eq(shortlistItems.shortlistId, shortlistId))
    .orderBy(asc(shortlistItems.position), asc(shortlistItems.createdAt))
    .all();
}

export function createShortlist(db: Db, { actorId, id, name, notes }: { actorId: string; id: string; name: string; notes: string }): Shortlist {
  return db.transaction((tx) => {
    tx.insert(shortlists).values({ id, ownerId: actorId, name, notes }).run();
    const after = tx.select().from(shortlists).where(eq(shortlists.id, id)).get()!;
    recordAudit(tx, { actorId, action: "shortlist.create", entity: "shortlist", entityId: id, after });
    return after;
  });
}

/** Adds a dye; false when it is already on the list (nothing changes then). */
export function addShortlistItem(db: Db, { actorId, id, shortlistId, dyeId, note }: { actorId: string; id: string; shortlistId: string; dyeId: string; note: string }): boolean {
  return db.transaction((tx) => {
    const exists = tx.select({ id: shortlistItems.id }).from(shortlistItems).where(and(eq(shortlistItems.shortlistId, shortlistId), eq(shortlistItems.dyeId, dyeId))).get();
    if (exists) return false;
    const position = (tx.select({ n: sql<number>`coalesce(max(${shortlistItems.position}), -1)` }).from(shortlistItems).where(eq(shortlistItems.shortlistId, shortlistId)).get()?.n ?? -1) + 1;
    tx.insert(shortlistItems).values({ id, shortlistId, dyeId, note, position }).run();
    tx.update(shortlists).set({ updatedAt: new Date() }).where(eq(shortlists.id, shortlistId)).run();
    recordAudit(tx, { actorId, action: "shortlist.add", entity: "shortlist", entityId: shortlistId, after: { itemId: id, dyeId, note } });
    return true;
  });
}

export function findShortlistItem(db: Db, { id }: { id: string }) {
  return db.select({ item: shortlistItems, list: shortlists }).from(shortlistItems).innerJoin(shortlists, eq(shortlistItems.shortlistId, shortlists.id)).where(eq(shortlistItems.id, id)).get();
}

export function removeShortlistItem(db: Db, { actorId, id }: { actorId: string; id: string }) {
  db.transaction((tx) => {
    const before = tx.select().from(shortlistItems).where(eq(shortlistItems.id, id)).get();
    if (!before) return;
    tx.delete(shortlistItems).where(eq(shortlistItems.id, id)).run();
    tx.update(shortlists).set({ updatedAt: new Date() }).where(eq(shortlists.id, before.shortlistId)).run();
    recordAudit(tx, { actorId, action: "shortlist.remove", entity: "shortlist", entityId: before.shortlistId, before });
  });
}

export function updateShortlistItemNote(db: Db, { actorId, id, note }: { actorId: string; id: string; note: string }) {
  db.transaction((tx) => {
    const before = tx.select().from(shortlistItems).where(eq(shortlistItems.id, id)).get();
    if (!before) return;
    tx.update(shortlistItems).set({ note }).where(eq(shortlistItems.id, id)).run();
    recordAudit(tx, { actorId, action: "shortlist.note", entity: "shortlist", entityId: before.shortlistId, before: { itemId: id, note: before.note }, after: { itemId: id, note } });
  });
}

export function recordShortlistShare(db: Db, { actorId, shortlistId, to }: { actorId: string; shortlistId: string; to: string }) {
  db.transaction((tx) => recordAudit(tx, { actorId, action: "shortlist.share", entity: "shortlist", entityId: shortlistId, after: { to } }));
}

/**
 * Every accepted colour of the dyes on a shortlist, with its condition and that solvent's parameters,
 * for exports that keep the colour (lib/search/shortlist-csv summarises them per condition).
 */
export function shortlistConditionColours(db: Db, { shortlistId }: { shortlistId: string }): ConditionColour[] {
  const second = alias(solvents, "second_solvent");
  return db
    .select({
      dyeCode: dyes.code,
      conditionId: conditions.id,
      solvent: solvents.name,
      medium: solvents.medium,
      acidBase: conditions.acidBase,
      ph: conditions.ph,
      additive: conditions.additive,
      temperatureC: conditions.temperatureC,
      secondSolvent: second.name,
      secondSolventMoleFraction: conditions.secondSolventMoleFraction,
      et30: solvents.et30,
      etn: solvents.etn,
      alpha: solvents.ktAlpha,
      beta: solvents.ktBeta,
      piStar: solvents.ktPiStar,
      permittivity: solvents.permittivity,
      illuminant: measurements.illuminant,
      observer: measurements.observer,
      l: measurements.l,
      a: measurements.a,
      b: measurements.b,
    })
    .from(shortlistItems)
    .innerJoin(dyes, eq(shortlistItems.dyeId, dyes.id))
    .innerJoin(measurements, and(eq(measurements.dyeId, dyes.id), eq(measurements.reviewState, "accepted")))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .leftJoin(second, eq(conditions.secondSolventId, second.id))
    .where(eq(shortlistItems.shortlistId, shortlistId))
    .all()
    .map((r) => ({
      dyeCode: r.dyeCode,
      conditionId: r.conditionId,
      solvent: r.solvent,
      medium: r.medium,
      acidBase: r.acidBase,
      ph: r.ph,
      additive: r.additive,
      temperatureC: r.temperatureC,
      secondSolvent: r.secondSolvent,
      secondSolventMoleFraction: r.secondSolventMoleFraction,
      solventParameters: { et30: r.et30, etn: r.etn, alpha: r.alpha, beta: r.beta, piStar: r.piStar, permittivity: r.permittivity },
      whitePoint: `${r.illuminant}, ${r.observer}`,
      lab: [r.l, r.a, r.b] as [number, number, number],
    }));
}
