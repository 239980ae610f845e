/**
 * pH series grouped by chemists, and their stored pKa fits (lib/color/pka.ts). A series is a dye, a
 * medium (solvent, or a binary blend with x₂), an ionic strength and vials (measurements) each with its
 * pH. Its fit is kept in ph_series_fits with a cache key over the accepted vials (id, pH, CIELAB): the
 * fit is recomputed on the next read when the key no longer matches (a vial added, removed, re-pH'd,
 * accepted or rejected). Only accepted vials are fitted; pending ones are listed and wait for review.
 */
import { createHash, randomUUID } from "node:crypto";
import { and, asc, eq, inArray, isNotNull, isNull, ne } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import { ColorInputError } from "../../lib/color/errors";
import { fitPkaFromColours, type PkaFit } from "../../lib/color/pka";
import { fitTwoPkaFromColours, type PhFitSteps, type TwoStepPkaFit } from "../../lib/color/pka-two-step";
import type { Lab } from "../../lib/color/types";
import { AppError } from "../../lib/errors";
import type { TransitionCandidate } from "../../lib/search/ph-range";
import type { PhSeriesHead, PhSeriesInput } from "../../lib/validation/ph-series";
import type { Db } from "../connection";
import { conditions, dyes, measurements, phSeries, phSeriesFits, phSeriesVials, solvents, type Medium, type ReviewState } from "../schema";
import { phSeriesForDye } from "./acid-base";
import { recordAudit } from "./audit";
import { saveInstrumentMeasurements, type InstrumentColourToSave } from "./bench";

/** Bump when the fit or what is stored changes, so every stored fit is recomputed. 2: `steps` and the two-step fit. */
export const PH_FIT_VERSION = 2;

/**
 * The stored fit. `steps` is the chemist's choice for the series (one colour change or two, default 1);
 * it is kept in this row (no column of its own) and carried over whenever the fit is redone.
 */
export type StoredPhFit =
  | { ok: true; steps: 1; fit: PkaFit; vials: number }
  | { ok: true; steps: 2; fit: TwoStepPkaFit; vials: number }
  | { ok: false; steps: PhFitSteps; error: string; vials: number };

/** The steps a stored result asks for (rows written before version 2 have none: one step). */
const stepsOf = (result: unknown): PhFitSteps => ((result as { steps?: unknown } | undefined)?.steps === 2 ? 2 : 1);

const second = alias(solvents, "second_solvent");

export type PhSeriesSummary = {
  id: string;
  name: string;
  dye: { id: string; code: string; name: string };
  solvent: { id: string; name: string; medium: Medium };
  secondSolvent: { id: string; name: string } | null;
  secondSolventMoleFraction: number | null;
  ionicStrengthMolL: number | null;
  notes: string;
  /** "Water", or "Ethanol + Water, x₂ = 0.25". */
  mediumLabel: string;
};

function mediumLabel(solvent: string, secondName: string | null, x2: number | null): string {
  return secondName ? `${solvent} + ${secondName}, x₂ = ${x2}` : solvent;
}

function summaries(db: Db, where: { dyeId?: string; id?: string }): PhSeriesSummary[] {
  const cond = where.id ? eq(phSeries.id, where.id) : where.dyeId ? eq(phSeries.dyeId, where.dyeId) : undefined;
  return db
    .select({ s: phSeries, dye: { id: dyes.id, code: dyes.code, name: dyes.name }, solvent: { id: solvents.id, name: solvents.name, medium: solvents.medium }, second: { id: second.id, name: second.name } })
    .from(phSeries)
    .innerJoin(dyes, eq(phSeries.dyeId, dyes.id))
    .innerJoin(solvents, eq(phSeries.solventId, solvents.id))
    .leftJoin(second, eq(phSeries.secondSolventId, second.id))
    .where(cond)
    .orderBy(asc(dyes.code), asc(phSeries.name))
    .all()
    .map(({ s, dye, solvent, second: sec }) => ({
      id: s.id,
      name: s.name,
      dye,
      solvent,
      secondSolvent: sec?.id ? { id: sec.id, name: sec.name } : null,
      secondSolventMoleFraction: s.secondSolventMoleFraction,
      ionicStrengthMolL: s.ionicStrengthMolL,
      notes: s.notes,
      mediumLabel: mediumLabel(solvent.name, sec?.id ? sec.name : null, s.secondSolventMoleFraction),
    }));
}

