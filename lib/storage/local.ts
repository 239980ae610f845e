/**
 * Content-addressed local file storage: an object's key is derived from the sha256 of its bytes,
 * writes go to a temporary file first and are renamed into place, so a crash never leaves a
 * half-written object under a real key.
 */
import { createHash, randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";

export type StoredObject = { key: string; sha256: string; byteSize: number; existed: boolean };

export function sha256OfBytes(bytes: Uint8Array): string {
  return createHash("sha256").update(bytes).digest("hex");
}

export function keyFor(sha256: string, extension: string, prefix = "photos"): string {
  return `${prefix}/${sha256.slice(0, 2)}/${sha256}.${extension}`;
}

export class LocalStorage {
  constructor(readonly root: string) {}

  pathOf(key: string): string {
    const full = path.resolve(this.root, key);
    if (!full.startsWith(path.resolve(this.root) + path.sep)) throw new Error(`Storage key escapes the store: ${key}`);
    return full;
  }

  put(bytes: Uint8Array, extension: string, prefix = "photos"): StoredObject {
    const sha256 = sha256OfBytes(bytes);
    const key = keyFor(sha256, extension, prefix);
    const target = this.pathOf(key);
    if (fs.existsSync(target)) return { key, sha256, byteSize: bytes.byteLength, existed: true };
    fs.mkdirSync(path.dirname(target), { recursive: true });
    const temp = `${target}.${randomBytes(6).toString("hex")}.tmp`;
    const fd = fs.openSync(temp, "wx");
    try {
      fs.writeSync(fd, bytes);
      fs.fsyncSync(fd);
    } finally {
      fs.closeSync(fd);
    }
    fs.renameSync(temp, target);
    return { key, sha256, byteSize: bytes.byteLength, existed: false };
  }

  get(key: string): Buffer {
    return fs.readFileSync(this.pathOf(key));
  }

  exists(key: string): boolean {
    return fs.existsSync(this.pathOf(key));
  }
}
