/**
 * Lighting profiles (draft → approved → retired), calibration targets, check standards, drift
 * readings and re-derivation. Every change is one transaction with its audit entry.
 */
import { randomUUID } from "node:crypto";
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import { labD65ToLabD50, linearSrgbToLab, linearSrgbToXyz, type LabWhite } from "../../lib/color/convert";
import { deltaE00 } from "../../lib/color/difference";
import type { Lab } from "../../lib/color/types";
import { applyCorrection, correctionToArray, type Correction } from "../../lib/color/correction";
import { labToLinearSrgb } from "../../lib/color/convert";
import { scaleCorrection } from "../../lib/bench/pipeline";
import { applyCalibration, whiteAdaptation } from "../../lib/color/calibration";
import { calibrationOfProfile, correctionOfProfile, fitCard, withinTolerance, type CardFit, type ProfileMethod } from "../../lib/lighting/calibration";
import { patchRegions } from "../../lib/lighting/grid";
import { ColorInputError, measureRegion } from "../../lib/color/regions";
import type { ObjectStore } from "../../lib/storage/driver";
import { benchRefusal, profileStatus } from "../../lib/lighting/status";
import { AppError } from "../../lib/errors";
import type { Db } from "../connection";
import {
  calibrationTargets,
  checkReadings,
  checkStandards,
  driftReadings,
  type CheckStandard,
  lightingProfiles,
  measurements,
  users,
  type FitSample,
  type GridCorners,
  type IlluminantName,
  type LightingProfile,
  type TargetPatch,
} from "../schema";
import { recordAudit } from "./audit";
import { decodedPhoto, getPhoto } from "./photos";

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

// ---------------------------------------------------------------- profiles

export type ProfileFields = {
  name: string;
  illuminant: IlluminantName;
  lightSource: string;
  colourTemperatureK: number | null;
  camera: string;
  cameraSettings: string;
  targetId: string | null;
  method: ProfileMethod;
  validFrom: Date;
  validUntil: Date | null;
  notes: string;
};

export function listProfiles(db: Db) {
  return db
    .select({ profile: lightingProfiles, target: calibrationTargets })
    .from(lightingProfiles)
    .leftJoin(calibrationTargets, eq(lightingProfiles.targetId, calibrationTargets.id))
    .orderBy(desc(lightingProfiles.validFrom), asc(lightingProfiles.name))
    .all();
}

export function getProfile(db: Db | Tx, id: string): LightingProfile | undefined {
  return db.select().from(lightingProfiles).where(eq(lightingProfiles.id, id)).get();
}

/** Profiles a chemist may pick on the bench now: approved and inside their validity window. */
export function benchProfiles(db: Db, now: Date = new Date()) {
  return listProfiles(db)
    .filter(({ profile }) => profileStatus(profile, now) === "approved")
    .map(({ profile }) => ({ id: profile.id, name: profile.name }));
}

/**
 * Refuses (422, with the sentence to show) a profile that cannot be used on the bench: unknown, draft,
 * retired, expired or not yet valid. Called when a photo is uploaded and when vials are measured/saved.
 */
export function assertBenchProfile(db: Db | Tx, id: string, now: Date = new Date()): LightingProfile {
  const p = getProfile(db, id);
  if (!p) throw new AppError("invalid_input", "No lighting profile has that id; pick one from the list.", { lightingProfileId: ["Unknown lighting profile."] });
  const refusal = benchRefusal(p, now);
  if (refusal) throw new AppError("invalid_input", refusal, { lightingProfileId: [refusal] });
  return p;
}

function checkTarget(tx: Tx, targetId: string | null) {
  if (targetId && !tx.select({ id: calibrationTargets.id }).from(calibrationTargets).where(eq(calibrationTargets.id, targetId)).get()) {
    throw new AppError("invalid_input", "That calibration target no longer exists; pick another one.", { targetId: ["Unknown target."] });
  }
}

function checkWindow(f: Pick<ProfileFields, "validFrom" | "validUntil">) {
  if (f.validUntil && f.validUntil.getTime() <= f.validFrom.getTime()) {
    throw new AppError("invalid_input", "The end of the validity window must come after its start; change one of the two dates.", { validUntil: ["Must be after the start."] });
  }
}