/** Every series (or one dye's), by dye code then name. */
export function listPhSeries(db: Db, { dyeId }: { dyeId?: string } = {}): PhSeriesSummary[] {
  return summaries(db, { dyeId });
}

export type SeriesVial = { measurementId: string; pH: number; lab: Lab; reviewState: ReviewState; conditionPh: number | null; acidBase: string; additive: string; source: string; createdAt: Date };

function vialRows(db: Db, seriesId: string): SeriesVial[] {
  return db
    .select({ v: phSeriesVials, m: measurements, c: conditions })
    .from(phSeriesVials)
    .innerJoin(measurements, eq(phSeriesVials.measurementId, measurements.id))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .where(eq(phSeriesVials.seriesId, seriesId))
    .all()
    .map(({ v, m, c }) => ({
      measurementId: m.id,
      pH: v.ph,
      lab: [m.l, m.a, m.b] as Lab,
      reviewState: m.reviewState,
      conditionPh: c.ph,
      acidBase: c.acidBase,
      additive: c.additive,
      source: m.instrument ?? (m.photoId ? "photo" : "—"),
      createdAt: m.createdAt,
    }))
    .sort((p, q) => p.pH - q.pH || p.measurementId.localeCompare(q.measurementId));
}

export function getPhSeries(db: Db, { id }: { id: string }): (PhSeriesSummary & { vials: SeriesVial[] }) | null {
  const [s] = summaries(db, { id });
  return s ? { ...s, vials: vialRows(db, id) } : null;
}

export type CandidateVial = { measurementId: string; lab: Lab; reviewState: ReviewState; conditionPh: number | null; acidBase: string; additive: string; source: string; createdAt: Date };

/** The dye's measurements in this medium that may join a series: accepted or pending (never rejected). */
export function candidateVials(db: Db, { dyeId, solventId, secondSolventId, secondSolventMoleFraction }: { dyeId: string; solventId: string; secondSolventId: string | null; secondSolventMoleFraction: number | null }): CandidateVial[] {
  return db
    .select({ m: measurements, c: conditions })
    .from(measurements)
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .where(and(eq(measurements.dyeId, dyeId), ne(measurements.reviewState, "rejected"), eq(conditions.solventId, solventId), secondSolventId ? eq(conditions.secondSolventId, secondSolventId) : isNull(conditions.secondSolventId)))
    .all()
    .filter(({ c }) => !secondSolventId || sameFraction(c.secondSolventMoleFraction, secondSolventMoleFraction))
    .map(({ m, c }) => ({ measurementId: m.id, lab: [m.l, m.a, m.b] as Lab, reviewState: m.reviewState, conditionPh: c.ph, acidBase: c.acidBase, additive: c.additive, source: m.instrument ?? (m.photoId ? "photo" : "—"), createdAt: m.createdAt }))
    .sort((p, q) => (p.conditionPh ?? 99) - (q.conditionPh ?? 99) || p.createdAt.getTime() - q.createdAt.getTime());
}

const sameFraction = (p: number | null, q: number | null) => p !== null && q !== null && Math.abs(p - q) < 1e-9;

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];

function checkHead(tx: Db | Tx, head: PhSeriesHead) {
  if (!tx.select({ id: dyes.id }).from(dyes).where(eq(dyes.id, head.dyeId)).get()) throw new AppError("invalid_input", "That dye is not in the catalogue; choose it from the list.", { dyeId: ["Unknown dye."] });
  for (const [field, id] of [["solventId", head.solventId], ["secondSolventId", head.secondSolventId]] as const) {
    if (id && !tx.select({ id: solvents.id }).from(solvents).where(eq(solvents.id, id)).get()) throw new AppError("invalid_input", "That solvent is not in the solvent table; choose it from the list.", { [field]: ["Unknown solvent."] });
  }
}

