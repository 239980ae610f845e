import { randomUUID } from "node:crypto";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { calibrationOfProfile, correctionOfProfile } from "../../lib/lighting/calibration";
import type { ProfileForPipeline } from "../../lib/bench/pipeline";
import { AppError } from "../../lib/errors";
import type { Db } from "../connection";
import {
  calibrationTargets,
  conditions,
  dyes,
  lightingProfiles,
  measurements,
  photos,
  rackTemplates,
  solvents,
  users,
  type AcidBase,
  type CorrectionKind,
  type NewMeasurement,
  type Region,
  type ReferenceUsed,
  type Role,
  type TemplateRegion,
} from "../schema";
import { recordAudit } from "./audit";
import { assertBenchProfile } from "./lighting";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

export function listLightingProfiles(db: Db) {
  return db
    .select({ profile: lightingProfiles, target: calibrationTargets })
    .from(lightingProfiles)
    .leftJoin(calibrationTargets, eq(lightingProfiles.targetId, calibrationTargets.id))
    .orderBy(desc(lightingProfiles.validFrom))
    .all();
}

export function listCalibrationTargets(db: Db) {
  return db.select().from(calibrationTargets).orderBy(calibrationTargets.name).all();
}

/** Number of rack photos, for paging the bench list. */
export function countPhotos(db: Db): number {
  return db.select({ n: sql<number>`count(*)` }).from(photos).get()?.n ?? 0;
}

export function listRecentPhotos(db: Db, { limit = 30, offset = 0 }: { limit?: number; offset?: number } = {}) {
  const rows = db
    .select({
      photo: photos,
      uploader: users.name,
      profile: lightingProfiles.name,
      count: sql<number>`(select count(*) from ${measurements} where ${measurements.photoId} = ${photos.id})`,
    })
    .from(photos)
    .innerJoin(users, eq(photos.uploadedBy, users.id))
    .leftJoin(lightingProfiles, eq(photos.lightingProfileId, lightingProfiles.id))
    .orderBy(desc(photos.createdAt), desc(photos.id))
    .limit(limit)
    .offset(offset)
    .all();
  return rows;
}

/** Measurements waiting for review, with who made them and their photo; oldest first, optionally of one photo. */
export function reviewQueue(db: Db, { limit = 100, photoId }: { limit?: number; photoId?: string } = {}) {
  const pending = photoId ? and(eq(measurements.reviewState, "pending"), eq(measurements.photoId, photoId)) : eq(measurements.reviewState, "pending");
  const rows = db
    .select({ m: measurements, dye: dyes, solvent: solvents, condition: conditions, author: users.name, photo: { id: photos.id, width: photos.width, height: photos.height, name: photos.originalName } })
    .from(measurements)
    .innerJoin(dyes, eq(measurements.dyeId, dyes.id))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .innerJoin(users, eq(measurements.createdBy, users.id))
    .leftJoin(photos, eq(measurements.photoId, photos.id))
    .where(pending)
    .orderBy(measurements.createdAt, measurements.id)
    .limit(limit)
    .all();
  const total = db.select({ n: sql<number>`count(*)` }).from(measurements).where(pending).get()?.n ?? 0;
  return Object.assign(rows, { total });
}

export function countMeasurements(db: Db) {
  return db
    .select({ state: measurements.reviewState, n: sql<number>`count(*)` })
    .from(measurements)
    .groupBy(measurements.reviewState)
    .all();
}

/** Accepted measurements with dye, condition and solvent (the records search and models use). */
export function acceptedMeasurements(db: Db, { dyeId }: { dyeId?: string } = {}) {
  return db
    .select({ m: measurements, dye: dyes, condition: conditions, solvent: solvents })
    .from(measurements)
    .innerJoin(dyes, eq(measurements.dyeId, dyes.id))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .where(dyeId ? and(eq(measurements.reviewState, "accepted"), eq(measurements.dyeId, dyeId)) : eq(measurements.reviewState, "accepted"))
    .orderBy(dyes.code, solvents.name)
    .all();
}

/** A lighting profile in the form the colour pipeline takes; throws 422 for an unknown id. */
export function profileForPipeline(db: Db, id: string | null): ProfileForPipeline | null {
  if (!id) return null;
  // Draft, retired, expired or not-yet-valid profiles are refused here, whatever the page offered.
  const p = assertBenchProfile(db, id);
  return { id: p.id, name: p.name, correction: correctionOfProfile(p), calibration: calibrationOfProfile(p), validFrom: p.validFrom, validUntil: p.validUntil, looMeanDeltaE00: p.looMeanDeltaE00 };
}