function checkNameFree(tx: Tx, name: string, exceptId?: string) {
  const other = tx.select({ id: lightingProfiles.id }).from(lightingProfiles).where(eq(lightingProfiles.name, name)).get();
  if (other && other.id !== exceptId) throw new AppError("conflict", `A lighting profile is already called “${name}”; choose another name.`, { name: ["Name in use."] });
}

export function createDraftProfile(db: Db, { actorId, fields }: { actorId: string; fields: ProfileFields }): string {
  return db.transaction((tx) => {
    checkWindow(fields);
    checkTarget(tx, fields.targetId);
    checkNameFree(tx, fields.name);
    const id = `lp_${randomUUID()}`;
    tx.insert(lightingProfiles)
      .values({ id, ...fields, state: "draft", correctionKind: "none", correction: [], createdBy: actorId, updatedAt: new Date() })
      .run();
    recordAudit(tx, { actorId, action: "lighting-profile.create", entity: "lighting_profile", entityId: id, after: fields });
    return id;
  });
}

function draftOrRefuse(tx: Tx, id: string): LightingProfile {
  const p = getProfile(tx, id);
  if (!p) throw new AppError("not_found", "That lighting profile no longer exists.");
  if (p.state !== "draft") {
    throw new AppError("conflict", `“${p.name}” is ${p.state}; only a draft can be changed. ${p.state === "approved" ? "Reopen it as a draft first (its approval is then withdrawn)." : "Create a new draft instead."}`);
  }
  return p;
}

export function updateDraftProfile(db: Db, { actorId, id, fields }: { actorId: string; id: string; fields: ProfileFields }) {
  db.transaction((tx) => {
    const before = draftOrRefuse(tx, id);
    checkWindow(fields);
    checkTarget(tx, fields.targetId);
    checkNameFree(tx, fields.name, id);
    tx.update(lightingProfiles).set({ ...fields, updatedAt: new Date() }).where(eq(lightingProfiles.id, id)).run();
    recordAudit(tx, { actorId, action: "lighting-profile.update", entity: "lighting_profile", entityId: id, before: pick(before, Object.keys(fields)), after: fields });
  });
}

function pick(row: Record<string, unknown>, keys: string[]) {
  return Object.fromEntries(keys.map((k) => [k, row[k]]));
}

/** Stores a fit in a draft profile: the calibration, residuals (training + leave-one-out), the photo and grid it came from. */
export function saveProfileFit(
  db: Db,
  { actorId, id, fit, photoId, grid, samples }: { actorId: string; id: string; fit: CardFit; photoId: string | null; grid: GridCorners | null; samples: FitSample[] },
) {
  db.transaction((tx) => {
    const before = draftOrRefuse(tx, id);
    const stored = { kind: "calibration" as const, values: [] as number[] };
    const after = {
      correctionKind: stored.kind,
      correction: stored.values,
      calibration: fit.calibration as unknown as Record<string, unknown>,
      residuals: fit.residuals.map((r) => ({ patch: r.patch, deltaE00: r.deltaE00, looDeltaE00: Number.isFinite(r.looDeltaE00) ? r.looDeltaE00 : 999 })),
      looMeanDeltaE00: Number.isFinite(fit.looMean) ? fit.looMean : 999,
      looMaxDeltaE00: Number.isFinite(fit.looMax) ? fit.looMax : 999,
      fitPhotoId: photoId,
      fitGrid: grid,
      fitSamples: samples,
      updatedAt: new Date(),
    };
    tx.update(lightingProfiles).set(after).where(eq(lightingProfiles.id, id)).run();
    recordAudit(tx, {
      actorId,
      action: "lighting-profile.fit",
      entity: "lighting_profile",
      entityId: id,
      before: { correctionKind: before.correctionKind, correction: before.correction, looMeanDeltaE00: before.looMeanDeltaE00, looMaxDeltaE00: before.looMaxDeltaE00 },
      after: { method: fit.method, correctionKind: stored.kind, correction: stored.values, looMeanDeltaE00: after.looMeanDeltaE00, looMaxDeltaE00: after.looMaxDeltaE00, photoId },
    });
  });
}

/**
 * Approves a draft: records who and when. Refuses a profile without a fit, or whose leave-one-out
 * residuals are above the tolerance (default mean 2, max 4 ΔE00; common practice, no source).
 */
