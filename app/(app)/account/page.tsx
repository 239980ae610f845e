import type { Metadata } from "next";
import { db } from "@/db/client";
import { listApiTokens } from "@/db/queries/users";
import { ChangePasswordForm } from "@/components/account/password-form";
import { CreateTokenForm, RevokeTokenButton } from "@/components/account/token-panel";
import { Badge, Card, PageHeader } from "@/components/ui/card";
import { pageAccess } from "@/lib/auth/page";
import { ANY_ROLE, ROLE_LABELS } from "@/lib/auth/roles";

export const metadata: Metadata = { title: "Your account" };

const day = (d: Date | null) => (d ? d.toISOString().slice(0, 16).replace("T", " ") : "never");

export default async function AccountPage() {
  const { user } = await pageAccess(ANY_ROLE);
  const tokens = listApiTokens(db(), { userId: user.id });
  return (
    <>
      <PageHeader title="Your account" lead={`${user.name} · ${user.email} · ${ROLE_LABELS[user.role]}`} />
      <Card title="Personal API tokens">
        <p className="mb-4 text-sm text-ink-soft">
          Lab scripts use a token to call the Solvatlas API as you, with your role. Tokens are stored hashed; revoke one the moment a script or machine is retired.
        </p>
        <CreateTokenForm />
        <ul className="mt-5 divide-y divide-line">
          {tokens.map((t) => (
            <li key={t.id} className="flex flex-wrap items-center justify-between gap-3 py-3 text-sm" data-testid="token-row">
              <div>
                <p className="font-medium">
                  {t.name} <span className="font-mono text-xs text-ink-soft">{t.prefix}…</span> {t.revokedAt && <Badge tone="bad">revoked</Badge>}
                </p>
                <p className="text-xs text-ink-soft">
                  created {day(t.createdAt)} · last used {day(t.lastUsedAt)}
                </p>
              </div>
              {!t.revokedAt && <RevokeTokenButton tokenId={t.id} />}
            </li>
          ))}
          {tokens.length === 0 && <li className="py-3 text-sm text-ink-soft">No tokens yet.</li>}
        </ul>
      </Card>
      <Card title="Password" className="mt-4">
        <ChangePasswordForm />
      </Card>
    </>
  );
}