/** Every vial must be a measurement of the series' dye in its medium, not rejected. */
function checkVials(tx: Db | Tx, head: PhSeriesHead, vials: PhSeriesInput["vials"]) {
  const ids = vials.map((v) => v.measurementId);
  const rows = new Map(
    tx
      .select({ id: measurements.id, dyeId: measurements.dyeId, state: measurements.reviewState, solventId: conditions.solventId, secondId: conditions.secondSolventId, x2: conditions.secondSolventMoleFraction })
      .from(measurements)
      .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
      .where(inArray(measurements.id, ids))
      .all()
      .map((r) => [r.id, r]),
  );
  for (const id of ids) {
    const r = rows.get(id);
    if (!r) throw new AppError("invalid_input", `Measurement ${id} does not exist; reload the page and select the vials again.`);
    if (r.dyeId !== head.dyeId) throw new AppError("invalid_input", `Measurement ${id} is of another dye; a series holds one dye only.`);
    if (r.state === "rejected") throw new AppError("invalid_input", `Measurement ${id} was rejected in review; leave it out of the series.`);
    const sameMedium = r.solventId === head.solventId && (head.secondSolventId ? r.secondId === head.secondSolventId && sameFraction(r.x2, head.secondSolventMoleFraction) : r.secondId === null);
    if (!sameMedium) throw new AppError("invalid_input", `Measurement ${id} was made in another medium; a series holds vials of one medium only.`);
  }
}

function headColumns(head: PhSeriesHead) {
  return {
    dyeId: head.dyeId,
    name: head.name,
    solventId: head.solventId,
    secondSolventId: head.secondSolventId,
    secondSolventMoleFraction: head.secondSolventId ? head.secondSolventMoleFraction : null,
    ionicStrengthMolL: head.ionicStrengthMolL,
    notes: head.notes,
  };
}

function nameTaken(tx: Db | Tx, head: PhSeriesHead, exceptId?: string) {
  const other = tx.select({ id: phSeries.id }).from(phSeries).where(and(eq(phSeries.dyeId, head.dyeId), eq(phSeries.name, head.name))).get();
  if (other && other.id !== exceptId) throw new AppError("conflict", `This dye already has a series called “${head.name}”; choose another name.`, { name: ["Name in use for this dye."] });
}

function writeSeries(tx: Db | Tx, actorId: string, input: PhSeriesInput): string {
  checkHead(tx, input.head);
  checkVials(tx, input.head, input.vials);
  const before = input.id ? tx.select().from(phSeries).where(eq(phSeries.id, input.id)).get() : undefined;
  if (input.id && !before) throw new AppError("not_found", "That series no longer exists.");
  nameTaken(tx, input.head, input.id);
  const id = input.id ?? `phs_${randomUUID()}`;
  const beforeVials = input.id ? tx.select({ measurementId: phSeriesVials.measurementId, pH: phSeriesVials.ph }).from(phSeriesVials).where(eq(phSeriesVials.seriesId, id)).all() : [];
  if (before) tx.update(phSeries).set({ ...headColumns(input.head), updatedAt: new Date() }).where(eq(phSeries.id, id)).run();
  else tx.insert(phSeries).values({ id, ...headColumns(input.head), createdBy: actorId }).run();
  tx.delete(phSeriesVials).where(eq(phSeriesVials.seriesId, id)).run();
  for (const v of input.vials) tx.insert(phSeriesVials).values({ seriesId: id, measurementId: v.measurementId, ph: v.pH }).run();
  recordAudit(tx, {
    actorId,
    action: before ? "ph-series.update" : "ph-series.create",
    entity: "ph_series",
    entityId: id,
    before: before ? { ...headColumns(before as PhSeriesHead), vials: beforeVials } : null,
    after: { ...headColumns(input.head), vials: input.vials },
  });
  return id;
}

/** Creates the series (no id) or replaces its head and vials (id), in one transaction with its audit entry. */
export function savePhSeries(db: Db, { actorId, input }: { actorId: string; input: PhSeriesInput }): string {
  return db.transaction((tx) => writeSeries(tx, actorId, input));
}

export function deletePhSeries(db: Db, { actorId, id }: { actorId: string; id: string }): void {
  db.transaction((tx) => {
    const before = tx.select().from(phSeries).where(eq(phSeries.id, id)).get();
    if (!before) throw new AppError("not_found", "That series no longer exists.");
    tx.delete(phSeries).where(eq(phSeries.id, id)).run();
    recordAudit(tx, { actorId, action: "ph-series.delete", entity: "ph_series", entityId: id, before });
  });
}

/**
 * Stores colours measured with an instrument (pending review, like POST /api/measurements) and groups
 * them into a new series, all in one transaction: a refusal anywhere stores nothing.
 */