export function approveProfile(db: Db, { actorId, id, tolerance, now = new Date() }: { actorId: string; id: string; tolerance?: { meanDeltaE00: number; maxDeltaE00: number }; now?: Date }) {
  return db.transaction((tx) => {
    const p = draftOrRefuse(tx, id);
    if (p.correctionKind === "none" || !p.residuals) throw new AppError("conflict", `“${p.name}” has no fitted calibration yet; fit it from a card photo, then approve it.`);
    const check = withinTolerance({ looMean: p.looMeanDeltaE00, looMax: p.looMaxDeltaE00 }, tolerance);
    if (!check.ok) throw new AppError("conflict", check.reason);
    tx.update(lightingProfiles).set({ state: "approved", approvedBy: actorId, approvedAt: now, updatedAt: now }).where(eq(lightingProfiles.id, id)).run();
    recordAudit(tx, { actorId, action: "lighting-profile.approve", entity: "lighting_profile", entityId: id, before: { state: "draft" }, after: { state: "approved", approvedAt: now, looMeanDeltaE00: p.looMeanDeltaE00, looMaxDeltaE00: p.looMaxDeltaE00 } });
  });
}

/** Retires a profile (from draft or approved). Its measurements keep naming it; it can no longer be chosen. */
export function retireProfile(db: Db, { actorId, id, now = new Date() }: { actorId: string; id: string; now?: Date }) {
  db.transaction((tx) => {
    const p = getProfile(tx, id);
    if (!p) throw new AppError("not_found", "That lighting profile no longer exists.");
    if (p.state === "retired") throw new AppError("conflict", `“${p.name}” is already retired.`);
    tx.update(lightingProfiles).set({ state: "retired", retiredBy: actorId, retiredAt: now, updatedAt: now }).where(eq(lightingProfiles.id, id)).run();
    recordAudit(tx, { actorId, action: "lighting-profile.retire", entity: "lighting_profile", entityId: id, before: { state: p.state }, after: { state: "retired", retiredAt: now } });
  });
}

/**
 * Puts an approved profile back to draft so it can be re-fitted; its measurements keep their stored
 * colours until an admin re-derives them (nothing is recomputed silently).
 */
export function reopenProfile(db: Db, { actorId, id }: { actorId: string; id: string }) {
  db.transaction((tx) => {
    const p = getProfile(tx, id);
    if (!p) throw new AppError("not_found", "That lighting profile no longer exists.");
    if (p.state !== "approved") throw new AppError("conflict", `Only an approved profile can be reopened for a re-fit; “${p.name}” is ${p.state}.`);
    tx.update(lightingProfiles).set({ state: "draft", approvedBy: null, approvedAt: null, updatedAt: new Date() }).where(eq(lightingProfiles.id, id)).run();
    recordAudit(tx, { actorId, action: "lighting-profile.reopen", entity: "lighting_profile", entityId: id, before: { state: "approved", approvedBy: p.approvedBy, approvedAt: p.approvedAt }, after: { state: "draft" } });
  });
}

// ---------------------------------------------------------------- targets

export type TargetFields = {
  name: string;
  description: string;
  whitePoint: IlluminantName;
  source: string;
  gridRows: number | null;
  gridColumns: number | null;
  patches: TargetPatch[];
};

function checkTargetFields(f: TargetFields) {
  if (f.whitePoint === "A") throw new AppError("invalid_input", "Card values must be given under D65 or D50; convert them, or ask the card maker for D50 values.", { whitePoint: ["D65 or D50."] });
  if ((f.gridRows === null) !== (f.gridColumns === null)) throw new AppError("invalid_input", "Give both the number of rows and of columns of the card, or neither.", { gridRows: ["Both or neither."] });
  if (f.gridRows !== null && f.gridColumns !== null && f.gridRows * f.gridColumns !== f.patches.length) {
    throw new AppError("invalid_input", `A ${f.gridRows} × ${f.gridColumns} grid holds ${f.gridRows * f.gridColumns} patches but the target has ${f.patches.length}; fix the layout or the patch list.`, { gridRows: ["Rows × columns must equal the number of patches."] });
  }
  const names = new Set<string>();
  for (const p of f.patches) {
    if (names.has(p.name)) throw new AppError("invalid_input", `Two patches are called “${p.name}”; give every patch its own name.`, { patches: ["Duplicate patch name."] });
    names.add(p.name);
  }
}

export function getTarget(db: Db | Tx, id: string) {
  return db.select().from(calibrationTargets).where(eq(calibrationTargets.id, id)).get();
}

