/**
 * Photo records and the files they point to. Order of writes: the files first (content-addressed,
 * atomic per file), then the row in a transaction with its audit entry. A crash between the two leaves
 * only files no row points to, which `sweepOrphanFiles` finds and removes; a row never points to a file
 * that was not completely written.
 */
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import type { PipelineResult, ReferenceInput } from "../../lib/bench/pipeline";
import { ColorInputError, type DecodedPhoto, type RegionSpec } from "../../lib/color/regions";
import { env } from "../../lib/config/env";
import { decodeOnWorker, measureOnWorker } from "../../lib/workers/pool";
import { AppError } from "../../lib/errors";
import { derivedKeyFor, keyFor, sha256OfBytes, STORE_PREFIXES, type ObjectStore } from "../../lib/storage/driver";
import { inspectPhoto, makeDerivatives, type PhotoLimits } from "../../lib/storage/photo-intake";
import type { Db } from "../connection";
import { lightingProfiles, photos, type Photo } from "../schema";
import { recordAudit } from "./audit";
import { profileForPipeline } from "./bench";
import { assertBenchProfile } from "./lighting";

export type StorePhotoResult = { photo: Photo; duplicate: boolean };

function byHash(db: Db, sha256: string): Photo | undefined {
  return db.select().from(photos).where(eq(photos.sha256, sha256)).get();
}

export async function storePhoto(
  db: Db,
  store: ObjectStore,
  input: { bytes: Uint8Array; originalName: string; lightingProfileId?: string | null; uploaderId: string; limits: PhotoLimits },
): Promise<StorePhotoResult> {
  const sha256 = sha256OfBytes(input.bytes);
  const known = byHash(db, sha256);
  if (known) return { photo: known, duplicate: true };

  if (input.lightingProfileId) {
    // Unknown, draft, retired or expired profiles are refused (the sentence says which and what to do).
    assertBenchProfile(db, input.lightingProfileId);
  }
  const facts = await inspectPhoto(input.bytes, input.limits);
  const derived = await makeDerivatives(input.bytes, input.limits);
  // The colour engine must be able to measure what is accepted: decode once as it will.
  try {
    await decodeOnWorker({ bytes: input.bytes, maxPixels: input.limits.maxPixels });
  } catch (error) {
    if (error instanceof ColorInputError) throw new AppError("invalid_input", error.message);
    throw error;
  }

  // Written even if present (content-addressed: the same bytes), which refreshes its time for the sweep.
  const original = { key: keyFor(sha256, facts.extension) };
  await store.write(original.key, input.bytes, facts.mimeType);
  const thumbKey = derivedKeyFor(sha256, "thumb");
  const displayKey = derivedKeyFor(sha256, "display");
  await Promise.all([store.write(thumbKey, derived.thumb, "image/jpeg"), store.write(displayKey, derived.display, "image/jpeg")]);

  const takenAt = facts.exif.takenAt ? new Date(facts.exif.takenAt) : null;
  const row = {
    id: `ph_${randomUUID()}`,
    storageKey: original.key,
    sha256,
    thumbKey,
    displayKey,
    byteSize: input.bytes.byteLength,
    mimeType: facts.mimeType,
    width: facts.width,
    height: facts.height,
    bitDepth: facts.bitDepth,
    colourSpace: facts.colourSpace,
    exif: facts.exif,
    originalName: input.originalName.slice(0, 255),
    lightingProfileId: input.lightingProfileId ?? null,
    uploadedBy: input.uploaderId,
    takenAt,
  };
  try {
    db.transaction((tx) => {
      tx.insert(photos).values(row).run();
      recordAudit(tx, {
        actorId: input.uploaderId,
        action: "photo.upload",
        entity: "photo",
        entityId: row.id,
        after: { sha256, originalName: row.originalName, width: row.width, height: row.height, mimeType: row.mimeType, lightingProfileId: row.lightingProfileId },
      });
    });
  } catch (error) {
    // The same file uploaded twice at the same moment: the other request's row won the unique index.
    const raced = byHash(db, sha256);
    if (raced) return { photo: raced, duplicate: true };
    throw error;
  }
  return { photo: byHash(db, sha256)!, duplicate: false };
}

export function getPhoto(db: Db, id: string): Photo | undefined {
  return db.select().from(photos).where(eq(photos.id, id)).get();
}

/**
 * The bytes of a photo's thumbnail or display copy. Photos stored before copies were made (the demo
 * seed writes originals only) get theirs made now, file first and then the row updated.
 */
export async function photoDerivative(db: Db, store: ObjectStore, photo: Photo, variant: "thumb" | "display", limits: Pick<PhotoLimits, "maxPixels">): Promise<Buffer> {
  const existing = variant === "thumb" ? photo.thumbKey : photo.displayKey;
  if (existing && (await store.has(existing))) return store.read(existing);
  const derived = await makeDerivatives(await readPhotoBytes(store, photo), limits);
  const thumbKey = derivedKeyFor(photo.sha256, "thumb");
  const displayKey = derivedKeyFor(photo.sha256, "display");
  await Promise.all([store.write(thumbKey, derived.thumb, "image/jpeg"), store.write(displayKey, derived.display, "image/jpeg")]);
  db.update(photos).set({ thumbKey, displayKey }).where(eq(photos.id, photo.id)).run();
  return variant === "thumb" ? derived.thumb : derived.display;
}

