/** The audit-log filters as URL parameters, shared by GET /api/audit and the /people/audit page. */
import { z } from "zod";
import type { AuditFilters } from "@/db/queries/audit";

const text = z.string().trim().max(100).optional().transform((v) => v || undefined);
const day = z
  .string()
  .trim()
  .optional()
  .transform((v) => v || undefined)
  .refine((v) => v === undefined || (/^\d{4}-\d{2}-\d{2}$/.test(v) && !Number.isNaN(Date.parse(`${v}T00:00:00Z`))), { error: "Give a date as YYYY-MM-DD." });

export const auditParams = z.object({
  who: text,
  what: text,
  record: text,
  from: day,
  to: day,
  page: z.coerce.number().int().min(1).max(100_000).optional().default(1),
  format: z.enum(["json", "csv"]).optional().default("json"),
});
export type AuditParams = z.infer<typeof auditParams>;

export function toAuditFilters(p: AuditParams): AuditFilters {
  return {
    actorId: p.who,
    action: p.what,
    entity: p.record,
    from: p.from ? new Date(`${p.from}T00:00:00Z`) : undefined,
    // "to" is the last day included.
    to: p.to ? new Date(Date.parse(`${p.to}T00:00:00Z`) + 86_400_000) : undefined,
  };
}