export function createTarget(db: Db, { actorId, fields }: { actorId: string; fields: TargetFields }): string {
  return db.transaction((tx) => {
    checkTargetFields(fields);
    if (tx.select({ id: calibrationTargets.id }).from(calibrationTargets).where(eq(calibrationTargets.name, fields.name)).get()) {
      throw new AppError("conflict", `A calibration target is already called “${fields.name}”; choose another name.`, { name: ["Name in use."] });
    }
    const id = `ct_${randomUUID()}`;
    tx.insert(calibrationTargets).values({ id, ...fields, updatedAt: new Date() }).run();
    recordAudit(tx, { actorId, action: "calibration-target.create", entity: "calibration_target", entityId: id, after: fields });
    return id;
  });
}

/**
 * Edits a target. A target whose values an approved profile was fitted with keeps those values:
 * changing them would silently change what the profile means, so make a new target instead.
 */
export function updateTarget(db: Db, { actorId, id, fields }: { actorId: string; id: string; fields: TargetFields }) {
  db.transaction((tx) => {
    const before = getTarget(tx, id);
    if (!before) throw new AppError("not_found", "That calibration target no longer exists.");
    checkTargetFields(fields);
    const other = tx.select({ id: calibrationTargets.id }).from(calibrationTargets).where(eq(calibrationTargets.name, fields.name)).get();
    if (other && other.id !== id) throw new AppError("conflict", `A calibration target is already called “${fields.name}”; choose another name.`, { name: ["Name in use."] });
    const valuesChanged = JSON.stringify(before.patches) !== JSON.stringify(fields.patches) || before.whitePoint !== fields.whitePoint;
    if (valuesChanged) {
      const used = tx
        .select({ name: lightingProfiles.name })
        .from(lightingProfiles)
        .where(and(eq(lightingProfiles.targetId, id), inArray(lightingProfiles.state, ["approved", "retired"])))
        .get();
      if (used) throw new AppError("conflict", `The approved profile “${used.name}” was fitted with these patch values; create a new target for new values.`);
    }
    tx.update(calibrationTargets).set({ ...fields, updatedAt: new Date() }).where(eq(calibrationTargets.id, id)).run();
    recordAudit(tx, { actorId, action: "calibration-target.update", entity: "calibration_target", entityId: id, before: pick(before, Object.keys(fields)), after: fields });
  });
}

// ---------------------------------------------------------------- check standards

export type CheckStandardFields = { name: string; kind: "vial" | "tile"; lab: Lab; whitePoint: "D65" | "D50"; sourceInstrument: string; notes: string };

/** Every check standard, retired ones included (the Lighting page lists them all), with its number of readings. */
export function listCheckStandards(db: Db) {
  return db
    // Spelled out: in a one-table select drizzle leaves column names unqualified, and "id" would be the reading's.
    .select({ standard: checkStandards, readings: sql<number>`(select count(*) from check_readings cr where cr.standard_id = check_standards.id)` })
    .from(checkStandards)
    .orderBy(checkStandards.name)
    .all()
    .map(({ standard, readings }) => ({ ...standard, readings }));
}

/** The check standards a chemist may mark on the bench: those not retired. */
export function benchCheckStandards(db: Db) {
  return db.select().from(checkStandards).where(isNull(checkStandards.retiredAt)).orderBy(checkStandards.name).all();
}

function checkStandardNameFree(tx: Tx, name: string, exceptId?: string) {
  const other = tx.select({ id: checkStandards.id }).from(checkStandards).where(eq(checkStandards.name, name)).get();
  if (other && other.id !== exceptId) throw new AppError("conflict", `A check standard is already called “${name}”; choose another name.`, { name: ["Name in use."] });
}

export function createCheckStandard(db: Db, { actorId, fields }: { actorId: string; fields: CheckStandardFields }): string {
  return db.transaction((tx) => {
    checkStandardNameFree(tx, fields.name);
    const id = `cs_${randomUUID()}`;
    const [l, a, b] = fields.lab;
    tx.insert(checkStandards).values({ id, name: fields.name, kind: fields.kind, l, a, b, whitePoint: fields.whitePoint, sourceInstrument: fields.sourceInstrument, notes: fields.notes, createdBy: actorId }).run();
    recordAudit(tx, { actorId, action: "check-standard.create", entity: "check_standard", entityId: id, after: fields });
    return id;
  });
}

