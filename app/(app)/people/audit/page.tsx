import type { Metadata } from "next";
import { db } from "@/db/client";
import { listAudit } from "@/db/queries/audit";
import { listUsers } from "@/db/queries/users";
import { AdminTabs } from "@/components/people/admin-tabs";
import { PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { ADMIN_ONLY } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Audit log" };

function short(value: unknown): string {
  if (value === null || value === undefined) return "";
  const text = JSON.stringify(value);
  return text.length > 160 ? text.slice(0, 157) + "…" : text;
}

export default async function AuditPage() {
  const { user, allowed } = await pageAccess(ADMIN_ONLY);
  if (!allowed) return <Refused user={user} allowed={ADMIN_ONLY} area="The audit log" />;
  const handle = db();
  const names = new Map(listUsers(handle).map((u) => [u.id, u.name]));
  const entries = listAudit(handle, { limit: 300 });
  return (
    <>
      <PageHeader title="Audit log" lead="Every change: who, what, when, and the values before and after. Newest first." />
      <AdminTabs current="/people/audit" />
      <div className="overflow-x-auto rounded-xl border border-line bg-white">
        <table className="w-full text-left text-xs">
          <thead className="border-b border-line bg-paper-deep/50 text-ink-soft">
            <tr>
              <th className="px-3 py-2">When (UTC)</th>
              <th className="px-3 py-2">Who</th>
              <th className="px-3 py-2">What</th>
              <th className="px-3 py-2">Record</th>
              <th className="px-3 py-2">Before</th>
              <th className="px-3 py-2">After</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-line">
            {entries.map((e) => (
              <tr key={e.id}>
                <td className="whitespace-nowrap px-3 py-2">{e.at.toISOString().replace("T", " ").slice(0, 19)}</td>
                <td className="px-3 py-2">{e.actorId ? (names.get(e.actorId) ?? e.actorId) : "system"}</td>
                <td className="px-3 py-2 font-mono">{e.action}</td>
                <td className="px-3 py-2 font-mono">
                  {e.entity}
                  {e.entityId ? ` ${e.entityId}` : ""}
                </td>
                <td className="max-w-xs break-all px-3 py-2 font-mono text-ink-soft">{short(e.before)}</td>
                <td className="max-w-xs break-all px-3 py-2 font-mono text-ink-soft">{short(e.after)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </>
  );
}
