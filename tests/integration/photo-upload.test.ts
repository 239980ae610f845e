/**
 * POST /api/photos through the real route handler, database and local photo store (DATA_DIR/objects):
 * who may upload, what is refused and why, and that a refusal stores nothing.
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { eq, sql } from "drizzle-orm";
import sharp from "sharp";
import { POST as uploadPhoto } from "@/app/api/photos/route";
import { GET as photoImage } from "@/app/api/photos/[id]/image/route";
import { db } from "@/db/client";
import { auditLog, photos } from "@/db/schema";
import { dataDir } from "@/lib/config/env";
import { buildWorld, tokenFor } from "../support/world";
import { cmykJpeg, greyJpeg, png16, pngBomb, rackPhoto, rotatedJpeg, smallJpeg, SVG, ZIP_TAIL } from "../support/photos";

const objectsDir = () => path.join(dataDir(), "objects");

function storedFiles(): string[] {
  const out: string[] = [];
  const walk = (dir: string) => {
    if (!fs.existsSync(dir)) return;
    for (const e of fs.readdirSync(dir, { withFileTypes: true })) e.isDirectory() ? walk(path.join(dir, e.name)) : out.push(path.join(dir, e.name));
  };
  walk(objectsDir());
  return out.sort();
}

const photoCount = () => db().select({ n: sql<number>`count(*)` }).from(photos).get()!.n;

async function upload(bytes: Uint8Array, { who = "chemist" as "chemist" | "admin" | "formulator" | null, name = "rack.jpg", type = "image/jpeg", extra = {} as Record<string, string> } = {}) {
  const form = new FormData();
  form.append("file", new File([new Uint8Array(bytes)], name, { type }));
  for (const [k, v] of Object.entries(extra)) form.append(k, v);
  const headers: Record<string, string> = who ? { authorization: `Bearer ${tokenFor(who)}` } : {};
  const res = await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: form, headers }));
  return { status: res.status, body: await res.json() };
}

/** Uploads and expects a refusal that stored nothing. */
async function refused(bytes: Uint8Array, status: number, message: RegExp, opts: Parameters<typeof upload>[1] = {}) {
  const filesBefore = storedFiles();
  const rowsBefore = photoCount();
  const res = await upload(bytes, opts);
  expect(res.status, JSON.stringify(res.body)).toBe(status);
  expect(res.body.error.message).toMatch(message);
  expect(storedFiles()).toEqual(filesBefore);
  expect(photoCount()).toBe(rowsBefore);
  return res.body.error;
}

beforeAll(async () => {
  await buildWorld();
});