const standardFields = (s: CheckStandard): CheckStandardFields => ({ name: s.name, kind: s.kind, lab: [s.l, s.a, s.b], whitePoint: s.whitePoint === "D50" ? "D50" : "D65", sourceInstrument: s.sourceInstrument, notes: s.notes });

/**
 * Edits a check standard. Once it has readings, its known value (L*, a*, b*, white point) is what
 * their ΔE00 were computed against: changing it would silently change what the history says, so it is
 * refused (register a new standard and retire this one). Name, kind, instrument and notes stay editable.
 */
export function updateCheckStandard(db: Db, { actorId, id, fields }: { actorId: string; id: string; fields: CheckStandardFields }) {
  db.transaction((tx) => {
    const before = tx.select().from(checkStandards).where(eq(checkStandards.id, id)).get();
    if (!before) throw new AppError("not_found", "That check standard no longer exists.");
    checkStandardNameFree(tx, fields.name, id);
    const valuesChanged = before.l !== fields.lab[0] || before.a !== fields.lab[1] || before.b !== fields.lab[2] || before.whitePoint !== fields.whitePoint;
    if (valuesChanged) {
      const readings = tx.select({ n: sql<number>`count(*)` }).from(checkReadings).where(eq(checkReadings.standardId, id)).get()?.n ?? 0;
      if (readings > 0) {
        const message = `“${before.name}” already has ${readings} reading${readings === 1 ? "" : "s"} whose ΔE00 were computed against its known value; that value can no longer change. Register the new value as a new check standard and retire this one.`;
        throw new AppError("conflict", message, { l: [message] });
      }
    }
    const [l, a, b] = fields.lab;
    tx.update(checkStandards)
      .set({ name: fields.name, kind: fields.kind, l, a, b, whitePoint: fields.whitePoint, sourceInstrument: fields.sourceInstrument, notes: fields.notes, updatedAt: new Date() })
      .where(eq(checkStandards.id, id))
      .run();
    recordAudit(tx, { actorId, action: "check-standard.update", entity: "check_standard", entityId: id, before: standardFields(before), after: fields });
  });
}

/** Retires a check standard: no longer offered on the bench; its readings stay in the profiles' check histories. */
export function retireCheckStandard(db: Db, { actorId, id, now = new Date() }: { actorId: string; id: string; now?: Date }) {
  db.transaction((tx) => {
    const s = tx.select().from(checkStandards).where(eq(checkStandards.id, id)).get();
    if (!s) throw new AppError("not_found", "That check standard no longer exists.");
    if (s.retiredAt) throw new AppError("conflict", `“${s.name}” is already retired.`);
    tx.update(checkStandards).set({ retiredAt: now, retiredBy: actorId, updatedAt: now }).where(eq(checkStandards.id, id)).run();
    recordAudit(tx, { actorId, action: "check-standard.retire", entity: "check_standard", entityId: id, before: { retiredAt: null }, after: { retiredAt: now } });
  });
}

const retiredRefusal = (s: CheckStandard) =>
  `The check standard “${s.name}” was retired on ${s.retiredAt!.toISOString().slice(0, 10)}; pick one in use from the list, or ask an admin.`;

/** Records a check standard as measured in a bench photo: its Lab (under the standard's white point) and ΔE00 to the known value. */
export function recordCheckReading(
  db: Db | Tx,
  { actorId, standardId, profileId, photoId, measuredLab }: { actorId: string; standardId: string; profileId: string | null; photoId: string | null; measuredLab: Lab },
) {
  const s = db.select().from(checkStandards).where(eq(checkStandards.id, standardId)).get();
  if (!s) throw new AppError("invalid_input", "That check standard is not registered; pick one from the list.", { checkStandardId: ["Unknown check standard."] });
  if (s.retiredAt) throw new AppError("invalid_input", retiredRefusal(s), { checkStandardId: ["Retired check standard."] });
  const dE = deltaE00(measuredLab, [s.l, s.a, s.b]);
  const id = `cr_${randomUUID()}`;
  db.insert(checkReadings).values({ id, standardId, profileId, photoId, l: measuredLab[0], a: measuredLab[1], b: measuredLab[2], deltaE00: dE, createdBy: actorId }).run();
  recordAudit(db, { actorId, action: "check-reading.create", entity: "check_reading", entityId: id, after: { standardId, profileId, photoId, lab: measuredLab, deltaE00: dE } });
  return { id, deltaE00: dE };
}

