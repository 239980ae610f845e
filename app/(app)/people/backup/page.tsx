import type { Metadata } from "next";
import { AdminTabs } from "@/components/people/admin-tabs";
import { BackupStatus } from "@/components/ops/backup-status";
import { Card, PageHeader } from "@/components/ui/card";
import { Refused } from "@/components/shell/refused";
import { pageAccess } from "@/lib/auth/page";
import { ADMIN_ONLY } from "@/lib/auth/roles";
import { dataDir, env } from "@/lib/config/env";
import { readBackupRecord } from "@/lib/ops/backup-record";

export const metadata: Metadata = { title: "Backups" };
export const dynamic = "force-dynamic";

/** The last backup and how to take, schedule and restore one. Backups run on the server machine, not from the browser. */
export default async function BackupPage() {
  const { user, allowed } = await pageAccess(ADMIN_ONLY);
  if (!allowed) return <Refused user={user} allowed={ADMIN_ONLY} area="Backups" />;
  const record = readBackupRecord(dataDir());
  const command = "npm run --silent cli -- backup /srv/backups/solvatlas";
  return (
    <>
      <PageHeader title="Backups" lead="A backup is a consistent copy of the database and every photo file, taken while Solvatlas keeps running." />
      <AdminTabs current="/people/backup" />
      <div className="space-y-4">
        <BackupStatus record={record} now={new Date()} storageDriver={env().STORAGE_DRIVER} />
        <Card title="Take a backup">
          <p className="mb-2 text-sm">On the server machine, in the Solvatlas folder, with the same DATA_DIR as the server:</p>
          <pre className="overflow-x-auto rounded-lg bg-paper-deep p-3 font-mono text-xs">{command}</pre>
          <p className="mt-2 text-sm">
            Backing up into the same folder again copies only the photos that are new; the folder then holds the latest backup. Use a
            folder on another disk or machine. The README shows a nightly schedule (cron).
          </p>
        </Card>
        <Card title="Restore">
          <p className="text-sm">
            Stop the server, then run <code className="font-mono text-xs">npm run --silent cli -- restore /srv/backups/solvatlas</code> into an empty
            DATA_DIR, or add <code className="font-mono text-xs">--replace</code> to replace the current data (it is kept aside in a folder named
            …before-restore-…). A damaged backup, or one from a newer Solvatlas, is refused and nothing changes.
          </p>
        </Card>
      </div>
    </>
  );
}