export function importPhSeries(db: Db, { actorId, head, items }: { actorId: string; head: PhSeriesHead; items: { pH: number; item: InstrumentColourToSave }[] }): { id: string; measurementIds: string[] } {
  return db.transaction((tx) => {
    checkHead(tx, head);
    nameTaken(tx, head);
    // better-sqlite3 nests this transaction as a savepoint of the outer one.
    const measurementIds = saveInstrumentMeasurements(db, { actorId, items: items.map((i) => i.item) });
    const id = writeSeries(tx, actorId, { head, vials: measurementIds.map((measurementId, k) => ({ measurementId, pH: items[k].pH })) });
    return { id, measurementIds };
  });
}

// ---------------------------------------------------------------- stored fits

function fitInputs(db: Db, seriesId: string) {
  return vialRows(db, seriesId).filter((v) => v.reviewState === "accepted");
}

function cacheKeyOf(vials: readonly SeriesVial[], steps: PhFitSteps): string {
  const h = createHash("sha256");
  h.update(`v${PH_FIT_VERSION} steps ${steps}\n`);
  for (const v of vials) h.update(`${v.measurementId}|${v.pH}|${v.lab.join("|")}\n`);
  return h.digest("hex").slice(0, 32);
}

function computeFit(vials: readonly SeriesVial[], steps: PhFitSteps): StoredPhFit {
  const points = vials.map((v) => ({ pH: v.pH, lab: v.lab }));
  try {
    return steps === 2 ? { ok: true, steps, fit: fitTwoPkaFromColours(points), vials: vials.length } : { ok: true, steps, fit: fitPkaFromColours(points), vials: vials.length };
  } catch (error) {
    if (!(error instanceof ColorInputError)) throw error;
    return { ok: false, steps, error: error.message, vials: vials.length };
  }
}

/** The fitted pKa('s) of a result, for audit entries and messages. */
export function fittedPkas(result: StoredPhFit): number[] {
  return !result.ok ? [] : result.steps === 2 ? result.fit.pKas : [result.fit.pKa];
}

/**
 * The series' fit: the stored one while its cache key matches the accepted vials and the steps asked
 * for, else fitted again and stored. `steps` changes the chemist's choice (audited with `actorId`);
 * without it the stored choice holds.
 */
export function ensurePhSeriesFit(db: Db, { seriesId, steps: asked, actorId = null }: { seriesId: string; steps?: PhFitSteps; actorId?: string | null }): StoredPhFit {
  const vials = fitInputs(db, seriesId);
  const stored = db.select().from(phSeriesFits).where(eq(phSeriesFits.seriesId, seriesId)).get();
  const steps = asked ?? stepsOf(stored?.result);
  const key = cacheKeyOf(vials, steps);
  if (stored && stored.cacheKey === key) return stored.result as StoredPhFit;
  const result = computeFit(vials, steps);
  const row = { cacheKey: key, version: PH_FIT_VERSION, result, computedAt: new Date() };
  db.transaction((tx) => {
    // The series may have been deleted while the fit ran.
    if (!tx.select({ id: phSeries.id }).from(phSeries).where(eq(phSeries.id, seriesId)).get()) return;
    tx.insert(phSeriesFits).values({ seriesId, ...row }).onConflictDoUpdate({ target: phSeriesFits.seriesId, set: row }).run();
    recordAudit(tx, {
      actorId,
      action: asked !== undefined && asked !== stepsOf(stored?.result) ? "ph-fit.steps" : "ph-fit.recompute",
      entity: "ph_series",
      entityId: seriesId,
      before: stored ? { cacheKey: stored.cacheKey, steps: stepsOf(stored.result) } : null,
      after: { cacheKey: key, steps, pKa: fittedPkas(result) },
    });
  });
  return result;
}

/** Brings every series' stored fit up to date; returns how many were fitted again. */
export function ensureAllPhSeriesFits(db: Db): number {
  let n = 0;
  for (const { id } of db.select({ id: phSeries.id }).from(phSeries).all()) {
    const before = db.select({ key: phSeriesFits.cacheKey }).from(phSeriesFits).where(eq(phSeriesFits.seriesId, id)).get()?.key;
    const stored = db.select({ result: phSeriesFits.result }).from(phSeriesFits).where(eq(phSeriesFits.seriesId, id)).get();
    if (before !== cacheKeyOf(fitInputs(db, id), stepsOf(stored?.result))) {
      ensurePhSeriesFit(db, { seriesId: id });
      n++;
    }
  }
  return n;
}