/** The condition row for these values, made if no identical one exists yet. */
function conditionFor(tx: Tx, actorId: string, c: { solventId: string; acidBase: AcidBase; ph: number | null; concentrationUmolL: number | null }): string {
  const existing = tx
    .select({ id: conditions.id })
    .from(conditions)
    .where(
      and(
        eq(conditions.solventId, c.solventId),
        eq(conditions.acidBase, c.acidBase),
        c.ph === null ? isNull(conditions.ph) : eq(conditions.ph, c.ph),
        c.concentrationUmolL === null ? isNull(conditions.concentrationUmolL) : eq(conditions.concentrationUmolL, c.concentrationUmolL),
        eq(conditions.additive, ""),
        isNull(conditions.pathLengthMm),
        isNull(conditions.temperatureC),
      ),
    )
    .get();
  if (existing) return existing.id;
  const id = `cond_${randomUUID()}`;
  tx.insert(conditions).values({ id, ...c }).run();
  recordAudit(tx, { actorId, action: "condition.create", entity: "condition", entityId: id, after: c });
  return id;
}

export type MeasurementToSave = {
  region: Region;
  dyeId: string;
  solventId: string;
  acidBase: AcidBase;
  ph: number | null;
  concentrationUmolL: number | null;
  rawLinearRgb: [number, number, number];
  xyz: [number, number, number];
  lab: [number, number, number];
  pixels: number;
  rejected: number;
  spread: number;
  flags: string[];
  flagReason: string | null;
  /** Standard uncertainties of L*, a*, b* and the combined ± ΔE00 (null when not computed). */
  uncertainty?: { uL: number; uA: number; uB: number; uDeltaE00: number } | null;
};

/**
 * Saves the vials of one photo in one transaction: the photo's lighting profile, a condition per vial
 * (reused when identical), one measurement per vial (pending review) and an audit entry for each
 * change. Any failure saves nothing.
 */
export function saveMeasurements(
  db: Db,
  input: {
    actorId: string;
    photoId: string;
    lightingProfileId: string | null;
    correction: { kind: CorrectionKind; values: number[] };
    references: ReferenceUsed[];
    vials: MeasurementToSave[];
  },
): string[] {
  return db.transaction((tx) => {
    const photo = tx.select().from(photos).where(eq(photos.id, input.photoId)).get();
    if (!photo) throw new AppError("not_found", "That photo no longer exists.");
    for (const [i, v] of input.vials.entries()) {
      if (v.flags.length > 0 && !v.flagReason) {
        throw new AppError("invalid_input", `Vial ${i + 1} is flagged (${v.flags.join(", ")}); say why it should be kept, or re-mark it.`, { [`vials.${i}.flagReason`]: ["Give a reason to keep a flagged measurement."] });
      }
      if (!tx.select({ id: dyes.id }).from(dyes).where(eq(dyes.id, v.dyeId)).get()) {
        throw new AppError("invalid_input", `Vial ${i + 1}: that dye is not in the catalogue.`, { [`vials.${i}.dyeId`]: ["Unknown dye."] });
      }
      if (!tx.select({ id: solvents.id }).from(solvents).where(eq(solvents.id, v.solventId)).get()) {
        throw new AppError("invalid_input", `Vial ${i + 1}: that solvent is not in the solvent table.`, { [`vials.${i}.solventId`]: ["Unknown solvent."] });
      }
    }
    // One photo, one light: never mix lighting profiles among a photo's standing measurements.
    const mixed = tx
      .select({ profile: lightingProfiles.name, id: measurements.lightingProfileId })
      .from(measurements)
      .leftJoin(lightingProfiles, eq(measurements.lightingProfileId, lightingProfiles.id))
      .where(and(eq(measurements.photoId, photo.id), sql`${measurements.reviewState} != 'rejected'`, sql`${measurements.lightingProfileId} is not ${input.lightingProfileId}`))
      .get();
    if (mixed) {
      throw new AppError(
        "conflict",
        `Earlier measurements from this photo were corrected with ${mixed.profile ? `the profile “${mixed.profile}”` : "no lighting profile"}; use the same here, or have those rejected first, so one photo never mixes two lights.`,
        { lightingProfileId: ["Use the profile of this photo's other measurements."] },
      );
    }
    if ((photo.lightingProfileId ?? null) !== input.lightingProfileId) {
      tx.update(photos).set({ lightingProfileId: input.lightingProfileId }).where(eq(photos.id, photo.id)).run();
      recordAudit(tx, {
        actorId: input.actorId,
        action: "photo.set-profile",
        entity: "photo",
        entityId: photo.id,
        before: { lightingProfileId: photo.lightingProfileId },
        after: { lightingProfileId: input.lightingProfileId },
      });
    }
    const ids: string[] = [];
    for (const v of input.vials) {
      const id = `ms_${randomUUID()}`;
      const row: NewMeasurement = {
        id,
        photoId: photo.id,
        region: v.region,
        dyeId: v.dyeId,
        conditionId: conditionFor(tx, input.actorId, { solventId: v.solventId, acidBase: v.acidBase, ph: v.ph, concentrationUmolL: v.concentrationUmolL }),
        lightingProfileId: input.lightingProfileId,
        correctionKind: input.correction.kind,
        correction: input.correction.values,
        referencePatches: input.references,
        rawR: v.rawLinearRgb[0],
        rawG: v.rawLinearRgb[1],
        rawB: v.rawLinearRgb[2],
        x: v.xyz[0],
        y: v.xyz[1],
        z: v.xyz[2],
        l: v.lab[0],
        a: v.lab[1],
        b: v.lab[2],
        illuminant: "D65",
        observer: "CIE 1931 2°",
        pixelCount: v.pixels,
        rejectedCount: v.rejected,
        spread: v.spread,
        uL: v.uncertainty?.uL ?? null,
        uA: v.uncertainty?.uA ?? null,
        uB: v.uncertainty?.uB ?? null,
        uDeltaE00: v.uncertainty?.uDeltaE00 ?? null,
        flags: v.flags,
        flagReason: v.flags.length ? v.flagReason : null,
        reviewState: "pending",
        createdBy: input.actorId,
      };
      tx.insert(measurements).values(row).run();
      recordAudit(tx, {
        actorId: input.actorId,
        action: "measurement.create",
        entity: "measurement",
        entityId: id,
        after: { photoId: photo.id, region: v.region, dyeId: v.dyeId, lab: v.lab, flags: v.flags, flagReason: row.flagReason, lightingProfileId: input.lightingProfileId, correction: input.correction.kind },
      });
      ids.push(id);
    }
    return ids;
  });
}

