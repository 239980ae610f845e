/**
 * The last backup taken of a data folder, kept as DATA_DIR/last-backup.json by `backup` so the admin
 * page can show it. A file rather than a row: a backup must not write into the database it copies, and
 * the record describes this folder, not the data a restore brings back.
 */
import fs from "node:fs";
import path from "node:path";

export const LAST_BACKUP_FILE = "last-backup.json";

export type BackupRecord = {
  folder: string;
  createdAt: string;
  photos: number;
  measurements: number;
  acceptedMeasurements: number;
  objects: number;
  copiedObjects: number;
  bytes: number;
  schema: { migrations: number; last: string };
  storageDriver: "local" | "s3";
};

export function writeBackupRecord(dataDirectory: string, record: BackupRecord): void {
  const file = path.join(dataDirectory, LAST_BACKUP_FILE);
  const temp = `${file}.${process.pid}.tmp`;
  fs.writeFileSync(temp, JSON.stringify(record, null, 2) + "\n");
  fs.renameSync(temp, file);
}

export function readBackupRecord(dataDirectory: string): BackupRecord | null {
  try {
    return JSON.parse(fs.readFileSync(path.join(dataDirectory, LAST_BACKUP_FILE), "utf8")) as BackupRecord;
  } catch {
    return null;
  }
}
