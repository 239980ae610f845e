import type { Metadata } from "next";
import Link from "next/link";
import { db } from "@/db/client";
import { auditChoices, searchAudit } from "@/db/queries/audit";
import { listDyes } from "@/db/queries/dyes";
import { listUsers } from "@/db/queries/users";
import { auditParams, toAuditFilters } from "@/app/api/audit/filters";
import { AdminTabs } from "@/components/people/admin-tabs";
import { ButtonLink } from "@/components/ui/button";
import { Notice, PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { ADMIN_ONLY } from "@/lib/auth/roles";
import { auditActionWords } from "@/lib/audit/actions";
import { auditDiff } from "@/lib/audit/diff";
import { count } from "@/lib/text/count";

export const metadata: Metadata = { title: "Audit log" };

const PAGE_SIZE = 40;

/** Where a record of each kind can be seen; null when it has no page of its own. */
function recordHref(entity: string, id: string | null, dyeCodes: Map<string, string>): string | null {
  if (!id) return null;
  switch (entity) {
    case "dye":
      return dyeCodes.has(id) ? `/catalogue/${encodeURIComponent(dyeCodes.get(id)!)}` : null;
    case "solvent":
      return `/solvents/${encodeURIComponent(id)}`;
    case "shortlist":
      return `/shortlists/${encodeURIComponent(id)}`;
    case "photo":
      return `/bench/photos/${encodeURIComponent(id)}`;
    case "user":
    case "invitation":
      return "/people";
    case "lighting_profile":
    case "calibration_target":
      return "/lighting";
    default:
      return null;
  }
}

const SELECT = "min-h-11 w-full rounded-md border border-field bg-white px-2 text-sm";

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { user, allowed } = await pageAccess(ADMIN_ONLY);
  if (!allowed) return <Refused user={user} allowed={ADMIN_ONLY} area="The audit log" />;
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  const parsed = auditParams.safeParse(raw);
  const params = parsed.success ? parsed.data : auditParams.parse({});
  const handle = db();
  const people = listUsers(handle);
  const names = new Map(people.map((u) => [u.id, u.name]));
  const dyeCodes = new Map(listDyes(handle).map((d) => [d.id, d.code]));
  const choices = auditChoices(handle);
  const { entries, total } = searchAudit(handle, { filters: toAuditFilters(params), page: params.page, pageSize: PAGE_SIZE });
  const pages = Math.max(1, Math.ceil(total / PAGE_SIZE));
  const query = (over: Record<string, string | number | undefined>) => {
    const q = new URLSearchParams();
    for (const [k, v] of Object.entries({ who: params.who, what: params.what, record: params.record, from: params.from, to: params.to, ...over })) if (v !== undefined && v !== "") q.set(k, String(v));
    return q.toString();
  };
  const first = total === 0 ? 0 : (params.page - 1) * PAGE_SIZE + 1;
  const last = Math.min(total, params.page * PAGE_SIZE);
  return (
    <>
      <PageHeader title="Audit log" lead="Every change: who, what, when, and what it changed. Newest first." actions={<ButtonLink href={`/api/audit?${query({ format: "csv" })}`}>Export these entries as CSV</ButtonLink>} />
      <AdminTabs current="/people/audit" />
      {!parsed.success && <Notice tone="error">{parsed.error.issues[0]?.message ?? "A filter could not be read."} The filters were reset.</Notice>}
      <form className="mb-4 grid grid-cols-2 gap-3 border border-line bg-white p-3 sm:grid-cols-3 lg:grid-cols-6" aria-label="Filter the audit log">
        <label className="text-sm font-medium">
          Who
          <select name="who" defaultValue={params.who ?? ""} className={SELECT}>
            <option value="">anyone</option>
            <option value="system">the system</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.name}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm font-medium">
          What
          <select name="what" defaultValue={params.what ?? ""} className={SELECT}>
            <option value="">any change</option>
            {choices.actions.map((a) => (
              <option key={a} value={a}>
                {auditActionWords(a) === a ? a : `${auditActionWords(a)} (${a})`}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm font-medium">
          Record
          <select name="record" defaultValue={params.record ?? ""} className={SELECT}>
            <option value="">any record</option>
            {choices.entities.map((e) => (
              <option key={e} value={e}>
                {e.replace(/_/g, " ")}
              </option>
            ))}
          </select>
        </label>
        <label className="text-sm font-medium">
          From (UTC day)
          <input type="date" name="from" defaultValue={params.from ?? ""} className={SELECT} />
        </label>
        <label className="text-sm font-medium">
          To (UTC day, included)
          <input type="date" name="to" defaultValue={params.to ?? ""} className={SELECT} />
        </label>
        <div className="flex items-end gap-2">
          <button className="min-h-11 rounded-md bg-ink px-4 text-sm font-semibold text-white">Show</button>
          <Link href="/people/audit" className="flex min-h-11 items-center text-sm text-accent">
            Clear
          </Link>
        </div>
      </form>
      <p className="mb-2 text-sm text-ink-soft" role="status">
        {total === 0 ? "No entry matches these filters." : `${first}–${last} of ${count(total, "entry", "entries")}`}
      </p>
      <ol className="divide-y divide-line border border-line bg-white" aria-label="Audit entries" data-testid="audit-entries">
        {entries.map((e) => {
          const href = recordHref(e.entity, e.entityId, dyeCodes);
          const changes = auditDiff(e.before, e.after);
          return (
            <li key={e.id} className="grid gap-x-4 gap-y-1 px-3 py-3 text-sm md:grid-cols-[11rem_10rem_1fr]" data-testid="audit-entry">
              <span className="tabular-nums text-ink-soft">{e.at.toISOString().replace("T", " ").slice(0, 19)} UTC</span>
              <span>{e.actorId ? (names.get(e.actorId) ?? e.actorId) : "the system"}</span>
              <div className="min-w-0">
                <p>
                  <span className="font-semibold" data-testid="audit-action">
                    {auditActionWords(e.action)}
                  </span>{" "}
                  <span className="text-ink-soft">· {e.entity.replace(/_/g, " ")}</span>{" "}
                  {e.entityId &&
                    (href ? (
                      <Link href={href} className="break-all font-mono text-accent">
                        {e.entity === "dye" ? (dyeCodes.get(e.entityId) ?? e.entityId) : e.entityId}
                      </Link>
                    ) : (
                      <span className="break-all font-mono">{e.entityId}</span>
                    ))}
                </p>
                {auditActionWords(e.action) !== e.action && (
                  <p className="font-mono text-xs text-ink-soft" data-testid="audit-code">
                    {e.action}
                  </p>
                )}
                {changes.length > 0 && (
                  <details className="mt-1">
                    <summary className="min-h-8 cursor-pointer text-accent underline">{count(changes.length, "field")} changed</summary>
                    <div className="scroll-x">
                      <table className="mt-1 text-xs">
                        <thead className="text-ink-soft">
                          <tr>
                            <th className="py-1 pr-3 text-left font-medium">Field</th>
                            <th className="py-1 pr-3 text-left font-medium">Before</th>
                            <th className="py-1 pr-3 text-left font-medium">After</th>
                          </tr>
                        </thead>
                        <tbody>
                          {changes.map((c) => (
                            <tr key={c.field} className="border-t border-line align-top">
                              <td className="py-1 pr-3">{c.field}</td>
                              <td className="max-w-64 break-words py-1 pr-3 text-ink-soft">
                                <del className="decoration-1">{c.before}</del>
                              </td>
                              <td className="max-w-64 break-words py-1 pr-3">
                                <ins className="no-underline">{c.after}</ins>
                              </td>
                            </tr>
                          ))}
                        </tbody>
                      </table>
                    </div>
                  </details>
                )}
              </div>
            </li>
          );
        })}
      </ol>
      {pages > 1 && (
        <nav aria-label="Pages of the audit log" className="mt-3 flex items-center gap-3 text-sm">
          {params.page > 1 ? (
            <Link href={`?${query({ page: params.page - 1 })}`} className="text-accent" rel="prev">
              ← Newer
            </Link>
          ) : (
            <span className="text-ink-soft">← Newer</span>
          )}
          <span>
            Page {params.page} of {pages}
          </span>
          {params.page < pages ? (
            <Link href={`?${query({ page: params.page + 1 })}`} className="text-accent" rel="next">
              Older →
            </Link>
          ) : (
            <span className="text-ink-soft">Older →</span>
          )}
        </nav>
      )}
    </>
  );
}
