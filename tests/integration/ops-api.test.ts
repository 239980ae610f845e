/**
 * GET /api/health and GET /api/photos paging through the real route handlers, database and local
 * photo store. The health check's failures are real ones: a migration record missing from the
 * database, and a photo store that cannot be written (its folder replaced by a file).
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { GET as health } from "@/app/api/health/route";
import { GET as listPhotos, POST as uploadPhoto } from "@/app/api/photos/route";
import { eq } from "drizzle-orm";
import { GET as listDyesRoute } from "@/app/api/dyes/route";
import { db } from "@/db/client";
import { dyesVersion, listDyesCached } from "@/db/queries/dyes";
import { apiTokens, dyes, measurements } from "@/db/schema";
import { authenticateApiToken } from "@/lib/auth/service";
import { sha256Hex } from "@/lib/auth/tokens";
import { dataDir } from "@/lib/config/env";
import { addMeasurement, buildWorld, PEOPLE, tokenFor } from "../support/world";
import { smallJpeg } from "../support/photos";

const get = (handler: (req: Request) => Promise<Response>, url: string, headers: Record<string, string> = {}) => handler(new Request(`http://localhost:3000${url}`, { headers }));

beforeAll(async () => {
  await buildWorld();
});

describe("GET /api/health", () => {
  it("answers 200 {status: ok} without credentials when database, migrations and storage work, and names no path or secret", async () => {
    const res = await get(health, "/api/health");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.status).toBe("ok");
    expect(body.checks.database.ok).toBe(true);
    expect(body.checks.migrations).toMatchObject({ ok: true });
    expect(body.checks.migrations.applied).toBe(body.checks.migrations.expected);
    expect(body.checks.storage.ok).toBe(true);
    const text = JSON.stringify(body);
    expect(text).not.toContain(dataDir());
    expect(text).not.toMatch(/password|token|secret|key/i);
    // The probe file is removed again.
    expect(fs.existsSync(path.join(dataDir(), "objects", "health")) ? fs.readdirSync(path.join(dataDir(), "objects", "health")) : []).toEqual([]);
  });

  it("answers 503 when a migration is missing from the database", async () => {
    const client = db().$client;
    const last = client.prepare("SELECT rowid AS r, id, hash, created_at FROM __drizzle_migrations ORDER BY created_at DESC LIMIT 1").get() as { r: number; id: number | null; hash: string; created_at: number };
    client.prepare("DELETE FROM __drizzle_migrations WHERE rowid = ?").run(last.r);
    try {
      const res = await get(health, "/api/health");
      expect(res.status).toBe(503);
      const body = await res.json();
      expect(body.status).not.toBe("ok");
      expect(body.checks.migrations.ok).toBe(false);
      expect(body.checks.migrations.message).toMatch(/missing/);
    } finally {
      client.prepare("INSERT INTO __drizzle_migrations (id, hash, created_at) VALUES (?, ?, ?)").run(last.id, last.hash, last.created_at);
    }
    expect((await get(health, "/api/health")).status).toBe(200);
  });

  it("answers 503 when the photo store cannot be written", async () => {
    const objects = path.join(dataDir(), "objects");
    const aside = `${objects}.aside`;
    if (fs.existsSync(objects)) fs.renameSync(objects, aside);
    fs.writeFileSync(objects, "a file where the photo folder should be");
    try {
      const res = await get(health, "/api/health");
      expect(res.status).toBe(503);
      expect((await res.json()).checks.storage).toMatchObject({ ok: false, driver: "local" });
    } finally {
      fs.rmSync(objects);
      if (fs.existsSync(aside)) fs.renameSync(aside, objects);
    }
  });
});

describe("GET /api/photos?limit=&cursor=", () => {
  it("pages through every photo exactly once, newest first, even when photos arrive between pages", async () => {
    const token = tokenFor("chemist");
    const send = async (i: number) => {
      const form = new FormData();
      form.append("file", new File([new Uint8Array(await smallJpeg(5000 + i))], `p${i}.jpg`, { type: "image/jpeg" }));
      const res = await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: form, headers: { authorization: `Bearer ${token}` } }));
      expect(res.status).toBe(201);
      return (await res.json()).photo.id as string;
    };
    const uploaded: string[] = [];
    for (let i = 0; i < 7; i++) uploaded.push(await send(i));
    const seen: string[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const res = await get(listPhotos, `/api/photos?limit=3${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ""}`, { authorization: `Bearer ${token}` });
      expect(res.status).toBe(200);
      const body = await res.json();
      expect(body.photos.length).toBeLessThanOrEqual(3);
      for (const p of body.photos) {
        expect(p).toMatchObject({ id: expect.any(String), sha256: expect.stringMatching(/^[0-9a-f]{64}$/), size: expect.any(Number), created: expect.any(String) });
        expect(p).toHaveProperty("profile");
        seen.push(p.id);
      }
      // A photo arriving after the first page must not shift the pages that follow.
      if (pages === 0) await send(99);
      cursor = body.nextCursor;
      pages++;
    } while (cursor);
    expect(new Set(seen).size).toBe(seen.length);
    for (const id of uploaded) expect(seen).toContain(id);
    const created = seen.length;
    expect(pages).toBe(Math.ceil(created / 3) || 1);
  });

  it("answers 422 with what to do for a bad cursor or limit, and 403 for formulators", async () => {
    const auth = { authorization: `Bearer ${tokenFor("admin")}` };
    for (const url of ["/api/photos?cursor=not-a-cursor", `/api/photos?cursor=${Buffer.from("[1,2,3]").toString("base64url")}`, "/api/photos?limit=0", "/api/photos?limit=500", "/api/photos?limit=two"]) {
      const res = await get(listPhotos, url, auth);
      expect(res.status, url).toBe(422);
      expect((await res.json()).error.message).toMatch(/cursor|limit/);
    }
    expect((await get(listPhotos, "/api/photos", { authorization: `Bearer ${tokenFor("formulator")}` })).status).toBe(403);
  });
});

describe("cheap authenticated reads", () => {
  it("a token's last_used_at is written on first use and then at most once a minute, not on every call", () => {
    const token = tokenFor("formulator");
    const row = () => db().select().from(apiTokens).where(eq(apiTokens.tokenHash, sha256Hex(token))).get()!;
    expect(row().lastUsedAt).toBeNull();
    expect(authenticateApiToken(db(), token)?.email).toBe(PEOPLE.formulator.email);
    const first = row().lastUsedAt!;
    expect(first).toBeInstanceOf(Date);
    const changes = () => Number(db().$client.prepare("SELECT total_changes()").pluck().get());
    const before = changes();
    for (let i = 0; i < 20; i++) expect(authenticateApiToken(db(), token)).not.toBeNull();
    expect(changes()).toBe(before);
    expect(row().lastUsedAt!.getTime()).toBe(first.getTime());
    // Two minutes later (as stored), the next use writes the time again.
    db().update(apiTokens).set({ lastUsedAt: new Date(Date.now() - 120_000) }).where(eq(apiTokens.id, row().id)).run();
    authenticateApiToken(db(), token);
    expect(Date.now() - row().lastUsedAt!.getTime()).toBeLessThan(5_000);
  });

  it("the cached dye list follows every change that alters it: a new dye, a renamed one, an accepted or removed measurement", async () => {
    const auth = { authorization: `Bearer ${tokenFor("formulator")}` };
    const find = async (q: string) => (await (await get(listDyesRoute, `/api/dyes?q=${encodeURIComponent(q)}`, auth)).json()).dyes as { code: string; name: string; measurements: number }[];
    const v0 = dyesVersion(db());
    const list = listDyesCached(db());
    expect(listDyesCached(db())).toBe(list);
    db().insert(dyes).values({ id: "dye_cache1", code: "T-CACHE", name: "Cache Cobalt", dyeClass: "azo" }).run();
    expect(dyesVersion(db())).toBeGreaterThan(v0);
    expect((await find("T-CACHE")).map((d) => d.name)).toEqual(["Cache Cobalt"]);
    db().update(dyes).set({ name: "Cache Cerulean" }).where(eq(dyes.id, "dye_cache1")).run();
    expect((await find("T-CACHE"))[0].name).toBe("Cache Cerulean");
    const count = async () => (await find("T-001")).find((d) => d.code === "T-001")!.measurements;
    const n = await count();
    addMeasurement("ms_cache_1", PEOPLE.chemist.id, "accepted");
    expect(await count()).toBe(n + 1);
    db().update(measurements).set({ reviewState: "rejected" }).where(eq(measurements.id, "ms_cache_1")).run();
    expect(await count()).toBe(n);
    db().update(measurements).set({ reviewState: "accepted" }).where(eq(measurements.id, "ms_cache_1")).run();
    db().delete(measurements).where(eq(measurements.id, "ms_cache_1")).run();
    expect(await count()).toBe(n);
  });
});
