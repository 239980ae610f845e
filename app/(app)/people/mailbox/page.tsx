import type { Metadata } from "next";
import { AdminTabs } from "@/components/people/admin-tabs";
import { LinkedText } from "@/components/people/linked-text";
import { Card, Notice, PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { ADMIN_ONLY } from "@/lib/auth/roles";
import { localMailbox, usingLocalMailbox } from "@/lib/mail";

export const metadata: Metadata = { title: "Local mailbox" };

/** Links in messages are shown so an admin can pass them on when no mail server is configured. */
export default async function MailboxPage() {
  const { user, allowed } = await pageAccess(ADMIN_ONLY);
  if (!allowed) return <Refused user={user} allowed={ADMIN_ONLY} area="The local mailbox" />;
  const messages = localMailbox(100);
  return (
    <>
      <PageHeader title="Local mailbox" lead="Messages Solvatlas would have e-mailed. With no SMTP_URL configured they are kept here; pass invitation links on to the people they are for." />
      <AdminTabs current="/people/mailbox" />
      {!usingLocalMailbox() && <Notice>SMTP is configured: new messages go to the mail server and no longer appear here.</Notice>}
      {messages.length === 0 ? (
        <p className="border border-line bg-white p-6 text-sm">No messages yet.</p>
      ) : (
        <div className="space-y-3">
          {messages.map((m) => (
            <Card key={m.id} title={m.subject}>
              <article data-testid="mail-message">
                <p className="mb-2 text-xs text-ink-soft">
                  To {m.to} · {m.at.replace("T", " ").slice(0, 19)} UTC
                </p>
                <pre className="whitespace-pre-wrap break-words font-sans text-sm">
                  <LinkedText text={m.text} />
                </pre>
              </article>
            </Card>
          ))}
        </div>
      )}
    </>
  );
}
