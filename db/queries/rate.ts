import { and, eq, gt, lt, sql } from "drizzle-orm";
import type { Db } from "../connection";
import { rateEvents } from "../schema";

const DAY_MS = 24 * 3600 * 1000;

/**
 * Counts the events of this kind and key within the window; when fewer than `max`, records one more
 * and answers true. Check and record happen in one transaction, so parallel requests cannot both slip in.
 */
export function takeRateSlot(db: Db, { kind, key, max, windowMs, now = new Date() }: { kind: string; key: string; max: number; windowMs: number; now?: Date }): boolean {
  return db.transaction((tx) => {
    tx.delete(rateEvents).where(lt(rateEvents.at, new Date(now.getTime() - Math.max(DAY_MS, windowMs)))).run();
    const n = tx
      .select({ n: sql<number>`count(*)` })
      .from(rateEvents)
      .where(and(eq(rateEvents.kind, kind), eq(rateEvents.key, key), gt(rateEvents.at, new Date(now.getTime() - windowMs))))
      .get()!.n;
    if (n >= max) return false;
    tx.insert(rateEvents).values({ kind, key, at: now }).run();
    return true;
  });
}
