/**
 * The configured photo store: local disk under DATA_DIR/objects (default, the same folder the demo seed
 * writes to) or an S3-compatible bucket when STORAGE_DRIVER=s3. Created once per process.
 */
import path from "node:path";
import { dataDir, env } from "@/lib/config/env";
import type { ObjectStore } from "./driver";
import { LocalStorage } from "./local";
import { S3Storage } from "./s3";

const globalForStore = globalThis as unknown as { solvatlasStore?: { signature: string; store: ObjectStore } };

export function objectStore(): ObjectStore {
  const e = env();
  const signature = e.STORAGE_DRIVER === "s3" ? `s3|${e.S3_ENDPOINT}|${e.S3_BUCKET}|${e.S3_KEY_PREFIX}` : `local|${dataDir()}`;
  if (globalForStore.solvatlasStore?.signature === signature) return globalForStore.solvatlasStore.store;
  const store: ObjectStore =
    e.STORAGE_DRIVER === "s3"
      ? new S3Storage({
          bucket: e.S3_BUCKET!,
          region: e.S3_REGION,
          endpoint: e.S3_ENDPOINT,
          forcePathStyle: e.S3_FORCE_PATH_STYLE === "true",
          accessKeyId: e.S3_ACCESS_KEY_ID,
          secretAccessKey: e.S3_SECRET_ACCESS_KEY,
          keyPrefix: e.S3_KEY_PREFIX,
        })
      : new LocalStorage(path.join(dataDir(), "objects"));
  globalForStore.solvatlasStore = { signature, store };
  return store;
}

export * from "./driver";