/** Measurements already made in one photo, with dye and solvent, in the order they were saved. */
export function photoMeasurements(db: Db, { photoId }: { photoId: string }) {
  return db
    .select({ m: measurements, dye: { code: dyes.code, name: dyes.name }, solvent: solvents.name, condition: conditions, author: users.name })
    .from(measurements)
    .innerJoin(dyes, eq(measurements.dyeId, dyes.id))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .innerJoin(users, eq(measurements.createdBy, users.id))
    .where(eq(measurements.photoId, photoId))
    .orderBy(measurements.createdAt, measurements.id)
    .all();
}

// ---------------------------------------------------------------- rack layout templates

export function listRackTemplates(db: Db) {
  return db.select().from(rackTemplates).orderBy(rackTemplates.name).all();
}

/**
 * A layout belongs to the person who saved it first (`created_by`); only they or an admin may
 * overwrite or delete it. Everyone on the bench may apply it.
 */
function mayChangeTemplate(tx: Pick<Db, "select">, existing: { name: string; createdBy: string }, actor: { id: string; role: Role }) {
  if (existing.createdBy === actor.id || actor.role === "admin") return;
  const owner = tx.select({ name: users.name }).from(users).where(eq(users.id, existing.createdBy)).get()?.name ?? "someone else";
  throw new AppError("forbidden", `The layout “${existing.name}” belongs to ${owner}; only they or an admin may change or delete it. Save yours under another name.`);
}

/** Saves a layout under a name; saved again under the same name by its owner (or an admin), it replaces the old one. */
export function saveRackTemplate(db: Db, { actorId, actorRole, name, regions }: { actorId: string; actorRole: Role; name: string; regions: TemplateRegion[] }) {
  return db.transaction((tx) => {
    const existing = tx.select().from(rackTemplates).where(eq(rackTemplates.name, name)).get();
    if (existing) {
      mayChangeTemplate(tx, existing, { id: actorId, role: actorRole });
      tx.update(rackTemplates).set({ regions, updatedAt: new Date() }).where(eq(rackTemplates.id, existing.id)).run();
      recordAudit(tx, { actorId, action: "rack-template.update", entity: "rack_template", entityId: existing.id, before: { regions: existing.regions }, after: { regions } });
      return existing.id;
    }
    const id = `rt_${randomUUID()}`;
    tx.insert(rackTemplates).values({ id, name, regions, createdBy: actorId }).run();
    recordAudit(tx, { actorId, action: "rack-template.create", entity: "rack_template", entityId: id, after: { name, regions } });
    return id;
  });
}

export function deleteRackTemplate(db: Db, { actorId, actorRole, id }: { actorId: string; actorRole: Role; id: string }) {
  db.transaction((tx) => {
    const existing = tx.select().from(rackTemplates).where(eq(rackTemplates.id, id)).get();
    if (!existing) throw new AppError("not_found", "That template no longer exists.");
    mayChangeTemplate(tx, existing, { id: actorId, role: actorRole });
    tx.delete(rackTemplates).where(eq(rackTemplates.id, id)).run();
    recordAudit(tx, { actorId, action: "rack-template.delete", entity: "rack_template", entityId: id, before: { name: existing.name, regions: existing.regions } });
  });
}