export function checkHistory(db: Db, { profileId }: { profileId: string }) {
  return db
    .select({ reading: checkReadings, standard: checkStandards.name, standardRetiredAt: checkStandards.retiredAt })
    .from(checkReadings)
    .innerJoin(checkStandards, eq(checkReadings.standardId, checkStandards.id))
    .where(eq(checkReadings.profileId, profileId))
    .orderBy(asc(checkReadings.createdAt))
    .all();
}

// ---------------------------------------------------------------- drift

export function driftHistory(db: Db, { profileId }: { profileId: string }) {
  return db.select().from(driftReadings).where(eq(driftReadings.profileId, profileId)).orderBy(asc(driftReadings.createdAt)).all();
}

/** One drift reading, audited under whoever saved the photo it was seen in (null: no person, e.g. a script). */
export function recordDrift(db: Db | Tx, { actorId = null, ...r }: { actorId?: string | null; profileId: string; photoId: string | null; label: string; deltaE00: number; thresholdDeltaE00: number }) {
  const id = `dr_${randomUUID()}`;
  const flagged = r.deltaE00 > r.thresholdDeltaE00;
  db.insert(driftReadings).values({ id, ...r, flagged }).run();
  recordAudit(db, { actorId, action: "drift-reading.create", entity: "drift_reading", entityId: id, after: { ...r, flagged } });
  return { id, flagged };
}

/** E-mail addresses of active admins (told about drift). */
export function adminEmails(db: Db): string[] {
  return db
    .select({ email: users.email, deactivatedAt: users.deactivatedAt, role: users.role })
    .from(users)
    .where(eq(users.role, "admin"))
    .all()
    .filter((u) => !u.deactivatedAt)
    .map((u) => u.email);
}

// ---------------------------------------------------------------- re-derivation

/** The correction a stored measurement would get today: the profile's, times the gains its own in-photo references give. */
function rederivedCorrection(base: Correction, refs: { rawLinearRgb: [number, number, number]; lab: Lab }[] | null, white: LabWhite): Correction {
  if (!refs || refs.length === 0) return base;
  const pairs = refs.map((r) => ({ measured: applyCorrection(base, r.rawLinearRgb), target: labToLinearSrgb(r.lab, white) }));
  const gains = [0, 1, 2].map((c) => {
    const num = pairs.reduce((s, p) => s + p.measured[c] * p.target[c], 0);
    const den = pairs.reduce((s, p) => s + p.measured[c] * p.measured[c], 0);
    return num / den;
  }) as [number, number, number];
  return scaleCorrection(base, gains);
}

export type RederiveChange = { id: string; before: Lab; after: Lab; deltaE00: number; correction: { kind: string; values: number[] }; xyz: [number, number, number] };

/**
 * What re-deriving every measurement under a profile from its raw linear RGB with the profile's
 * current calibration would change. Nothing is written.
 */
export function previewRederive(db: Db | Tx, { profileId, minDeltaE00 = 0.01 }: { profileId: string; minDeltaE00?: number }) {
  const p = getProfile(db, profileId);
  if (!p) throw new AppError("not_found", "That lighting profile no longer exists.");
  if (p.correctionKind === "none") throw new AppError("conflict", `“${p.name}” has no fitted calibration to re-derive with.`);
  const cal = calibrationOfProfile(p);
  const base = correctionOfProfile(p);
  const rows = db.select().from(measurements).where(eq(measurements.lightingProfileId, profileId)).all();
  const changes: RederiveChange[] = [];
  for (const m of rows) {
    const raw: [number, number, number] = [m.rawR, m.rawG, m.rawB];
    const refs = m.referencePatches ?? [];
    let after: Lab;
    let xyz: [number, number, number];
    let correction: { kind: string; values: number[] };
    if (cal) {
      // The engine calibration, then the day's white adaptation from the first stored reference (as on the bench).
      const adaptation = refs[0] ? whiteAdaptation(cal, refs[0].rawLinearRgb, refs[0].lab, "D65") : undefined;
      const c = applyCalibration(cal, raw, adaptation);
      after = c.labD65;
      xyz = c.xyzD65;
      correction = { kind: "calibration", values: adaptation ? adaptation.flat() : [] };
    } else {
      const corr = rederivedCorrection(base, refs.map((r) => ({ rawLinearRgb: r.rawLinearRgb, lab: r.lab })), "D65");
      const lin = applyCorrection(corr, raw);
      after = linearSrgbToLab(lin, "D65");
      xyz = linearSrgbToXyz(lin, "D65");
      correction = correctionToArray(corr);
    }
    const dE = deltaE00([m.l, m.a, m.b], after);
    if (dE >= minDeltaE00) changes.push({ id: m.id, before: [m.l, m.a, m.b], after, deltaE00: dE, correction, xyz });
  }
  const sorted = changes.map((c) => c.deltaE00).sort((a, b) => a - b);
  const q = (f: number) => (sorted.length ? sorted[Math.min(sorted.length - 1, Math.floor(f * sorted.length))] : 0);
  const bins = [0.5, 1, 2, 5, Infinity].map((upper, i, all) => ({
    from: i === 0 ? 0 : all[i - 1],
    to: upper,
    count: sorted.filter((d) => d >= (i === 0 ? 0 : all[i - 1]) && d < upper).length,
  }));
  return { profile: p, total: rows.length, changes, summary: { changed: changes.length, median: q(0.5), p95: q(0.95), max: sorted.at(-1) ?? 0, bins } };
}

