/**
 * STORAGE_DRIVER=s3 selects the S3 driver: the same POST /api/photos stores into the bucket (s3rver,
 * a local S3-protocol server) and nothing goes to DATA_DIR/objects. Runs in its own process, so the
 * configuration read here is this file's alone.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, expect, it } from "vitest";
import S3rver from "s3rver";
import { POST as uploadPhoto } from "@/app/api/photos/route";
import { GET as photoImage } from "@/app/api/photos/[id]/image/route";
import { dataDir } from "@/lib/config/env";
import { objectStore } from "@/lib/storage";
import { S3Storage } from "@/lib/storage/s3";
import { buildWorld, tokenFor } from "../support/world";
import { rackPhoto } from "../support/photos";

let server: S3rver;
let bucketDir: string;

beforeAll(async () => {
  bucketDir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-s3cfg-"));
  server = new S3rver({ port: 0, address: "127.0.0.1", silent: true, directory: bucketDir, configureBuckets: [{ name: "solvatlas-photos", configs: [] }] });
  const { port } = await server.run();
  Object.assign(process.env, {
    STORAGE_DRIVER: "s3",
    S3_BUCKET: "solvatlas-photos",
    S3_ENDPOINT: `http://127.0.0.1:${port}`,
    S3_FORCE_PATH_STYLE: "true",
    S3_ACCESS_KEY_ID: "S3RVER",
    S3_SECRET_ACCESS_KEY: "S3RVER",
    S3_KEY_PREFIX: "lab-one/",
  });
  await buildWorld();
});

afterAll(async () => {
  (objectStore() as S3Storage).destroy();
  await server?.close();
  for (const k of ["STORAGE_DRIVER", "S3_BUCKET", "S3_ENDPOINT", "S3_FORCE_PATH_STYLE", "S3_ACCESS_KEY_ID", "S3_SECRET_ACCESS_KEY", "S3_KEY_PREFIX"]) delete process.env[k];
});

it("uploads through the S3 driver when configured, and serves the copies back from the bucket", async () => {
  expect(objectStore()).toBeInstanceOf(S3Storage);
  const jpeg = await rackPhoto([[150, 60, 200], [60, 180, 90]]);
  const form = new FormData();
  form.append("file", new File([new Uint8Array(jpeg)], "s3-rack.jpg", { type: "image/jpeg" }));
  const res = await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: form, headers: { authorization: `Bearer ${tokenFor("chemist")}` } }));
  expect(res.status).toBe(201);
  const { photo } = await res.json();
  const store = objectStore();
  const keys: string[] = [];
  for (const prefix of ["photos/", "thumb/", "display/"]) for await (const o of store.list(prefix)) keys.push(o.key);
  expect(keys).toHaveLength(3);
  expect((await store.read(keys.find((k) => k.startsWith("photos/"))!)).equals(jpeg)).toBe(true);
  expect(fs.existsSync(path.join(dataDir(), "objects"))).toBe(false);
  const original = await photoImage(new Request(`http://localhost:3000${photo.urls.original}`, { headers: { authorization: `Bearer ${tokenFor("formulator")}` } }), { params: Promise.resolve({ id: photo.id }) });
  expect(original.headers.get("content-disposition")).toMatch(/^attachment/);
  expect(original.headers.get("x-content-type-options")).toBe("nosniff");
  expect(Buffer.from(await original.arrayBuffer()).equals(jpeg)).toBe(true);
});
