import { and, desc, eq, sql } from "drizzle-orm";
import type { Db } from "../connection";
import { calibrationTargets, conditions, dyes, lightingProfiles, measurements, photos, solvents, users } from "../schema";

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

export function listRecentPhotos(db: Db, { limit = 30 }: { limit?: number } = {}) {
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
    .orderBy(desc(photos.createdAt))
    .limit(limit)
    .all();
  return rows;
}

/** Measurements waiting for review, with who made them; oldest first. */
export function reviewQueue(db: Db, { limit = 100 }: { limit?: number } = {}) {
  return db
    .select({ m: measurements, dye: dyes, solvent: solvents, condition: conditions, author: users.name })
    .from(measurements)
    .innerJoin(dyes, eq(measurements.dyeId, dyes.id))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .innerJoin(users, eq(measurements.createdBy, users.id))
    .where(eq(measurements.reviewState, "pending"))
    .orderBy(measurements.createdAt)
    .limit(limit)
    .all();
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
