import { desc } from "drizzle-orm";
import type { Db } from "../connection";
import { auditLog } from "../schema";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** Writes one audit entry; call it inside the same transaction as the change it records. */
export function recordAudit(
  tx: Db | Tx,
  entry: { actorId: string | null; action: string; entity: string; entityId?: string | null; before?: unknown; after?: unknown },
): void {
  tx.insert(auditLog)
    .values({
      at: new Date(),
      actorId: entry.actorId,
      action: entry.action,
      entity: entry.entity,
      entityId: entry.entityId ?? null,
      before: entry.before ?? null,
      after: entry.after ?? null,
    })
    .run();
}

export function listAudit(db: Db, { limit = 200 }: { limit?: number } = {}) {
  return db.select().from(auditLog).orderBy(desc(auditLog.id)).limit(limit).all();
}
