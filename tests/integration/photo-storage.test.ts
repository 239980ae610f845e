/**
 * The photo store through both drivers: local disk and S3 (the real @aws-sdk/client-s3 talking HTTP to
 * s3rver, a local S3-protocol server). The same storePhoto/sweep code runs on each.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import S3rver from "s3rver";
import { db } from "@/db/client";
import { storePhoto, sweepOrphanFiles } from "@/db/queries/photos";
import { photos } from "@/db/schema";
import { derivedKeyFor, keyFor, sha256OfBytes, type ObjectStore } from "@/lib/storage/driver";
import { LocalStorage } from "@/lib/storage/local";
import { S3Storage } from "@/lib/storage/s3";
import { buildWorld, PEOPLE } from "../support/world";
import { rackPhoto, smallJpeg, SVG } from "../support/photos";

const LIMITS = { maxBytes: 40 * 1048576, maxPixels: 100e6 };

let s3server: S3rver;
let s3: S3Storage;
let local: LocalStorage;

beforeAll(async () => {
  await buildWorld();
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-s3-"));
  s3server = new S3rver({ port: 0, address: "127.0.0.1", silent: true, directory: dir, configureBuckets: [{ name: "lab-photos", configs: [] }] });
  const { port } = await s3server.run();
  s3 = new S3Storage({
    bucket: "lab-photos",
    region: "us-east-1",
    endpoint: `http://127.0.0.1:${port}`,
    forcePathStyle: true,
    accessKeyId: "S3RVER",
    secretAccessKey: "S3RVER",
    keyPrefix: "site-a/",
  });
  local = new LocalStorage(fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-local-")));
});

afterAll(async () => {
  s3?.destroy();
  await s3server?.close();
});

async function keys(store: ObjectStore): Promise<string[]> {
  const out: string[] = [];
  for (const prefix of ["photos/", "thumb/", "display/"]) for await (const o of store.list(prefix)) out.push(o.key);
  return out.sort();
}

describe.each([
  ["local disk", () => local],
  ["S3 (s3rver)", () => s3],
])("photo store on %s", (_name, getStore) => {
  it("writes, reads back byte for byte, lists, and removes objects", async () => {
    const store = getStore();
    const bytes = await smallJpeg(500);
    const key = keyFor(sha256OfBytes(bytes), "jpg");
    expect(await store.has(key)).toBe(false);
    await store.write(key, bytes, "image/jpeg");
    expect(await store.has(key)).toBe(true);
    expect((await store.read(key)).equals(bytes)).toBe(true);
    expect(await keys(store)).toContain(key);
    await store.remove(key);
    expect(await store.has(key)).toBe(false);
  });

  it("refuses keys that would escape the store", async () => {
    const store = getStore();
    await expect(store.write("../outside.jpg", Buffer.from("x"), "image/jpeg")).rejects.toThrow(/Not a valid storage key/);
    await expect(store.read("photos/../../etc/passwd")).rejects.toThrow(/Not a valid storage key/);
  });

  it("stores a photo with its copies, recognises it again, and stores nothing for a refused file", async () => {
    const store = getStore();
    const jpeg = await rackPhoto([[180, 30, 90], [20, 120, 220]], { white: [230, 231, 229] });
    const first = await storePhoto(db(), store, { bytes: jpeg, originalName: "a.jpg", uploaderId: PEOPLE.chemist.id, limits: LIMITS });
    expect(first.duplicate).toBe(false);
    const sha = sha256OfBytes(jpeg);
    expect(first.photo.storageKey).toBe(keyFor(sha, "jpg"));
    expect(first.photo.thumbKey).toBe(derivedKeyFor(sha, "thumb"));
    expect((await store.read(first.photo.storageKey)).equals(jpeg)).toBe(true);
    expect(await store.has(first.photo.displayKey!)).toBe(true);
    const again = await storePhoto(db(), store, { bytes: jpeg, originalName: "b.jpg", uploaderId: PEOPLE.admin.id, limits: LIMITS });
    expect(again).toMatchObject({ duplicate: true, photo: { id: first.photo.id } });
    const before = await keys(store);
    await expect(storePhoto(db(), store, { bytes: SVG, originalName: "x.jpg", uploaderId: PEOPLE.chemist.id, limits: LIMITS })).rejects.toMatchObject({ code: "unsupported_type" });
    expect(await keys(store)).toEqual(before);
    // Clean up the row so the other driver's run stores the same photo afresh.
    db().delete(photos).where(eq(photos.id, first.photo.id)).run();
  });

  it("sweeps files that no record points to (a crash between file and row), after the grace period only", async () => {
    const store = getStore();
    const kept = await storePhoto(db(), store, { bytes: await smallJpeg(601), originalName: "kept.jpg", uploaderId: PEOPLE.chemist.id, limits: LIMITS });
    // What an upload killed after writing its file but before its row leaves behind:
    const orphanBytes = await smallJpeg(602);
    const orphanKey = keyFor(sha256OfBytes(orphanBytes), "jpg");
    await store.write(orphanKey, orphanBytes, "image/jpeg");
    await store.write(derivedKeyFor(sha256OfBytes(orphanBytes), "thumb"), orphanBytes, "image/jpeg");

    const young = await sweepOrphanFiles(db(), store, { graceMs: 60 * 60 * 1000 });
    expect(young.orphans.map((o) => o.key)).not.toContain(orphanKey);
    expect(await store.has(orphanKey)).toBe(true);

    const dry = await sweepOrphanFiles(db(), store, { graceMs: 0, dryRun: true, now: new Date(Date.now() + 1000) });
    expect(dry.orphans.map((o) => o.key)).toEqual(expect.arrayContaining([orphanKey, derivedKeyFor(sha256OfBytes(orphanBytes), "thumb")]));
    expect(dry.removed).toBe(0);
    expect(dry.missing).toEqual([]);

    const swept = await sweepOrphanFiles(db(), store, { graceMs: 0, now: new Date(Date.now() + 1000) });
    expect(swept.removed).toBe(swept.orphans.length);
    expect(await store.has(orphanKey)).toBe(false);
    for (const key of [kept.photo.storageKey, kept.photo.thumbKey!, kept.photo.displayKey!]) expect(await store.has(key), key).toBe(true);
    db().delete(photos).where(eq(photos.id, kept.photo.id)).run();
  });
});

describe("local store", () => {
  it("never exposes a half-written file: a temporary file left by a killed write is not under a real key and the sweep removes it", async () => {
    const bytes = await smallJpeg(700);
    const key = keyFor(sha256OfBytes(bytes), "jpg");
    const temp = `${local.pathOf(key)}.deadbeef0000.tmp`;
    fs.mkdirSync(path.dirname(temp), { recursive: true });
    fs.writeFileSync(temp, bytes.subarray(0, 100));
    expect(await local.has(key)).toBe(false);
    const swept = await sweepOrphanFiles(db(), local, { graceMs: 0, now: new Date(Date.now() + 1000) });
    expect(swept.orphans.map((o) => o.key)).toContain(`${key}.deadbeef0000.tmp`);
    expect(fs.existsSync(temp)).toBe(false);
  });

  it("keeps the demo seed's synchronous put() working on the same layout", () => {
    const bytes = Buffer.from([0xff, 0xd8, 0xff, 0xd9]);
    const stored = local.put(bytes, "jpg");
    expect(stored.key).toBe(keyFor(sha256OfBytes(bytes), "jpg"));
    expect(local.put(bytes, "jpg").existed).toBe(true);
    expect(local.get(stored.key).equals(bytes)).toBe(true);
  });
});
