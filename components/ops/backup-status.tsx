import type { BackupRecord } from "@/lib/ops/backup-record";
import { Card, Notice } from "@/components/ui/card";

function megabytes(bytes: number): string {
  return `${(bytes / 1048576).toFixed(1)} MB`;
}

function ageOf(iso: string, now: Date): string {
  const hours = (now.getTime() - new Date(iso).getTime()) / 3_600_000;
  if (hours < 1) return "less than an hour ago";
  if (hours < 48) return `${Math.floor(hours)} ${Math.floor(hours) === 1 ? "hour" : "hours"} ago`;
  return `${Math.floor(hours / 24)} days ago`;
}

/** The last backup of this data folder (DATA_DIR/last-backup.json), or a notice that none was taken. */
export function BackupStatus({ record, now, storageDriver }: { record: BackupRecord | null; now: Date; storageDriver: "local" | "s3" }) {
  const stale = !record || now.getTime() - new Date(record.createdAt).getTime() > 2 * 86_400_000;
  return (
    <Card title="Last backup">
      {record ? (
        <dl data-testid="last-backup" className="grid grid-cols-1 gap-x-6 gap-y-2 text-sm sm:grid-cols-[max-content_1fr]">
          <dt className="text-ink-soft">Taken</dt>
          <dd>
            {record.createdAt.replace("T", " ").slice(0, 19)} UTC ({ageOf(record.createdAt, now)})
          </dd>
          <dt className="text-ink-soft">Folder</dt>
          <dd className="break-all font-mono text-xs">{record.folder}</dd>
          <dt className="text-ink-soft">Contents</dt>
          <dd>
            {record.photos} {record.photos === 1 ? "photo" : "photos"} ({record.objects} files), {record.measurements} measurements ({record.acceptedMeasurements} accepted),{" "}
            {megabytes(record.bytes)} in all; {record.copiedObjects} files were new since the backup before
          </dd>
          <dt className="text-ink-soft">Schema</dt>
          <dd>
            {record.schema.last} ({record.schema.migrations} migrations)
          </dd>
        </dl>
      ) : (
        <p className="text-sm">No backup has been taken of this data folder yet.</p>
      )}
      {stale && (
        <div className="mt-3">
          <Notice tone="caution">{record ? "The last backup is more than two days old." : "Take one now, then schedule it."} Losing the server&apos;s disk would lose every photo and measurement since.</Notice>
        </div>
      )}
      {storageDriver === "s3" && (
        <p className="mt-3 text-sm text-ink-soft">Photos are in an S3 bucket: a backup downloads the files the database points to; the bucket&apos;s own settings, versions and unreferenced files are not in it.</p>
      )}
    </Card>
  );
}
