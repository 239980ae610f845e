/**
 * Backup and restore of a Solvatlas data folder.
 *
 * A backup folder holds:
 *   solvatlas-backup.json        the manifest: format, schema level, sha256 and size of every file
 *   solvatlas-<time>.db          a snapshot of the database taken with SQLite's online backup API
 *   objects/<key>                every photo file a photo row of the snapshot points to, under the
 *                                same content-addressed key as in the photo store
 *
 * Consistency while the server runs: the database is copied first, in one backup step (one read
 * transaction, so one WAL snapshot: never a file copy of a WAL database), and only then are the files
 * its photo rows point to copied. Uploads write their files before their row (db/queries/photos.ts),
 * so every row in the snapshot has a complete file to copy.
 *
 * A second backup into a folder that already holds one copies only the files the earlier manifest
 * does not list (keys are content-addressed, so a listed key has the same bytes); the new manifest
 * is renamed into place last, which is the moment the new backup counts, and files only the old
 * backup used are removed after that.
 *
 * Restore checks everything before touching DATA_DIR (manifest present, every file's sha256, schema
 * not newer than this code's migrations, the database's integrity), builds the new data folder next
 * to DATA_DIR, migrates it to the current schema, then swaps it in with renames.
 */
import { createHash, randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import Database from "better-sqlite3";
import { type BackupRecord } from "../lib/ops/backup-record";
import { runningServer, SERVER_PID_FILE } from "../lib/ops/server-lock";
import { STORE_PREFIXES, type ObjectStore } from "../lib/storage/driver";
import { databaseFile, migrateDatabase, openDatabase } from "./connection";
import { appliedMigrations, migrationJournal } from "./schema-level";

export const MANIFEST_FILE = "solvatlas-backup.json";
const FORMAT = "solvatlas-backup";
const FORMAT_VERSION = 1;

/** A refusal with one sentence that says what to do; nothing was changed. */
export class BackupRefusal extends Error {}

export type ManifestFile = { path: string; sha256: string; bytes: number };
export type Manifest = {
  format: typeof FORMAT;
  formatVersion: number;
  createdAt: string;
  schema: { migrations: number; last: string; lastWhen: number };
  storageDriver: "local" | "s3";
  database: ManifestFile;
  objects: ManifestFile[];
  counts: { photos: number; measurements: number; acceptedMeasurements: number; dyes: number; users: number };
  /** Photo files a row pointed to that the store did not have when the backup was taken. */
  missingFromStore: string[];
};

function schemaLevel(sqlite: Database.Database): Manifest["schema"] {
  const applied = appliedMigrations(sqlite);
  const journal = migrationJournal();
  const lastWhen = applied.length ? applied[applied.length - 1] : 0;
  const last = journal.find((e) => e.when === lastWhen)?.tag ?? `unknown migration of ${new Date(lastWhen).toISOString()}`;
  return { migrations: applied.length, last, lastWhen };
}

/** Migrations the database has that this code does not know: a newer (or foreign) schema. */
function unknownMigrations(applied: number[]): number[] {
  const known = new Set(migrationJournal().map((e) => e.when));
  return applied.filter((when) => !known.has(when));
}

function sha256File(file: string): string {
  const hash = createHash("sha256");
  const fd = fs.openSync(file, "r");
  try {
    const chunk = Buffer.allocUnsafe(1 << 20);
    let n: number;
    while ((n = fs.readSync(fd, chunk, 0, chunk.length, null)) > 0) hash.update(chunk.subarray(0, n));
  } finally {
    fs.closeSync(fd);
  }
  return hash.digest("hex");
}

/** Writes via a temporary file and a rename, so a reader never sees a partial file under the real name. */
function writeAtomic(file: string, bytes: Uint8Array | string): void {
  fs.mkdirSync(path.dirname(file), { recursive: true });
  const temp = `${file}.${randomBytes(4).toString("hex")}.partial`;
  const fd = fs.openSync(temp, "wx");
  try {
    fs.writeSync(fd, typeof bytes === "string" ? Buffer.from(bytes) : bytes);
    fs.fsyncSync(fd);
  } finally {
    fs.closeSync(fd);
  }
  fs.renameSync(temp, file);
}

/** A path inside the backup folder for a manifest entry; refuses entries that would escape it. */
function insideFolder(folder: string, relative: string): string {
  const full = path.resolve(folder, relative);
  if (!full.startsWith(path.resolve(folder) + path.sep) || !/^[A-Za-z0-9][A-Za-z0-9._/-]*$/.test(relative)) {
    throw new BackupRefusal(`The backup in ${folder} lists a file outside its folder (${JSON.stringify(relative)}); it is damaged or not a Solvatlas backup.`);
  }
  return full;
}

function readManifest(folder: string): Manifest | null {
  const file = path.join(folder, MANIFEST_FILE);
  if (!fs.existsSync(file)) return null;
  let manifest: Manifest;
  try {
    manifest = JSON.parse(fs.readFileSync(file, "utf8")) as Manifest;
  } catch {
    throw new BackupRefusal(`The manifest ${file} cannot be read as JSON; the backup is damaged. Use another backup.`);
  }
  if (manifest?.format !== FORMAT || !manifest.database || !Array.isArray(manifest.objects) || !manifest.schema) {
    throw new BackupRefusal(`${file} is not a Solvatlas backup manifest; restore only folders written by the 'backup' command.`);
  }
  return manifest;
}

function isEmptyFolder(folder: string): boolean {
  return !fs.existsSync(folder) || fs.readdirSync(folder).length === 0;
}

// ---------------------------------------------------------------- backup

export type BackupResult = {
  folder: string;
  createdAt: string;
  database: ManifestFile;
  schema: Manifest["schema"];
  counts: Manifest["counts"];
  objects: { total: number; copied: number; reused: number; bytes: number };
  missingFromStore: string[];
  storageDriver: "local" | "s3";
};

export async function takeBackup({
  dataDirectory,
  folder,
  store,
  storageDriver,
}: {
  dataDirectory: string;
  folder: string;
  store: ObjectStore;
  storageDriver: "local" | "s3";
}): Promise<BackupResult> {
  const source = databaseFile(dataDirectory);
  if (!fs.existsSync(source)) throw new BackupRefusal(`There is no Solvatlas database in ${dataDirectory}; set DATA_DIR to the data folder the server uses.`);
  const target = path.resolve(folder);
  if (target === path.resolve(dataDirectory) || target.startsWith(path.resolve(dataDirectory) + path.sep)) {
    throw new BackupRefusal(`Put the backup outside the data folder ${dataDirectory}, ideally on another disk.`);
  }
  if (fs.existsSync(target) && !fs.statSync(target).isDirectory()) throw new BackupRefusal(`${folder} is a file; give a new or empty folder for the backup.`);
  const previous = fs.existsSync(target) ? readManifest(target) : null;
  if (!previous && !isEmptyFolder(target)) {
    throw new BackupRefusal(`${folder} is not empty and holds no Solvatlas backup; give a new or empty folder (or one an earlier backup wrote).`);
  }
  fs.mkdirSync(target, { recursive: true });

  const createdAt = new Date();
  const stamp = createdAt.toISOString().replace(/[-:]/g, "").replace(/\.\d+Z$/, "Z");
  let dbName = `solvatlas-${stamp}.db`;
  if (previous?.database.path === dbName) dbName = `solvatlas-${stamp}-${randomBytes(2).toString("hex")}.db`;
  const snapshotPartial = path.join(target, `${dbName}.partial`);

  // 1. The database, in one backup step: the whole file is copied inside one read transaction, so the
  //    snapshot is a single committed state even while the server writes (writers are not blocked in WAL mode).
  const live = new Database(source, { fileMustExist: true });
  try {
    live.pragma("busy_timeout = 5000");
    await live.backup(snapshotPartial, { progress: () => 0x7fffffff });
  } finally {
    live.close();
  }

  // 2. Read what the snapshot references; leave it as a single self-contained file (rollback journal).
  const snapshot = new Database(snapshotPartial);
  let keys: string[];
  let counts: Manifest["counts"];
  let schema: Manifest["schema"];
  try {
    snapshot.pragma("journal_mode = DELETE");
    schema = schemaLevel(snapshot);
    const rows = snapshot.prepare("SELECT storage_key, thumb_key, display_key FROM photos").raw(true).all() as (string | null)[][];
    keys = [...new Set(rows.flat().filter((k): k is string => !!k))].sort();
    const one = (q: string) => Number(snapshot.prepare(q).pluck().get());
    counts = {
      photos: rows.length,
      measurements: one("SELECT count(*) FROM measurements"),
      acceptedMeasurements: one("SELECT count(*) FROM measurements WHERE review_state = 'accepted'"),
      dyes: one("SELECT count(*) FROM dyes"),
      users: one("SELECT count(*) FROM users"),
    };
  } finally {
    snapshot.close();
  }
  const dbFinal = path.join(target, dbName);
  fs.renameSync(snapshotPartial, dbFinal);
  const database: ManifestFile = { path: dbName, sha256: sha256File(dbFinal), bytes: fs.statSync(dbFinal).size };

  // 3. The photo files, after the snapshot: every row in it was committed after its files were written.
  const known = new Map((previous?.objects ?? []).map((o) => [o.path, o]));
  const objects: ManifestFile[] = [];
  const missingFromStore: string[] = [];
  let copied = 0;
  let reused = 0;
  let bytes = database.bytes;
  for (const key of keys) {
    const relative = `objects/${key}`;
    const file = insideFolder(target, relative);
    const earlier = known.get(relative);
    if (earlier && fs.existsSync(file) && fs.statSync(file).size === earlier.bytes) {
      objects.push(earlier);
      reused++;
      bytes += earlier.bytes;
      continue;
    }
    let content: Buffer;
    try {
      content = await store.read(key);
    } catch {
      missingFromStore.push(key);
      continue;
    }
    writeAtomic(file, content);
    objects.push({ path: relative, sha256: createHash("sha256").update(content).digest("hex"), bytes: content.byteLength });
    copied++;
    bytes += content.byteLength;
  }

  // 4. The manifest last: renaming it into place is what makes this backup the folder's backup.
  const manifest: Manifest = { format: FORMAT, formatVersion: FORMAT_VERSION, createdAt: createdAt.toISOString(), schema, storageDriver, database, objects, counts, missingFromStore };
  writeAtomic(path.join(target, MANIFEST_FILE), JSON.stringify(manifest, null, 1) + "\n");

  // 5. Files only the earlier backup used.
  if (previous) {
    const kept = new Set([database.path, ...objects.map((o) => o.path)]);
    for (const old of [previous.database, ...previous.objects]) {
      if (kept.has(old.path)) continue;
      try {
        fs.rmSync(insideFolder(target, old.path), { force: true });
      } catch {
        /* an entry we would not have written; leave it */
      }
    }
  }

  return { folder: target, createdAt: manifest.createdAt, database, schema, counts, objects: { total: objects.length, copied, reused, bytes }, missingFromStore, storageDriver };
}

export function backupRecordOf(result: BackupResult): BackupRecord {
  return {
    folder: result.folder,
    createdAt: result.createdAt,
    photos: result.counts.photos,
    measurements: result.counts.measurements,
    acceptedMeasurements: result.counts.acceptedMeasurements,
    objects: result.objects.total,
    copiedObjects: result.objects.copied,
    bytes: result.objects.bytes,
    schema: { migrations: result.schema.migrations, last: result.schema.last },
    storageDriver: result.storageDriver,
  };
}

// ---------------------------------------------------------------- restore

export type RestoreResult = {
  dataDir: string;
  from: string;
  backupCreatedAt: string;
  schema: { backup: string; now: string; migrationsApplied: number };
  counts: Manifest["counts"];
  objects: number;
  /** Where the data folder that was replaced now is (only with --replace over existing data). */
  previousDataMovedTo: string | null;
};

/** Checks a backup completely without changing anything; returns its manifest. */
export function verifyBackup(folder: string): Manifest {
  if (!fs.existsSync(folder) || !fs.statSync(folder).isDirectory()) throw new BackupRefusal(`There is no folder ${folder}; give the folder the 'backup' command wrote.`);
  const manifest = readManifest(folder);
  if (!manifest) throw new BackupRefusal(`${folder} holds no ${MANIFEST_FILE}, so it is not a Solvatlas backup; give the folder the 'backup' command wrote.`);
  if (manifest.formatVersion > FORMAT_VERSION) {
    throw new BackupRefusal(`This backup was written by a newer Solvatlas (backup format ${manifest.formatVersion}); update Solvatlas before restoring it.`);
  }
  const journal = migrationJournal();
  if (manifest.schema.migrations > journal.length || (manifest.schema.lastWhen && !journal.some((e) => e.when === manifest.schema.lastWhen))) {
    throw new BackupRefusal(
      `This backup comes from a newer database schema (${manifest.schema.last}, ${manifest.schema.migrations} migrations; this Solvatlas knows ${journal.length}); update Solvatlas before restoring it.`,
    );
  }
  for (const entry of [manifest.database, ...manifest.objects]) {
    const file = insideFolder(folder, entry.path);
    if (!fs.existsSync(file)) throw new BackupRefusal(`The backup is damaged: ${entry.path} is missing. Nothing was restored; use another backup.`);
    if (fs.statSync(file).size !== entry.bytes || sha256File(file) !== entry.sha256) {
      throw new BackupRefusal(`The backup is damaged: ${entry.path} does not match its checksum. Nothing was restored; use another backup.`);
    }
  }
  return manifest;
}

/** DATA_DIR holds data a restore would overwrite: a database, or photo files. */
function holdsData(dataDirectory: string): boolean {
  if (fs.existsSync(databaseFile(dataDirectory))) return true;
  return STORE_PREFIXES.some((prefix) => {
    const folder = path.join(dataDirectory, "objects", prefix);
    return fs.existsSync(folder) && fs.readdirSync(folder).length > 0;
  });
}

export async function restoreBackup({
  folder,
  dataDirectory,
  replace,
  store,
}: {
  folder: string;
  dataDirectory: string;
  replace: boolean;
  /** The configured photo store when it is not DATA_DIR/objects (S3): files are written there instead. */
  store: ObjectStore | null;
}): Promise<RestoreResult> {
  const source = path.resolve(folder);
  const target = path.resolve(dataDirectory);
  const manifest = verifyBackup(source);

  const server = runningServer(target);
  if (server) {
    throw new BackupRefusal(
      `A Solvatlas server (process ${server.pid}) is serving ${target}; stop it before restoring (if it is not running, delete ${path.join(target, SERVER_PID_FILE)}).`,
    );
  }
  const existing = fs.existsSync(target) && holdsData(target);
  if (existing && !replace) {
    throw new BackupRefusal(`${target} already holds a Solvatlas database or photos; restore into an empty DATA_DIR, or add --replace to replace them (the current data is kept aside).`);
  }

  // Build the new data folder beside the target (same file system, so the final swap is a rename).
  fs.mkdirSync(path.dirname(target), { recursive: true });
  const staging = fs.mkdtempSync(path.join(path.dirname(target), `.${path.basename(target)}.restoring-`));
  try {
    const dbFile = databaseFile(staging);
    fs.copyFileSync(insideFolder(source, manifest.database.path), dbFile);
    const db = openDatabase(dbFile);
    let migrationsApplied: number;
    let now: string;
    try {
      const unknown = unknownMigrations(appliedMigrations(db.$client));
      if (unknown.length) throw new BackupRefusal("This backup's database has migrations this Solvatlas does not know (a newer schema); update Solvatlas before restoring it.");
      const check = db.$client.pragma("quick_check", { simple: true });
      if (check !== "ok") throw new BackupRefusal(`The backup's database fails SQLite's integrity check (${String(check)}); use another backup.`);
      const before = appliedMigrations(db.$client).length;
      migrateDatabase(db);
      migrationsApplied = appliedMigrations(db.$client).length - before;
      now = schemaLevel(db.$client).last;
    } finally {
      db.$client.close();
    }
    for (const entry of manifest.objects) {
      const from = insideFolder(source, entry.path);
      const key = entry.path.slice("objects/".length);
      if (store) {
        // Content-addressed: a key the bucket already has holds the same bytes.
        if (!(await store.has(key))) await store.write(key, fs.readFileSync(from), "application/octet-stream");
      } else {
        const to = insideFolder(staging, entry.path);
        fs.mkdirSync(path.dirname(to), { recursive: true });
        fs.copyFileSync(from, to);
      }
    }

    // The swap: the old folder moves aside whole (with --replace), or its other contents (mailbox, the
    // last-backup note) move into the new one.
    let previousDataMovedTo: string | null = null;
    if (fs.existsSync(target)) {
      if (existing) {
        previousDataMovedTo = `${target}.before-restore-${new Date().toISOString().replace(/[-:]/g, "").replace(/\.\d+Z$/, "Z")}`;
        fs.renameSync(target, previousDataMovedTo);
      } else {
        for (const entry of fs.readdirSync(target)) {
          if (entry === "objects") continue;
          fs.renameSync(path.join(target, entry), path.join(staging, entry));
        }
        fs.rmSync(target, { recursive: true, force: true });
      }
    }
    fs.renameSync(staging, target);
    return {
      dataDir: target,
      from: source,
      backupCreatedAt: manifest.createdAt,
      schema: { backup: manifest.schema.last, now, migrationsApplied },
      counts: manifest.counts,
      objects: manifest.objects.length,
      previousDataMovedTo,
    };
  } catch (error) {
    fs.rmSync(staging, { recursive: true, force: true });
    throw error;
  }
}
