import { randomUUID } from "node:crypto";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { calibrationOfProfile, correctionOfProfile } from "../../lib/lighting/calibration";
import type { ProfileForPipeline } from "../../lib/bench/pipeline";
import { instrumentColourToD65 } from "../../lib/bench/instrument";
import { checkReplicate, replicateFlags } from "../../lib/bench/replicates";
import { AppError } from "../../lib/errors";
import { matchSolvent } from "../../lib/solvents/match";
import type { InstrumentMeasurement } from "../../lib/validation/instrument";
import type { Db } from "../connection";
import {
  calibrationTargets,
  conditions,
  dyes,
  lightingProfiles,
  measurements,
  photos,
  rackTemplates,
  solventPanels,
  solvents,
  users,
  type AcidBase,
  type CorrectionKind,
  type NewMeasurement,
  type PanelEntry,
  type Region,
  type ReferenceUsed,
  type Role,
  type TemplateRegion,
} from "../schema";
import { recordAudit } from "./audit";
import { assertBenchProfile, recordPhotoChecks, recordPhotoDrift } from "./lighting";

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

/** Every field of a condition the bench records; numbers in the units of `conditions`. */
export type ConditionInput = {
  solventId: string;
  acidBase: AcidBase;
  ph: number | null;
  concentrationUmolL: number | null;
  additive?: string;
  additiveConcentrationMolL?: number | null;
  temperatureC?: number | null;
  pathLengthMm?: number | null;
  secondSolventId?: string | null;
  secondSolventMoleFraction?: number | null;
};

function normalizeCondition(c: ConditionInput) {
  return {
    solventId: c.solventId,
    acidBase: c.acidBase,
    ph: c.ph,
    concentrationUmolL: c.concentrationUmolL,
    additive: c.additive?.trim() ?? "",
    additiveConcentrationMolL: c.additiveConcentrationMolL ?? null,
    temperatureC: c.temperatureC ?? null,
    pathLengthMm: c.pathLengthMm ?? null,
    secondSolventId: c.secondSolventId || null,
    secondSolventMoleFraction: c.secondSolventId ? (c.secondSolventMoleFraction ?? null) : null,
  };
}

const sameValue = <T,>(column: Parameters<typeof eq>[0], v: T | null) => (v === null ? isNull(column) : eq(column, v));

/** The id of the condition with exactly these values (every recorded field), or undefined; creates nothing. */
export function findCondition(db: Db | Tx, input: ConditionInput): string | undefined {
  const c = normalizeCondition(input);
  return db
    .select({ id: conditions.id })
    .from(conditions)
    .where(
      and(
        eq(conditions.solventId, c.solventId),
        eq(conditions.acidBase, c.acidBase),
        sameValue(conditions.ph, c.ph),
        sameValue(conditions.concentrationUmolL, c.concentrationUmolL),
        eq(conditions.additive, c.additive),
        sameValue(conditions.additiveConcentrationMolL, c.additiveConcentrationMolL),
        sameValue(conditions.pathLengthMm, c.pathLengthMm),
        sameValue(conditions.temperatureC, c.temperatureC),
        sameValue(conditions.secondSolventId, c.secondSolventId),
        sameValue(conditions.secondSolventMoleFraction, c.secondSolventMoleFraction),
        isNull(conditions.ionicStrengthMolL),
      ),
    )
    .get()?.id;
}

/** The condition row for these values, made if no identical one exists yet. */
export function conditionFor(tx: Tx, actorId: string, input: ConditionInput): string {
  const existing = findCondition(tx, input);
  if (existing) return existing;
  const c = normalizeCondition(input);
  if (c.secondSolventId && !tx.select({ id: solvents.id }).from(solvents).where(eq(solvents.id, c.secondSolventId)).get()) {
    throw new AppError("invalid_input", "The second solvent of the blend is not in the solvent table; pick it from the list.", { secondSolventId: ["Unknown solvent."] });
  }
  const id = `cond_${randomUUID()}`;
  tx.insert(conditions).values({ id, ...c }).run();
  recordAudit(tx, { actorId, action: "condition.create", entity: "condition", entityId: id, after: c });
  return id;
}

