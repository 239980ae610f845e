import type { Metadata } from "next";
import { db } from "@/db/client";
import { listInvitations, listUsers } from "@/db/queries/users";
import { AdminTabs } from "@/components/people/admin-tabs";
import { InviteForm } from "@/components/people/invite-form";
import { PersonControls } from "@/components/people/person-controls";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { ADMIN_ONLY, ROLE_LABELS } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "People" };

export default async function PeoplePage() {
  const { user, allowed } = await pageAccess(ADMIN_ONLY);
  if (!allowed) return <Refused user={user} allowed={ADMIN_ONLY} area="People" />;
  const handle = db();
  const people = listUsers(handle);
  const invitations = listInvitations(handle).filter((i) => !i.usedAt && i.expiresAt.getTime() > Date.now());
  return (
    <>
      <PageHeader title="People" lead="Invite colleagues, change roles, deactivate accounts. Deactivation ends a person's sessions and API tokens at once; nothing they recorded is removed." />
      <AdminTabs current="/people" />
      <Card title="Invite someone">
        <InviteForm />
      </Card>
      <Card title={`Accounts (${people.length})`} className="mt-4">
        <ul className="divide-y divide-line">
          {people.map((p) => (
            <li key={p.id} className="flex flex-wrap items-center justify-between gap-3 py-3" data-testid="person-row">
              <div>
                <p className="font-medium">
                  {p.name} {p.id === user.id && <span className="text-xs text-ink-soft">(you)</span>}
                </p>
                <p className="text-sm text-ink-soft">
                  {p.email} · {ROLE_LABELS[p.role]} {p.deactivatedAt && <Badge tone="bad">deactivated</Badge>}
                </p>
              </div>
              <PersonControls userId={p.id} role={p.role} active={!p.deactivatedAt} self={p.id === user.id} />
            </li>
          ))}
        </ul>
      </Card>
      {invitations.length > 0 && (
        <Card title="Open invitations" className="mt-4">
          <ul className="divide-y divide-line text-sm">
            {invitations.map((i) => (
              <li key={i.id} className="py-2">
                {i.name} &lt;{i.email}&gt; as {ROLE_LABELS[i.role].toLowerCase()} · expires {i.expiresAt.toISOString().slice(0, 10)}
              </li>
            ))}
          </ul>
        </Card>
      )}
    </>
  );
}
