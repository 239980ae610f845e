/**
 * The one interface photo bytes go through. Two drivers implement it: local disk under DATA_DIR
 * (local.ts) and S3-compatible object storage (s3.ts); which one is chosen by configuration
 * (index.ts). Keys are content-addressed (see keyFor), so writing the same key twice writes the same
 * bytes and a write is never a partial overwrite of something else.
 */
import { createHash } from "node:crypto";

export type StoredObject = { key: string; sha256: string; byteSize: number; existed: boolean };
export type ListedObject = { key: string; byteSize: number; modifiedAt: Date };

export interface ObjectStore {
  /** A short name for messages and logs ("local disk", "S3 bucket photos"). */
  readonly description: string;
  /** Writes the bytes under the key atomically (readers never see a partial object). */
  write(key: string, bytes: Uint8Array, contentType: string): Promise<{ existed: boolean }>;
  read(key: string): Promise<Buffer>;
  has(key: string): Promise<boolean>;
  remove(key: string): Promise<void>;
  /** Every object whose key starts with the prefix. */
  list(prefix: string): AsyncIterable<ListedObject>;
}

export function sha256OfBytes(bytes: Uint8Array): string {
  return createHash("sha256").update(bytes).digest("hex");
}

export function keyFor(sha256: string, extension: string, prefix = "photos"): string {
  return `${prefix}/${sha256.slice(0, 2)}/${sha256}.${extension}`;
}

/** Key of a derived copy (thumbnail, display size) of an original, named after the original's hash. */
export function derivedKeyFor(originalSha256: string, variant: "thumb" | "display"): string {
  return `${variant}/${originalSha256.slice(0, 2)}/${originalSha256}.jpg`;
}

/** Prefixes under which the photo store writes; the orphan sweep walks exactly these. */
export const STORE_PREFIXES = ["photos/", "thumb/", "display/"] as const;

/** Stores bytes under their content address; an object already there is left as it is. */
export async function putContent(store: ObjectStore, bytes: Uint8Array, extension: string, contentType: string, prefix = "photos"): Promise<StoredObject> {
  const sha256 = sha256OfBytes(bytes);
  const key = keyFor(sha256, extension, prefix);
  if (await store.has(key)) return { key, sha256, byteSize: bytes.byteLength, existed: true };
  const { existed } = await store.write(key, bytes, contentType);
  return { key, sha256, byteSize: bytes.byteLength, existed };
}

/** Keys must be plain relative paths of safe characters: no "..", no absolute paths, no control bytes. */
export function assertSafeKey(key: string): void {
  if (!/^[A-Za-z0-9][A-Za-z0-9._/-]*$/.test(key) || key.split("/").some((part) => part === ".." || part === "." || part === "")) {
    throw new Error(`Not a valid storage key: ${JSON.stringify(key)}`);
  }
}