/** Accepted colours of one dye in one condition (the earlier replicates a new colour is checked against), oldest first. */
export function acceptedReplicates(db: Db | Tx, { dyeId, conditionId, excludeIds = [] }: { dyeId: string; conditionId: string; excludeIds?: string[] }) {
  return db
    .select({ id: measurements.id, l: measurements.l, a: measurements.a, b: measurements.b, uDeltaE00: measurements.uDeltaE00, photoId: measurements.photoId, createdAt: measurements.createdAt })
    .from(measurements)
    .where(and(eq(measurements.dyeId, dyeId), eq(measurements.conditionId, conditionId), eq(measurements.reviewState, "accepted")))
    .orderBy(measurements.createdAt)
    .all()
    .filter((r) => !excludeIds.includes(r.id));
}

export type MeasurementToSave = ConditionInput & {
  region: Region;
  dyeId: string;
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
 * (reused when identical), one measurement per vial (pending review), a drift reading per in-photo
 * reference seen through the profile, a check reading per check standard in the photo, and an audit
 * entry for each change. A photo may hold only check standards (no vials). Any failure saves nothing.
 * The drift readings above the limit are returned so the caller can tell the admins after the commit.
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
    /** Check standards measured in the photo (CIELAB D65 from the same pipeline as the vials). */
    checks?: { standardId: string; labD65: [number, number, number] }[];
    /** Each reference's ΔE00 between what the profile alone sees and its known value, and the limit above which it is flagged. */
    drift?: { references: { label?: string; driftDeltaE00: number }[]; limit: number };
  },
): { ids: string[]; checks: { id: string; deltaE00: number }[]; driftFlagged: { label: string; deltaE00: number }[] } {
  return db.transaction((tx) => {
    const photo = tx.select().from(photos).where(eq(photos.id, input.photoId)).get();
    if (!photo) throw new AppError("not_found", "That photo no longer exists.");
    if (input.vials.length === 0 && (input.checks ?? []).length === 0) throw new AppError("invalid_input", "Mark at least one vial or check standard before saving.");
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
        conditionId: conditionFor(tx, input.actorId, v),
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
    const drift = input.drift ? recordPhotoDrift(tx, { actorId: input.actorId, profileId: input.lightingProfileId, photoId: photo.id, references: input.drift.references, limit: input.drift.limit }) : [];
    const checks = recordPhotoChecks(tx, { actorId: input.actorId, photoId: photo.id, profileId: input.lightingProfileId, readings: input.checks ?? [] });
    return { ids, checks, driftFlagged: drift.map((d) => ({ label: d.label, deltaE00: d.deltaE00 })) };
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

// ---------------------------------------------------------------- named bench records: rack layouts and solvent panels

/**
 * Rack layouts and solvent panels are saved by name and belong to the person who saved them first
 * (`created_by`): only they or an admin may overwrite or delete one. Everyone on the bench may apply them.
 */
const NAMED = {
  layout: { table: rackTemplates, field: "regions", entity: "rack_template", action: "rack-template", prefix: "rt" },
  panel: { table: solventPanels, field: "entries", entity: "solvent_panel", action: "solvent-panel", prefix: "sp" },
} as const;
type NamedKind = keyof typeof NAMED;
type NamedContent = { layout: TemplateRegion[]; panel: PanelEntry[] };
type Actor = { actorId: string; actorRole: Role };
// Both tables have id, name, created_by and updated_at; the content column is named per kind (NAMED[kind].field).
const namedTable = (kind: NamedKind) => NAMED[kind].table as typeof rackTemplates;
type NamedRow = { id: string; name: string; createdBy: string } & Record<string, unknown>;

function mayChangeNamed(tx: Pick<Db, "select">, kind: NamedKind, existing: NamedRow, { actorId, actorRole }: Actor) {
  if (existing.createdBy === actorId || actorRole === "admin") return;
  const owner = tx.select({ name: users.name }).from(users).where(eq(users.id, existing.createdBy)).get()?.name ?? "someone else";
  throw new AppError("forbidden", `The ${kind} “${existing.name}” belongs to ${owner}; only they or an admin may change or delete it. Save yours under another name.`);
}

/** Saves a layout or panel under a name, with its audit entry; saved again under the same name by its owner (or an admin), it replaces the old one. */
function saveNamed<K extends NamedKind>(db: Db, kind: K, { actorId, actorRole, name, content, check }: Actor & { name: string; content: NamedContent[K]; check?: (tx: Tx) => void }): string {
  const { field, entity, action, prefix } = NAMED[kind];
  const table = namedTable(kind);
  return db.transaction((tx) => {
    check?.(tx);
    const existing = tx.select().from(table).where(eq(table.name, name)).get() as NamedRow | undefined;
    if (existing) {
      mayChangeNamed(tx, kind, existing, { actorId, actorRole });
      tx.update(table).set({ [field]: content, updatedAt: new Date() }).where(eq(table.id, existing.id)).run();
      recordAudit(tx, { actorId, action: `${action}.update`, entity, entityId: existing.id, before: { [field]: existing[field] }, after: { [field]: content } });
      return existing.id;
    }
    const id = `${prefix}_${randomUUID()}`;
    tx.insert(table).values({ id, name, [field]: content, createdBy: actorId } as unknown as typeof rackTemplates.$inferInsert).run();
    recordAudit(tx, { actorId, action: `${action}.create`, entity, entityId: id, after: { name, [field]: content } });
    return id;
  });
}

/** Deletes a layout or panel (owner or admin only), with its audit entry. */
function deleteNamed(db: Db, kind: NamedKind, { actorId, actorRole, id }: Actor & { id: string }) {
  const { field, entity, action } = NAMED[kind];
  const table = namedTable(kind);
  db.transaction((tx) => {
    const existing = tx.select().from(table).where(eq(table.id, id)).get() as NamedRow | undefined;
    if (!existing) throw new AppError("not_found", `That ${kind} no longer exists.`);
    mayChangeNamed(tx, kind, existing, { actorId, actorRole });
    tx.delete(table).where(eq(table.id, id)).run();
    recordAudit(tx, { actorId, action: `${action}.delete`, entity, entityId: id, before: { name: existing.name, [field]: existing[field] } });
  });
}

export function listRackTemplates(db: Db) {
  return db.select().from(rackTemplates).orderBy(rackTemplates.name).all();
}

export function saveRackTemplate(db: Db, { actorId, actorRole, name, regions }: Actor & { name: string; regions: TemplateRegion[] }) {
  return saveNamed(db, "layout", { actorId, actorRole, name, content: regions });
}

export function deleteRackTemplate(db: Db, input: Actor & { id: string }) {
  deleteNamed(db, "layout", input);
}

export function listSolventPanels(db: Db) {
  return db.select().from(solventPanels).orderBy(solventPanels.name).all();
}

export function saveSolventPanel(db: Db, { actorId, actorRole, name, entries }: Actor & { name: string; entries: PanelEntry[] }) {
  return saveNamed(db, "panel", {
    actorId,
    actorRole,
    name,
    content: entries,
    check: (tx) => {
      for (const [i, e] of entries.entries()) {
        for (const sid of [e.solventId, e.secondSolventId].filter((x): x is string => !!x)) {
          if (!tx.select({ id: solvents.id }).from(solvents).where(eq(solvents.id, sid)).get()) {
            throw new AppError("invalid_input", `Place ${i + 1} of the panel names a solvent that is not in the solvent table; pick it from the list.`);
          }
        }
      }
    },
  });
}

export function deleteSolventPanel(db: Db, input: Actor & { id: string }) {
  deleteNamed(db, "panel", input);
}

/** Earlier accepted colours of a dye in the condition with exactly these values (none when no such condition exists yet). */
export function earlierReplicates(db: Db, { dyeId, condition, excludeIds }: { dyeId: string; condition: ConditionInput; excludeIds?: string[] }) {
  const conditionId = findCondition(db, condition);
  return conditionId ? acceptedReplicates(db, { dyeId, conditionId, excludeIds }) : [];
}

/** For each measurement, the accepted colours of the same dye and condition other than itself. */
export function earlierForMeasurements(db: Db, rows: { id: string; dyeId: string; conditionId: string }[]) {
  const byKey = new Map<string, ReturnType<typeof acceptedReplicates>>();
  const out = new Map<string, [number, number, number][]>();
  for (const r of rows) {
    const key = `${r.dyeId}|${r.conditionId}`;
    if (!byKey.has(key)) byKey.set(key, acceptedReplicates(db, { dyeId: r.dyeId, conditionId: r.conditionId }));
    out.set(
      r.id,
      byKey
        .get(key)!
        .filter((e) => e.id !== r.id)
        .map((e) => [e.l, e.a, e.b]),
    );
  }
  return out;
}

// ---------------------------------------------------------------- colours measured with an instrument

export type InstrumentColourToSave = {
  dyeId: string;
  condition: ConditionInput;
  /** CIELAB D65 (already adapted when measured under D50), XYZ with Y of the white = 100, linear sRGB equivalent. */
  lab: [number, number, number];
  xyz: [number, number, number];
  linearRgb: [number, number, number];
  /** As sent, before adaptation, for the audit log. */
  sent: { lab: [number, number, number]; whitePoint: string };
  instrument: string;
  uncertaintyDeltaE00: number | null;
  flags: string[];
  flagReason: string | null;
};

/**
 * Saves colours measured with an instrument in one transaction, pending review like photographed
 * ones, each with its condition (reused when identical) and an audit entry. Any failure saves nothing.
 */
export function saveInstrumentMeasurements(db: Db, { actorId, items }: { actorId: string; items: InstrumentColourToSave[] }): string[] {
  return db.transaction((tx) => {
    const ids: string[] = [];
    for (const [i, v] of items.entries()) {
      if (v.flags.length > 0 && !v.flagReason) {
        throw new AppError("invalid_input", `Measurement ${i + 1} is flagged (${v.flags.join(", ")}); send flagReason saying why it should be kept, or measure again.`, { [`${i}.flagReason`]: ["Give a reason to keep a flagged measurement."] });
      }
      const id = `ms_${randomUUID()}`;
      tx.insert(measurements)
        .values({
          id,
          photoId: null,
          region: null,
          dyeId: v.dyeId,
          conditionId: conditionFor(tx, actorId, v.condition),
          lightingProfileId: null,
          correctionKind: null,
          correction: null,
          referencePatches: null,
          rawR: v.linearRgb[0],
          rawG: v.linearRgb[1],
          rawB: v.linearRgb[2],
          x: v.xyz[0],
          y: v.xyz[1],
          z: v.xyz[2],
          l: v.lab[0],
          a: v.lab[1],
          b: v.lab[2],
          illuminant: "D65",
          observer: "CIE 1931 2°",
          pixelCount: 0,
          rejectedCount: 0,
          spread: 0,
          uDeltaE00: v.uncertaintyDeltaE00,
          flags: v.flags,
          flagReason: v.flags.length ? v.flagReason : null,
          instrument: v.instrument,
          reviewState: "pending",
          createdBy: actorId,
        })
        .run();
      recordAudit(tx, {
        actorId,
        action: "measurement.create",
        entity: "measurement",
        entityId: id,
        after: { dyeId: v.dyeId, lab: v.lab, sent: v.sent, instrument: v.instrument, flags: v.flags, flagReason: v.flagReason, uncertaintyDeltaE00: v.uncertaintyDeltaE00 },
      });
      ids.push(id);
    }
    return ids;
  });
}

type InstrumentCondition = InstrumentMeasurement["condition"];
type FieldError = { field: string; message: string };

/** The catalogue and solvent-table rows an instrument upload is resolved against; read once per batch. */
export function instrumentLookups(db: Db) {
  return {
    solventRows: db.select({ id: solvents.id, name: solvents.name, synonyms: solvents.synonyms }).from(solvents).all(),
    dyeRows: db.select({ id: dyes.id, code: dyes.code }).from(dyes).all(),
  };
}

/**
 * A dye named by code or id and a condition named in words (solvent names or synonyms), resolved against
 * the catalogue and the solvent table: the dye's id and the condition's stored values, or the problems
 * named by field. Shared by instrument colours and spectra (write API, imports, uploads).
 */
export function resolveDyeAndCondition(
  { solventRows, dyeRows }: ReturnType<typeof instrumentLookups>,
  { dye: dyeText, condition: c }: { dye: string; condition: Omit<InstrumentCondition, "concentrationUmolL" | "pathLengthMm"> & { concentrationUmolL: number | null; pathLengthMm: number | null } },
): { ok: true; dyeId: string; condition: ConditionInput } | { ok: false; errors: FieldError[] } {
  const errors: FieldError[] = [];
  const q = dyeText.trim().toLowerCase();
  const dye = dyeRows.find((d) => d.id === dyeText.trim() || d.code.toLowerCase() === q);
  if (!dye) errors.push({ field: "dye", message: `No dye has the code or id “${dyeText}”; add it to the catalogue first.` });
  const solvent = matchSolvent(solventRows, c.solvent);
  if (!solvent) errors.push({ field: "solvent", message: `“${c.solvent}” is not in the solvent table; use a name or synonym from it, or ask an admin to add it.` });
  const second = c.secondSolvent ? matchSolvent(solventRows, c.secondSolvent) : null;
  if (c.secondSolvent && !second) errors.push({ field: "secondSolvent", message: `“${c.secondSolvent}” is not in the solvent table.` });
  if (second && !(c.secondSolventMoleFraction !== null && c.secondSolventMoleFraction > 0 && c.secondSolventMoleFraction < 1)) {
    errors.push({ field: "secondSolventMoleFraction", message: "Give the second solvent's mole fraction, between 0 and 1." });
  }
  if (c.additiveConcentrationMolL !== null && !c.additive) errors.push({ field: "additive", message: "Name the acid or base whose amount you gave (e.g. HCl)." });
  if (errors.length || !dye || !solvent) return { ok: false, errors };
  return {
    ok: true,
    dyeId: dye.id,
    condition: {
      solventId: solvent.id,
      acidBase: c.acidBase,
      ph: c.pH,
      concentrationUmolL: c.concentrationUmolL,
      additive: c.additive,
      additiveConcentrationMolL: c.additiveConcentrationMolL,
      temperatureC: c.temperatureC,
      pathLengthMm: c.pathLengthMm,
      secondSolventId: second?.id ?? null,
      secondSolventMoleFraction: second ? c.secondSolventMoleFraction : null,
    },
  };
}

/**
 * Checks colours measured with an instrument against the catalogue and the solvent table and brings
 * them to D65 (lib/bench/instrument.ts); adds the replicate and lightness flags. One result per input,
 * each either ready to save or with its problems named by field.
 */
export function prepareInstrumentMeasurements(db: Db, inputs: InstrumentMeasurement[]) {
  const lookups = instrumentLookups(db);
  return inputs.map((v): { ok: true; item: InstrumentColourToSave } | { ok: false; errors: FieldError[] } => {
    const resolved = resolveDyeAndCondition(lookups, v);
    if (!resolved.ok) return resolved;
    const { dyeId, condition } = resolved;
    const colour = instrumentColourToD65(v.lab, v.whitePoint);
    const earlier = earlierReplicates(db, { dyeId, condition });
    const verdict = checkReplicate(colour.lab, earlier.map((e) => [e.l, e.a, e.b]), v.uncertaintyDeltaE00 ?? null);
    return {
      ok: true,
      item: {
        dyeId,
        condition,
        lab: colour.lab,
        xyz: colour.xyz,
        linearRgb: colour.linearRgb,
        sent: { lab: v.lab, whitePoint: v.whitePoint },
        instrument: v.instrument,
        uncertaintyDeltaE00: v.uncertaintyDeltaE00 ?? null,
        flags: replicateFlags(colour.lab, verdict),
        flagReason: v.flagReason || null,
      },
    };
  });
}
