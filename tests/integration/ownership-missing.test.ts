/**
 * Issue 11, defect 9: rack layouts have an owner (only they or an admin overwrite or delete one), and
 * a photo whose file has gone missing from storage answers 410 with a sentence instead of a 500.
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { deleteTemplateAction, saveTemplateAction } from "@/app/actions/bench";
import { POST as uploadPhoto } from "@/app/api/photos/route";
import { GET as photoImage } from "@/app/api/photos/[id]/image/route";
import { POST as measurePhoto } from "@/app/api/photos/[id]/measure/route";
import { db } from "@/db/client";
import { photos, rackTemplates } from "@/db/schema";
import { dataDir } from "@/lib/config/env";
import { closePhotoPool } from "@/lib/workers/pool";
import { actAs, buildWorld, form, tokenFor } from "../support/world";
import { rackPhoto } from "../support/photos";

beforeAll(async () => {
  await buildWorld();
});

const layout = (name: string, n: number) =>
  form({ payload: JSON.stringify({ name, regions: Array.from({ length: n }, (_, i) => ({ shape: "rect", x: 0.1 * i, y: 0.2, w: 0.05, h: 0.3, role: "vial", label: `V${i + 1}` })) }) });

describe("rack layouts have an owner", () => {
  it("another chemist can neither overwrite nor delete a layout; its owner and an admin can", async () => {
    await actAs("chemist");
    const saved = await saveTemplateAction(null, layout("Rack of eight", 8));
    expect(saved).toMatchObject({ ok: true });
    const id = (saved?.data as { id: string }).id;

    await actAs("chemist2");
    const overwrite = await saveTemplateAction(null, layout("Rack of eight", 2));
    expect(overwrite).toMatchObject({ ok: false, code: "forbidden" });
    expect(overwrite?.message).toMatch(/belongs to Test Chemist/);
    expect(await deleteTemplateAction(null, form({ id }))).toMatchObject({ ok: false, code: "forbidden" });
    expect(db().select().from(rackTemplates).where(eq(rackTemplates.id, id)).get()?.regions).toHaveLength(8);

    await actAs("chemist");
    expect(await saveTemplateAction(null, layout("Rack of eight", 6))).toMatchObject({ ok: true });
    await actAs("admin");
    expect(await deleteTemplateAction(null, form({ id }))).toMatchObject({ ok: true });
  });
});

describe("a photo whose file is missing", () => {
  it("answers 410 with a sentence when shown in full or measured", async () => {
    const token = tokenFor("chemist");
    const body = new FormData();
    body.append("file", new File([new Uint8Array(await rackPhoto([[200, 40, 120], [30, 140, 200]]))], "gone.jpg", { type: "image/jpeg" }));
    const up = await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body, headers: { authorization: `Bearer ${token}` } }));
    const { photo } = await up.json();
    const row = db().select().from(photos).where(eq(photos.id, photo.id)).get()!;
    fs.rmSync(path.join(dataDir(), "objects", row.storageKey));

    const original = await photoImage(new Request(`http://localhost:3000/api/photos/${photo.id}/image?size=original`, { headers: { authorization: `Bearer ${token}` } }), {
      params: Promise.resolve({ id: photo.id }),
    });
    expect(original.status).toBe(410);
    expect((await original.json()).error.message).toMatch(/missing from storage.*Upload the photo again/);

    const measured = await measurePhoto(
      new Request(`http://localhost:3000/api/photos/${photo.id}/measure`, {
        method: "POST",
        headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
        body: JSON.stringify({ vials: [{ key: "a", region: { shape: "rect", x: 60, y: 120, w: 80, h: 150 } }] }),
      }),
      { params: Promise.resolve({ id: photo.id }) },
    );
    expect(measured.status).toBe(410);
    expect((await measured.json()).error.message).toMatch(/missing from storage/);
    await closePhotoPool();
  });
});
