/**
 * Content-addressed local file storage under one root folder (DATA_DIR/objects by default). Writes go
 * to a temporary file in the target folder first, are flushed and then renamed into place, so a crash
 * never leaves a half-written object under a real key; a leftover `*.tmp` is found by the sweep.
 *
 * The synchronous `put/get/exists` are kept for the demo seed and scripts; the app uses the async
 * ObjectStore methods.
 */
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { assertSafeKey, keyFor, sha256OfBytes, type ListedObject, type ObjectStore, type StoredObject } from "./driver";

export { keyFor, sha256OfBytes, type StoredObject } from "./driver";

export class LocalStorage implements ObjectStore {
  readonly description: string;

  constructor(readonly root: string) {
    this.description = `local disk (${root})`;
  }

  pathOf(key: string): string {
    assertSafeKey(key);
    const full = path.resolve(this.root, key);
    if (!full.startsWith(path.resolve(this.root) + path.sep)) throw new Error(`Storage key escapes the store: ${key}`);
    return full;
  }

  private writeSync(key: string, bytes: Uint8Array): boolean {
    const target = this.pathOf(key);
    if (fs.existsSync(target)) return true;
    fs.mkdirSync(path.dirname(target), { recursive: true });
    const temp = `${target}.${randomBytes(6).toString("hex")}.tmp`;
    const fd = fs.openSync(temp, "wx");
    try {
      fs.writeSync(fd, bytes);
      fs.fsyncSync(fd);
    } catch (error) {
      fs.closeSync(fd);
      fs.rmSync(temp, { force: true });
      throw error;
    }
    fs.closeSync(fd);
    // rename() replaces atomically; two writers of one content address write identical bytes.
    fs.renameSync(temp, target);
    return false;
  }

  put(bytes: Uint8Array, extension: string, prefix = "photos"): StoredObject {
    const sha256 = sha256OfBytes(bytes);
    const key = keyFor(sha256, extension, prefix);
    const existed = this.writeSync(key, bytes);
    return { key, sha256, byteSize: bytes.byteLength, existed };
  }

  get(key: string): Buffer {
    return fs.readFileSync(this.pathOf(key));
  }

  exists(key: string): boolean {
    return fs.existsSync(this.pathOf(key));
  }

  // ---------------------------------------------------------------- ObjectStore

  async write(key: string, bytes: Uint8Array): Promise<{ existed: boolean }> {
    const existed = this.writeSync(key, bytes);
    // Refresh the time of an object written again, so the orphan sweep's grace period covers an
    // upload that reuses a file the sweep is about to judge.
    if (existed) {
      const now = new Date();
      fs.utimesSync(this.pathOf(key), now, now);
    }
    return { existed };
  }

  async read(key: string): Promise<Buffer> {
    return fs.promises.readFile(this.pathOf(key));
  }

  async has(key: string): Promise<boolean> {
    return this.exists(key);
  }

  async remove(key: string): Promise<void> {
    await fs.promises.rm(this.pathOf(key), { force: true });
  }

  /** Lists objects under the prefix, including leftover temporary files (keys ending in `.tmp`). */
  async *list(prefix: string): AsyncIterable<ListedObject> {
    const base = path.resolve(this.root);
    const start = path.join(base, prefix.split("/").slice(0, -1).join("/"));
    if (!fs.existsSync(start)) return;
    const stack = [start];
    while (stack.length) {
      const dir = stack.pop()!;
      for (const entry of await fs.promises.readdir(dir, { withFileTypes: true })) {
        const full = path.join(dir, entry.name);
        if (entry.isDirectory()) stack.push(full);
        else if (entry.isFile()) {
          const key = path.relative(base, full).split(path.sep).join("/");
          if (!key.startsWith(prefix)) continue;
          const stat = await fs.promises.stat(full);
          yield { key, byteSize: stat.size, modifiedAt: stat.mtime };
        }
      }
    }
  }
}
