import { desc, eq, sql } from "drizzle-orm";
import type { Db } from "../connection";
import { dyes, shortlistItems, shortlists, users } from "../schema";

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

export function shortlistDyes(db: Db, { shortlistId }: { shortlistId: string }) {
  return db
    .select({ item: shortlistItems, dye: dyes })
    .from(shortlistItems)
    .innerJoin(dyes, eq(shortlistItems.dyeId, dyes.id))
    .where(eq(shortlistItems.shortlistId, shortlistId))
    .orderBy(shortlistItems.position)
    .all();
}