export type SweepReport = {
  scanned: number;
  referenced: number;
  orphans: { key: string; byteSize: number; modifiedAt: string }[];
  removed: number;
  /** Rows whose original is missing from the store (should never happen; reported, never deleted). */
  missing: { photoId: string; key: string }[];
};

/**
 * Finds files in the photo store that no photo row points to (left by a crash between writing the
 * file and its row, or a temporary file of an interrupted write) and, unless `dryRun`, removes those
 * older than `graceMs` (younger ones may belong to an upload still in progress). Also reports rows
 * whose original file is missing.
 */
export async function sweepOrphanFiles(db: Db, store: ObjectStore, { graceMs = 60 * 60 * 1000, dryRun = false, now = new Date() } = {}): Promise<SweepReport> {
  const rows = db.select({ id: photos.id, storageKey: photos.storageKey, thumbKey: photos.thumbKey, displayKey: photos.displayKey }).from(photos).all();
  const referenced = new Set<string>();
  for (const r of rows) for (const k of [r.storageKey, r.thumbKey, r.displayKey]) if (k) referenced.add(k);
  const report: SweepReport = { scanned: 0, referenced: referenced.size, orphans: [], removed: 0, missing: [] };
  const present = new Set<string>();
  for (const prefix of STORE_PREFIXES) {
    for await (const object of store.list(prefix)) {
      report.scanned++;
      present.add(object.key);
      if (referenced.has(object.key)) continue;
      if (now.getTime() - object.modifiedAt.getTime() < graceMs) continue;
      report.orphans.push({ key: object.key, byteSize: object.byteSize, modifiedAt: object.modifiedAt.toISOString() });
    }
  }
  for (const r of rows) if (!present.has(r.storageKey)) report.missing.push({ photoId: r.id, key: r.storageKey });
  if (!dryRun) {
    for (const orphan of report.orphans) {
      await store.remove(orphan.key);
      report.removed++;
    }
  }
  return report;
}

/**
 * The original bytes of a stored photo. A file missing from storage (deleted by hand, a restore that
 * left it out) answers 410 with what to do, instead of a server error.
 */
export async function readPhotoBytes(store: ObjectStore, photo: Photo): Promise<Buffer> {
  try {
    return await store.read(photo.storageKey);
  } catch (error) {
    if (!(await store.has(photo.storageKey).catch(() => true))) {
      throw new AppError("gone", `The file of photo ${photo.originalName} is missing from storage, so it cannot be shown or measured. Upload the photo again, or ask an admin to restore it from a backup.`);
    }
    throw error;
  }
}

// ---------------------------------------------------------------- decoded photos for measuring

/**
 * Decoded photos kept in memory while someone marks them, bounded by their size in bytes (a 12 MP
 * photo is ≈ 36 MB decoded, a 16-bit one twice that), least recently used first out.
 */
type CacheEntry = { photo: Promise<DecodedPhoto>; bytes: number };
const decodedCache = new Map<string, CacheEntry>();

function cacheLimitBytes(): number {
  return Math.round(env().DECODED_CACHE_MB * 1048576);
}

/** Bytes of decoded pixels held by the cache now. */
export function decodedCacheBytes(): number {
  let total = 0;
  for (const e of decodedCache.values()) total += e.bytes;
  return total;
}

function evictDecoded(limit: number) {
  for (const [key, entry] of decodedCache) {
    if (decodedCacheBytes() <= limit) break;
    if (entry.bytes > 0) decodedCache.delete(key);
  }
}

/** The photo decoded once by the colour engine (on a worker, EXIF orientation applied), cached for live measuring. */
export function decodedPhoto(store: ObjectStore, photo: Photo, maxPixels: number): Promise<DecodedPhoto> {
  const hit = decodedCache.get(photo.sha256);
  if (hit) {
    decodedCache.delete(photo.sha256);
    decodedCache.set(photo.sha256, hit);
    return hit.photo;
  }
  const entry: CacheEntry = { photo: readPhotoBytes(store, photo).then((bytes) => decodeOnWorker({ bytes, maxPixels })), bytes: 0 };
  decodedCache.set(photo.sha256, entry);
  entry.photo.then(
    (decoded) => {
      const limit = cacheLimitBytes();
      if (decodedCache.get(photo.sha256) !== entry) return;
      if (decoded.data.byteLength > limit) {
        decodedCache.delete(photo.sha256);
        return;
      }
      entry.bytes = decoded.data.byteLength;
      evictDecoded(limit);
    },
    () => decodedCache.delete(photo.sha256),
  );
  return entry.photo;
}

/**
 * Measures regions on a stored photo with the colour engine: the photo's bytes from the store, the
 * lighting profile from the database, the references marked in it. Colour-engine refusals (a region
 * off the photo, a reference too dark to scale by) become 422s with the engine's sentence.
 */
export async function measureOnPhoto(
  db: Db,
  store: ObjectStore,
  photo: Photo,
  input: { lightingProfileId: string | null; references: ReferenceInput[]; vials: RegionSpec[]; maxPixels: number },
): Promise<PipelineResult> {
  const profile = profileForPipeline(db, input.lightingProfileId);
  try {
    const decoded = await decodedPhoto(store, photo, input.maxPixels);
    return await measureOnWorker({ photo: decoded, input: { vials: input.vials, references: input.references, profile, takenAt: photo.takenAt ?? photo.createdAt } });
  } catch (error) {
    if (error instanceof ColorInputError) throw new AppError("invalid_input", error.message);
    throw error;
  }
}
