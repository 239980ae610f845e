/**
 * `backup <folder>` and `restore <folder> [--replace]` (see db/backup.ts for the layout and the order
 * of copying). Both use DATA_DIR and the configured photo store, like the server.
 */
import { parseArgs } from "node:util";
import { CliError } from "./errors";

function parse(args: string[], usage: string, options: Record<string, { type: "boolean" }> = {}) {
  let parsed: { values: Record<string, unknown>; positionals: string[] };
  try {
    parsed = parseArgs({ args, options, allowPositionals: true, strict: true });
  } catch (error) {
    throw new CliError(`${(error as Error).message.replace(/\.$/, "")}. Use '${usage}'.`);
  }
  if (parsed.positionals.length !== 1) throw new CliError(`Give exactly one folder: '${usage}'.`);
  return parsed;
}

async function modules() {
  // Loaded here so the colour commands start without the database and storage modules.
  const [backup, config, storage, record] = await Promise.all([
    import("../../db/backup"),
    import("../config/env"),
    import("../storage"),
    import("../ops/backup-record"),
  ]);
  return { ...backup, ...config, ...storage, ...record };
}

export async function backupCommand(args: string[]): Promise<unknown> {
  const { positionals } = parse(args, "backup <folder>");
  const m = await modules();
  const settings = m.env();
  try {
    const result = await m.takeBackup({ dataDirectory: m.dataDir(), folder: positionals[0], store: m.objectStore(), storageDriver: settings.STORAGE_DRIVER });
    m.writeBackupRecord(m.dataDir(), m.backupRecordOf(result));
    return { backup: result };
  } catch (error) {
    if (error instanceof m.BackupRefusal) throw new CliError(error.message);
    throw error;
  }
}

export async function restoreCommand(args: string[]): Promise<unknown> {
  const { positionals, values } = parse(args, "restore <folder> [--replace]", { replace: { type: "boolean" } });
  const m = await modules();
  const settings = m.env();
  try {
    const restored = await m.restoreBackup({
      folder: positionals[0],
      dataDirectory: m.dataDir(),
      replace: values.replace === true,
      store: settings.STORAGE_DRIVER === "s3" ? m.objectStore() : null,
    });
    return { restored };
  } catch (error) {
    if (error instanceof m.BackupRefusal) throw new CliError(error.message);
    throw error;
  }
}
