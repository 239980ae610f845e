import { db } from "@/db/client";
import { exportAudit } from "@/db/queries/audit";
import { listUsers } from "@/db/queries/users";
import { apiRoute } from "@/lib/auth/guard";
import { ADMIN_ONLY } from "@/lib/auth/roles";
import { auditDiff } from "@/lib/audit/diff";
import { writeCsv } from "@/lib/csv/write";
import { auditParams, toAuditFilters } from "./filters";

/**
 * GET /api/audit?who=&what=&record=&from=&to=&format=csv|json — admins only. The audit entries that
 * match, newest first; CSV has one row per entry with the changed fields written out.
 */
export const GET = apiRoute({ access: ADMIN_ONLY, query: auditParams }, async ({ query }) => {
  const handle = db();
  const names = new Map(listUsers(handle).map((u) => [u.id, u.name]));
  const entries = exportAudit(handle, { filters: toAuditFilters(query) });
  if (query.format === "json") {
    return { entries: entries.map((e) => ({ ...e, at: e.at.toISOString(), actor: e.actorId ? (names.get(e.actorId) ?? e.actorId) : "system", changes: auditDiff(e.before, e.after) })) };
  }
  const data = entries.map((e) => [
    e.id,
    e.at.toISOString(),
    e.actorId ? (names.get(e.actorId) ?? e.actorId) : "system",
    e.action,
    e.entity,
    e.entityId ?? "",
    auditDiff(e.before, e.after)
      .map((c) => `${c.field}: ${c.before} → ${c.after}`)
      .join("; "),
  ]);
  const csv = writeCsv(["id", "at_utc", "who", "what", "record", "record_id", "changes"], data);
  const stamp = new Date().toISOString().slice(0, 10);
  return new Response(csv, { headers: { "content-type": "text/csv; charset=utf-8", "content-disposition": `attachment; filename="solvatlas-audit-${stamp}.csv"` } });
});