describe("POST /api/photos", () => {
  it("stores a chemist's rack photo: the original, a thumbnail and a display copy, one row and an audit entry", async () => {
    const jpeg = await rackPhoto([[200, 40, 120], [30, 140, 200], [240, 200, 30], [90, 40, 160]]);
    const res = await upload(jpeg, { extra: { lightingProfileId: "" } });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const p = res.body.photo;
    expect(p).toMatchObject({ width: 960, height: 400, mimeType: "image/jpeg", bitDepth: 8, originalName: "rack.jpg" });
    expect(p.id).toMatch(/^ph_/);
    const row = db().select().from(photos).where(eq(photos.id, p.id)).get()!;
    for (const key of [row.storageKey, row.thumbKey!, row.displayKey!]) expect(fs.existsSync(path.join(objectsDir(), key)), key).toBe(true);
    expect(fs.readFileSync(path.join(objectsDir(), row.storageKey)).equals(jpeg)).toBe(true);
    const thumb = await sharp(fs.readFileSync(path.join(objectsDir(), row.thumbKey!))).metadata();
    expect([thumb.width, thumb.height]).toEqual([320, 133]);
    const audit = db().select().from(auditLog).where(eq(auditLog.entityId, p.id)).all();
    expect(audit.map((a) => a.action)).toEqual(["photo.upload"]);
  });

  it("recognises a photo uploaded again (same sha256) and returns the existing record", async () => {
    const jpeg = await rackPhoto([[10, 200, 10]]);
    const first = await upload(jpeg, { name: "first.jpg" });
    const rows = photoCount();
    const files = storedFiles();
    const again = await upload(jpeg, { name: "copy-of-first.jpg", who: "admin" });
    expect(again.status).toBe(200);
    expect(again.body.duplicate).toBe(true);
    expect(again.body.photo.id).toBe(first.body.photo.id);
    expect(again.body.photo.originalName).toBe("first.jpg");
    expect(photoCount()).toBe(rows);
    expect(storedFiles()).toEqual(files);
  });

  it("refuses formulators (403) and anonymous callers (401), storing nothing", async () => {
    const jpeg = await smallJpeg(900);
    const e403 = await refused(jpeg, 403, /admins and chemists/, { who: "formulator" });
    expect(e403.code).toBe("forbidden");
    await refused(jpeg, 401, /Sign in|token/, { who: null });
  });

  it("decides by the bytes, not the name or type: an SVG named .jpg is refused (415)", async () => {
    const e = await refused(SVG, 415, /SVG drawing, not a photo/, { name: "vials.jpg", type: "image/jpeg" });
    expect(e.code).toBe("unsupported_type");
  });

  it.each([
    ["a GIF", Buffer.from("GIF89a\x01\x00\x01\x00\x00\x00\x00;", "binary"), /GIF/],
    ["a PDF", Buffer.from("%PDF-1.7\n1 0 obj\n<<>>\nendobj\n"), /PDF/],
    ["an HTML page", Buffer.from("<!doctype html><script>alert(1)</script>"), /HTML/],
    ["plain text", Buffer.from("wavelength_nm,absorbance\n500,0.3\n"), /not an image format/],
    ["an empty file", Buffer.alloc(0), /empty/],
  ])("refuses %s (415)", async (_label, bytes, message) => {
    await refused(bytes, 415, message, { name: "upload.png", type: "image/png" });
  });

  it("refuses a decompression bomb from its header, before decoding (413)", async () => {
    const bomb = pngBomb(40_000);
    expect(bomb.length).toBeLessThan(64 * 1024);
    const started = Date.now();
    const e = await refused(bomb, 413, /40000×40000 pixels .*limit is 100 megapixels/, { name: "bomb.png", type: "image/png" });
    expect(e.code).toBe("too_large");
    expect(Date.now() - started).toBeLessThan(2000);
  });

  it("refuses a file over MAX_UPLOAD_MB (413) from its declared length", async () => {
    const big = Buffer.alloc(41 * 1048576, 1);
    big.set([0xff, 0xd8, 0xff], 0);
    await refused(big, 413, /up to 40 MB/);
  });

  it("refuses truncated JPEG and PNG files (422) with what to do", async () => {
    const jpeg = await rackPhoto([[200, 40, 120], [30, 140, 200]]);
    const e = await refused(jpeg.subarray(0, Math.floor(jpeg.length * 0.6)), 422, /truncated.*Copy the file again/);
    expect(e.code).toBe("invalid_input");
    const png = await rackPhoto([[200, 40, 120]], { format: "png" });
    await refused(png.subarray(0, png.length - 200), 422, /truncated/, { name: "rack.png", type: "image/png" });
  });

  it("refuses polyglots: a JPEG with a ZIP archive after its end, a PNG with a script after IEND (415)", async () => {
    const jpeg = await rackPhoto([[120, 40, 200]]);
    await refused(Buffer.concat([jpeg, ZIP_TAIL]), 415, /22 more bytes of other data/);
    const png = await rackPhoto([[120, 40, 200]], { format: "png" });
    await refused(Buffer.concat([png, Buffer.from("<script>alert(document.cookie)</script>")]), 415, /other data/, { name: "rack.png", type: "image/png" });
  });

  it("refuses CMYK JPEGs (415) and greyscale photos (422): neither holds camera RGB", async () => {
    await refused(await cmykJpeg(), 415, /CMYK/);
    await refused(await greyJpeg(), 422, /greyscale/);
  });

  it("applies EXIF orientation: stored size and derived copies are as the photo is viewed", async () => {
    const res = await upload(await rotatedJpeg(), { name: "rotated.jpg" });
    expect(res.status).toBe(201);
    expect(res.body.photo).toMatchObject({ width: 200, height: 300 });
    expect(res.body.photo.exif.orientation).toBe(6);
    const img = await photoImage(new Request(`http://localhost:3000${res.body.photo.urls.display}`, { headers: { authorization: `Bearer ${tokenFor("formulator")}` } }), {
      params: Promise.resolve({ id: res.body.photo.id }),
    });
    expect(img.headers.get("content-type")).toBe("image/jpeg");
    const bytes = Buffer.from(await img.arrayBuffer());
    const { data, info } = await sharp(bytes).raw().toBuffer({ resolveWithObject: true });
    expect([info.width, info.height]).toEqual([200, 300]);
    // Orientation 6 turns the stored image 90° clockwise: its red left half becomes the top half.
    const at = (x: number, y: number) => Array.from(data.subarray((y * info.width + x) * 3, (y * info.width + x) * 3 + 3));
    expect(at(100, 40)[0]).toBeGreaterThan(150);
    expect(at(100, 260)[2]).toBeGreaterThan(150);
  });

  it("accepts a 16-bit PNG, keeps the original at full depth and makes 8-bit copies of the right colour", async () => {
    const png = png16([60000, 1000, 30000]);
    const res = await upload(png, { name: "deep.png", type: "image/png" });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.photo.bitDepth).toBe(16);
    const row = db().select().from(photos).where(eq(photos.id, res.body.photo.id)).get()!;
    expect((await sharp(fs.readFileSync(path.join(objectsDir(), row.storageKey))).metadata()).depth).toBe("ushort");
    const display = await sharp(fs.readFileSync(path.join(objectsDir(), row.displayKey!))).raw().toBuffer({ resolveWithObject: true });
    expect(display.info.channels).toBe(3);
    // 60000/65535·255 = 233.5, 1000/65535·255 = 3.9, 30000/65535·255 = 116.7 (JPEG rounding ± 2).
    const [r, g, b] = display.data.subarray(0, 3);
    expect(Math.abs(r - 233.5)).toBeLessThan(2);
    expect(Math.abs(g - 3.9)).toBeLessThan(2);
    expect(Math.abs(b - 116.7)).toBeLessThan(2);
  });

  it("answers 422 when the field 'file' is missing or the profile is unknown", async () => {
    const form = new FormData();
    form.append("photo", "nope");
    const res = await uploadPhoto(new Request("http://localhost:3000/api/photos", { method: "POST", body: form, headers: { authorization: `Bearer ${tokenFor("chemist")}` } }));
    expect(res.status).toBe(422);
    expect((await res.json()).error.message).toMatch(/field 'file'/);
    await refused(await smallJpeg(901), 422, /lighting profile/i, { extra: { lightingProfileId: "lp_nope" } });
  });

  it("takes 50 uploads in parallel and loses none: 50 rows, every file present, one row per distinct photo", async () => {
    const before = photoCount();
    const images = await Promise.all(Array.from({ length: 45 }, (_, i) => smallJpeg(i)));
    // Five of the fifty are repeats of others, sent at the same moment.
    const batch = [...images, ...images.slice(0, 5)];
    const results = await Promise.all(batch.map((img, i) => upload(img, { name: `par-${i}.jpg` })));
    expect(results.every((r) => r.status === 201 || r.status === 200), JSON.stringify(results.filter((r) => r.status > 201))).toBe(true);
    expect(photoCount()).toBe(before + 45);
    const ids = new Set(results.map((r) => r.body.photo.id));
    expect(ids.size).toBe(45);
    for (let i = 0; i < 5; i++) expect(results[45 + i].body.photo.id).toBe(results[i].body.photo.id);
    for (const id of ids) {
      const row = db().select().from(photos).where(eq(photos.id, id)).get()!;
      for (const key of [row.storageKey, row.thumbKey!, row.displayKey!]) expect(fs.existsSync(path.join(objectsDir(), key))).toBe(true);
    }
    expect(storedFiles().filter((f) => f.endsWith(".tmp"))).toEqual([]);
  });
});