/**
 * Re-derives every changed measurement under the profile in one transaction; each old value goes to
 * the audit log. `expected` is the count the admin saw in the preview: if it no longer matches, nothing
 * is written and the admin is asked to look again.
 */
export function applyRederive(db: Db, { actorId, profileId, expected }: { actorId: string; profileId: string; expected: number }) {
  return db.transaction((tx) => {
    const { changes } = previewRederive(tx, { profileId });
    if (changes.length !== expected) {
      throw new AppError("conflict", `The preview showed ${expected} changes but there are now ${changes.length}; look at the preview again before confirming.`);
    }
    for (const c of changes) {
      const before = tx.select().from(measurements).where(eq(measurements.id, c.id)).get()!;
      tx.update(measurements)
        .set({ l: c.after[0], a: c.after[1], b: c.after[2], x: c.xyz[0], y: c.xyz[1], z: c.xyz[2], correctionKind: c.correction.kind as LightingProfile["correctionKind"], correction: c.correction.values })
        .where(eq(measurements.id, c.id))
        .run();
      recordAudit(tx, {
        actorId,
        action: "measurement.rederive",
        entity: "measurement",
        entityId: c.id,
        before: { lab: [before.l, before.a, before.b], xyz: [before.x, before.y, before.z], correctionKind: before.correctionKind, correction: before.correction },
        after: { lab: c.after, xyz: c.xyz, correctionKind: c.correction.kind, correction: c.correction.values, deltaE00: c.deltaE00, profileId },
      });
    }
    return { changed: changes.length };
  });
}

// ---------------------------------------------------------------- fit from a card photo

/**
 * Samples a draft profile's card on a stored photo (grid corners placed by the admin), fits the
 * profile's method and stores the result in the draft. What the browser showed is not trusted: the
 * patches are measured again here on the stored photo.
 */
