import type { Metadata } from "next";
import { db } from "@/db/client";
import { NewPasswordForm } from "@/components/auth/auth-forms";
import { Notice } from "@/components/ui/card";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { openInvitation } from "@/lib/auth/service";

export const metadata: Metadata = { title: "Accept invitation" };

export default async function InvitePage({ params }: { params: Promise<{ token: string }> }) {
  const { token } = await params;
  const invitation = openInvitation(db(), token);
  if (!invitation) {
    return (
      <Notice tone="error" title="This invitation no longer works">
        Invitations work once and expire after seven days. Ask the admin who invited you to send a new one.
      </Notice>
    );
  }
  return (
    <div className="space-y-5">
      <h1 className="text-xl font-semibold">Welcome, {invitation.name}</h1>
      <p className="text-sm text-ink-soft">
        You are joining as a <strong>{ROLE_LABELS[invitation.role].toLowerCase()}</strong> with the address <strong>{invitation.email}</strong>. Choose a password to finish.
      </p>
      <NewPasswordForm token={token} mode="invite" />
    </div>
  );
}