export type DyePageSeries = PhSeriesSummary & { vials: SeriesVial[]; fitted: SeriesVial[]; pending: number; fit: StoredPhFit };

/** A dye's series for its page: each with its vials and its (fresh) stored fit. */
export function phSeriesWithFits(db: Db, { dyeId }: { dyeId: string }): DyePageSeries[] {
  return summaries(db, { dyeId }).map((s) => {
    const vials = vialRows(db, s.id);
    return { ...s, vials, fitted: vials.filter((v) => v.reviewState === "accepted"), pending: vials.filter((v) => v.reviewState === "pending").length, fit: ensurePhSeriesFit(db, { seriesId: s.id }) };
  });
}

/** Every series with a fitted pKa, as candidates for "changes colour between pH x and y" (fits brought up to date first). */
export function transitionCandidates(db: Db, { solventId, media }: { solventId?: string; media?: readonly Medium[] } = {}): TransitionCandidate[] {
  ensureAllPhSeriesFits(db);
  const fits = new Map(db.select().from(phSeriesFits).all().map((r) => [r.seriesId, r.result as StoredPhFit]));
  return summaries(db, {})
    .filter((s) => (!solventId || s.solvent.id === solventId) && (!media || media.includes(s.solvent.medium)))
    .flatMap((s): TransitionCandidate[] => {
      const f = fits.get(s.id);
      if (!f?.ok) return [];
      const series = { id: s.id, name: s.name, medium: s.mediumLabel, solventId: s.solvent.id, ionicStrengthMolL: s.ionicStrengthMolL };
      // A two-step indicator changes colour twice: each step is a candidate with its own end colours.
      if (f.steps === 2) {
        return ([0, 1] as const).map((i) => ({
          dye: s.dye,
          series,
          pKa: f.fit.pKas[i],
          pKaStdErr: Number.isFinite(f.fit.pKaStdErrs[i]) ? f.fit.pKaStdErrs[i] : null,
          transition: f.fit.transitions[i],
          thresholdDeltaE00: f.fit.transitionThresholdDeltaE00,
          acidLab: f.fit.labs[i],
          baseLab: f.fit.labs[i + 1],
          flags: [],
        }));
      }
      return [
        {
          dye: s.dye,
          series,
          pKa: f.fit.pKa,
          pKaStdErr: Number.isFinite(f.fit.pKaStdErr) ? f.fit.pKaStdErr : null,
          transition: f.fit.transition,
          thresholdDeltaE00: f.fit.transitionThresholdDeltaE00,
          acidLab: f.fit.acidLab,
          baseLab: f.fit.baseLab,
          flags: f.fit.flags,
        },
      ];
    });
}

/**
 * Groups the implicit series (accepted colours with a recorded pH, per solvent: phSeriesForDye) of
 * every dye that has no series yet into named series. The demo seed uses it so its indicator dyes
 * arrive grouped; returns how many series were made.
 */
export function groupImplicitSeries(db: Db, { actorId }: { actorId: string }): number {
  const grouped = new Set(db.select({ dyeId: phSeries.dyeId }).from(phSeries).all().map((r) => r.dyeId));
  const dyeIds = db
    .selectDistinct({ dyeId: measurements.dyeId })
    .from(measurements)
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .where(and(eq(measurements.reviewState, "accepted"), isNotNull(conditions.ph)))
    .all()
    .map((r) => r.dyeId)
    .filter((id) => !grouped.has(id));
  let n = 0;
  db.transaction((tx) => {
    for (const dyeId of dyeIds) {
      for (const s of phSeriesForDye(db, { dyeId })) {
        const id = `phs_${randomUUID()}`;
        const ionic = s.ionicStrengthsMolL.length === 1 ? s.ionicStrengthsMolL[0] : null;
        tx.insert(phSeries).values({ id, dyeId, name: `${s.solvent.name}, all recorded pH values`, solventId: s.solvent.id, ionicStrengthMolL: ionic, notes: s.additives.join("; "), createdBy: actorId }).run();
        for (const v of s.vials) tx.insert(phSeriesVials).values({ seriesId: id, measurementId: v.measurementId, ph: v.pH }).run();
        recordAudit(tx, { actorId, action: "ph-series.create", entity: "ph_series", entityId: id, after: { dyeId, solventId: s.solvent.id, vials: s.vials.length } });
        n++;
      }
    }
  });
  return n;
}
