import { and, count, desc, eq, gte, isNull, lt } from "drizzle-orm";
import type { AuditAction } from "../../lib/audit/actions";
import type { Db } from "../connection";
import { auditLog } from "../schema";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

/** Writes one audit entry; call it inside the same transaction as the change it records. */
export function recordAudit(
  tx: Db | Tx,
  entry: { actorId: string | null; action: AuditAction; entity: string; entityId?: string | null; before?: unknown; after?: unknown },
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

export type AuditFilters = { actorId?: string; action?: string; entity?: string; from?: Date; to?: Date };

function auditWhere(f: AuditFilters) {
  return and(
    f.actorId === "system" ? isNull(auditLog.actorId) : f.actorId ? eq(auditLog.actorId, f.actorId) : undefined,
    f.action ? eq(auditLog.action, f.action) : undefined,
    f.entity ? eq(auditLog.entity, f.entity) : undefined,
    f.from ? gte(auditLog.at, f.from) : undefined,
    f.to ? lt(auditLog.at, f.to) : undefined,
  );
}

/** One page of audit entries, newest first, with the number matching the filters. */
export function searchAudit(db: Db, { filters = {}, page = 1, pageSize = 40 }: { filters?: AuditFilters; page?: number; pageSize?: number }) {
  const where = auditWhere(filters);
  const entries = db.select().from(auditLog).where(where).orderBy(desc(auditLog.id)).limit(pageSize).offset((page - 1) * pageSize).all();
  const total = db.select({ n: count() }).from(auditLog).where(where).get()?.n ?? 0;
  return { entries, total };
}

/** Every entry matching the filters, newest first, for the CSV export (bounded). */
export function exportAudit(db: Db, { filters = {}, limit = 50_000 }: { filters?: AuditFilters; limit?: number }) {
  return db.select().from(auditLog).where(auditWhere(filters)).orderBy(desc(auditLog.id)).limit(limit).all();
}

/** The actions and record kinds that occur, for the filter menus. */
export function auditChoices(db: Db) {
  return {
    actions: db.selectDistinct({ v: auditLog.action }).from(auditLog).orderBy(auditLog.action).all().map((r) => r.v),
    entities: db.selectDistinct({ v: auditLog.entity }).from(auditLog).orderBy(auditLog.entity).all().map((r) => r.v),
  };
}