export async function fitProfileFromPhoto(
  db: Db,
  store: ObjectStore,
  { actorId, profileId, photoId, corners, maxPixels }: { actorId: string; profileId: string; photoId: string; corners: GridCorners; maxPixels: number },
) {
  const p = getProfile(db, profileId);
  if (!p) throw new AppError("not_found", "That lighting profile no longer exists.");
  if (p.state !== "draft") throw new AppError("conflict", `“${p.name}” is ${p.state}; reopen it as a draft before fitting it again.`);
  if (!p.targetId) throw new AppError("invalid_input", `Choose the calibration target of “${p.name}” first (edit the draft).`);
  const target = getTarget(db, p.targetId);
  if (!target) throw new AppError("invalid_input", "The profile's calibration target no longer exists; choose another.");
  if (!target.gridRows || !target.gridColumns) throw new AppError("invalid_input", `Give the target “${target.name}” its layout (rows × columns) before fitting from a photo.`);
  if (target.whitePoint === "A") throw new AppError("invalid_input", "Card values under illuminant A cannot be used; give them under D65 or D50.");
  const photo = getPhoto(db, photoId);
  if (!photo) throw new AppError("not_found", "That photo no longer exists; upload the card photo again.");
  const decoded = await decodedPhoto(store, photo, maxPixels);
  const regions = patchRegions(corners, target.gridRows, target.gridColumns);
  const samples: FitSample[] = [];
  try {
    regions.forEach((region, i) => {
      const stats = measureRegion(decoded, region);
      samples.push({ patch: target.patches[i].name, rawLinearRgb: stats.linearRgb, spread: stats.spread, flags: stats.flags, sd: stats.sd, pixels: stats.pixels - stats.rejected, clippedFraction: stats.clippedFraction });
    });
  } catch (error) {
    if (error instanceof ColorInputError) throw new AppError("invalid_input", `${error.message} Drag the grid's corners onto the card's corner patches.`);
    throw error;
  }
  const nonUniform = samples.find((s) => s.flags.includes("non-uniform") || s.flags.includes("much-rejected"));
  if (nonUniform) throw new AppError("invalid_input", `Patch “${nonUniform.patch}” is not one colour in the photo (glare, an edge or a shadow); move the grid's corners onto the card's corner patches, or photograph the card again.`);
  let fit: CardFit;
  try {
    fit = fitCard(
      samples.map((s, i) => ({ name: s.patch, measured: s.rawLinearRgb, lab: target.patches[i].lab, sd: s.sd, pixels: s.pixels, clippedFraction: s.clippedFraction, flags: s.flags })),
      target.whitePoint,
      (p.method as ProfileMethod | null) ?? "auto",
    );
  } catch (error) {
    if (error instanceof ColorInputError) throw new AppError("invalid_input", error.message);
    throw error;
  }
  saveProfileFit(db, { actorId, id: profileId, fit, photoId, grid: corners, samples });
  return { fit, samples, regions, target };
}

/**
 * Records the drift of every reference seen in a bench photo through its profile (ΔE00 between the
 * reference as the profile alone sees it and its known value), inside the caller's transaction when
 * given one (the bench save writes them with the vials). Returns the readings above the limit, so the
 * caller can tell the admins once the save is committed.
 */
export function recordPhotoDrift(
  db: Db | Tx,
  { actorId, profileId, photoId, references, limit }: { actorId: string | null; profileId: string | null; photoId: string; references: { label?: string; driftDeltaE00: number }[]; limit: number },
) {
  if (!profileId || references.length === 0) return [];
  return db.transaction((tx) =>
    references
      .map((r, i) => {
        const label = r.label || `reference ${i + 1}`;
        return { label, deltaE00: r.driftDeltaE00, ...recordDrift(tx, { actorId, profileId, photoId, label, deltaE00: r.driftDeltaE00, thresholdDeltaE00: limit }) };
      })
      .filter((r) => r.flagged),
  );
}

/** ± ΔE00 of stored measurements by id (null when not recorded), for search results and exports. */
export function uncertaintiesOf(db: Db, ids: string[]): Map<string, number | null> {
  if (ids.length === 0) return new Map();
  return new Map(db.select({ id: measurements.id, u: measurements.uDeltaE00 }).from(measurements).where(inArray(measurements.id, ids)).all().map((r) => [r.id, r.u]));
}

export function standardOrRefuse(db: Db, id: string) {
  const s = db.select().from(checkStandards).where(eq(checkStandards.id, id)).get();
  if (!s) throw new AppError("invalid_input", "A region names a check standard that is not registered; pick one from the Lighting page's list.", { checkStandards: ["Unknown check standard."] });
  if (s.retiredAt) throw new AppError("invalid_input", retiredRefusal(s), { checkStandards: ["Retired check standard."] });
  return s;
}

/** Records the check standards measured in one bench photo (Lab D65 from the pipeline, compared under each standard's own white point), in one transaction. */
export function recordPhotoChecks(
  db: Db | Tx,
  { actorId, photoId, profileId, readings }: { actorId: string; photoId: string; profileId: string | null; readings: { standardId: string; labD65: Lab }[] },
) {
  if (readings.length === 0) return [];
  return db.transaction((tx) =>
    readings.map((r) => {
      const s = tx.select().from(checkStandards).where(eq(checkStandards.id, r.standardId)).get();
      const lab = s?.whitePoint === "D50" ? labD65ToLabD50(r.labD65) : r.labD65;
      return recordCheckReading(tx, { actorId, standardId: r.standardId, profileId, photoId, measuredLab: lab });
    }),
  );
}
