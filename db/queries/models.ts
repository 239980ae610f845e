/**
 * Solvent models per dye (lib/models/dye-model.ts), kept apart from measurements. Lazy with a cache key:
 * the key fingerprints the dye's accepted neutral neat-solvent colours, its spectra in the same
 * conditions (their λmax) and the solvent table; a stored
 * model whose key differs is recomputed on the next read (dye page, model API, search with predictions).
 */
import { createHash } from "node:crypto";
import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { fitApparentBand } from "../../lib/color/band";
import { tuneDyeFromModel, type TuneDye } from "../../lib/models/tune";
import { computeDyeModel, DYE_MODEL_VERSION, spectrumBandsBySolvent, type DyeModel, type SolventColour, type TableSolvent } from "../../lib/models/dye-model";
import type { Lab } from "../../lib/color/types";
import type { Db } from "../connection";
import { conditions, dyeModels, dyePredictions, dyes, measurements, solvents, type Solvent } from "../schema";
import { conditionMatches, type ConditionFilter } from "../../lib/search/filters";
import { recordAudit } from "./audit";
import { spectraForModel } from "./spectra";

function parametersOf(s: Solvent) {
  return { piStar: s.ktPiStar, alpha: s.ktAlpha, beta: s.ktBeta, et30: s.et30, permittivity: s.permittivity };
}

export function solventTableForModels(db: Db): (TableSolvent & { medium: Solvent["medium"]; cautions: string })[] {
  return db
    .select()
    .from(solvents)
    .orderBy(asc(solvents.name))
    .all()
    .map((s) => ({ solventId: s.id, solvent: s.name, parameters: parametersOf(s), medium: s.medium, cautions: s.cautions }));
}

type InputRow = { id: string; l: number; a: number; b: number; solventId: string };

/** Accepted D65 colours of the dye's neutral form in neat solvents without additive, one mean per solvent. */
function modelInputs(db: Db, dyeId: string): { rows: InputRow[]; colours: SolventColour[] } {
  const rows = db
    .select({ id: measurements.id, l: measurements.l, a: measurements.a, b: measurements.b, solventId: conditions.solventId })
    .from(measurements)
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .where(
      and(
        eq(measurements.dyeId, dyeId),
        eq(measurements.reviewState, "accepted"),
        eq(measurements.illuminant, "D65"),
        eq(conditions.acidBase, "neutral"),
        isNull(conditions.secondSolventId),
        eq(conditions.additive, ""),
      ),
    )
    .orderBy(asc(measurements.id))
    .all();
  const bySolvent = new Map<string, InputRow[]>();
  for (const r of rows) bySolvent.set(r.solventId, [...(bySolvent.get(r.solventId) ?? []), r]);
  const table = new Map(db.select().from(solvents).all().map((s) => [s.id, s]));
  const colours: SolventColour[] = [...bySolvent.entries()]
    .map(([solventId, rs]) => {
      const s = table.get(solventId)!;
      const lab: Lab = [0, 1, 2].map((k) => rs.reduce((t, r) => t + [r.l, r.a, r.b][k], 0) / rs.length) as Lab;
      return { solventId, solvent: s.name, parameters: parametersOf(s), lab, replicates: rs.length };
    })
    .sort((p, q) => p.solvent.localeCompare(q.solvent));
  return { rows, colours };
}

type SpectrumRow = ReturnType<typeof spectraForModel>[number];

function cacheKeyOf(rows: readonly InputRow[], table: readonly TableSolvent[], spectra: readonly SpectrumRow[]): string {
  const h = createHash("sha256");
  h.update(`v${DYE_MODEL_VERSION}\n`);
  for (const r of rows) h.update(`${r.id}|${r.solventId}|${r.l}|${r.a}|${r.b}\n`);
  // A new (or removed) spectrum changes the band positions the scales may be fitted on.
  for (const s of spectra) h.update(`spectrum|${s.id}|${s.solventId}|${s.lambdaMaxNm}\n`);
  for (const s of table) h.update(`${s.solventId}|${JSON.stringify(s.parameters)}\n`);
  return h.digest("hex").slice(0, 32);
}

/** The dye's model, recomputed (and stored with its predictions, in one transaction) when its inputs changed. */
export function ensureDyeModel(db: Db, { dyeId }: { dyeId: string }): DyeModel {
  const table = solventTableForModels(db);
  const { rows, colours } = modelInputs(db, dyeId);
  const spectraRows = spectraForModel(db, { dyeId });
  const key = cacheKeyOf(rows, table, spectraRows);
  const stored = db.select().from(dyeModels).where(eq(dyeModels.dyeId, dyeId)).get();
  if (stored && stored.cacheKey === key) return stored.result as DyeModel;
  const model = computeDyeModel({ dyeId, colours, table, spectra: spectrumBandsBySolvent(spectraRows, table) });
  db.transaction((tx) => {
    tx.delete(dyePredictions).where(eq(dyePredictions.dyeId, dyeId)).run();
    for (const p of model.predictions) {
      tx.insert(dyePredictions)
        .values({
          id: `${dyeId}:${p.solventId}`,
          dyeId,
          solventId: p.solventId,
          l: p.lab[0],
          a: p.lab[1],
          b: p.lab[2],
          uncertaintyDeltaE00: p.uncertaintyDeltaE00,
          extrapolated: p.extrapolated,
          route: p.route,
          model: p.model,
          wavenumberCm1: p.wavenumberCm1,
          wavenumberHalfWidthCm1: p.wavenumberHalfWidthCm1,
          cacheKey: key,
        })
        .run();
    }
    tx.insert(dyeModels)
      .values({ dyeId, cacheKey: key, version: DYE_MODEL_VERSION, result: model, computedAt: new Date() })
      .onConflictDoUpdate({ target: dyeModels.dyeId, set: { cacheKey: key, version: DYE_MODEL_VERSION, result: model, computedAt: new Date() } })
      .run();
    recordAudit(tx, {
      actorId: null,
      action: "dye_model.recompute",
      entity: "dye",
      entityId: dyeId,
      before: stored ? { cacheKey: stored.cacheKey } : null,
      after: { cacheKey: key, chosen: model.chosen, predictions: model.predictions.length },
    });
  });
  return model;
}

/** Brings every dye's stored model up to date (search with predictions needs all of them). Returns how many were recomputed. */
export function ensureAllDyeModels(db: Db): number {
  const keys = new Map(db.select({ dyeId: dyeModels.dyeId, key: dyeModels.cacheKey }).from(dyeModels).all().map((r) => [r.dyeId, r.key]));
  const table = solventTableForModels(db);
  let recomputed = 0;
  for (const { id } of db.select({ id: dyes.id }).from(dyes).all()) {
    const { rows } = modelInputs(db, id);
    const spectraRows = spectraForModel(db, { dyeId: id });
    if (rows.length === 0 && spectraRows.length === 0 && !keys.has(id)) continue;
    if (keys.get(id) === cacheKeyOf(rows, table, spectraRows)) continue;
    ensureDyeModel(db, { dyeId: id });
    recomputed++;
  }
  return recomputed;
}

export type StoredPrediction = {
  dye: { id: string; code: string; name: string };
  solventId: string;
  solvent: string;
  medium: Solvent["medium"];
  lab: Lab;
  uncertaintyDeltaE00: number;
  extrapolated: boolean;
  route: string;
  model: string;
};

/** Every stored prediction with its dye and solvent (call ensureAllDyeModels first for fresh ones). */
export function listPredictions(db: Db, { dyeId }: { dyeId?: string } = {}): StoredPrediction[] {
  return db
    .select({ p: dyePredictions, dye: { id: dyes.id, code: dyes.code, name: dyes.name }, solvent: solvents.name, medium: solvents.medium })
    .from(dyePredictions)
    .innerJoin(dyes, eq(dyePredictions.dyeId, dyes.id))
    .innerJoin(solvents, eq(dyePredictions.solventId, solvents.id))
    .where(dyeId ? eq(dyePredictions.dyeId, dyeId) : sql`1 = 1`)
    .orderBy(asc(solvents.name))
    .all()
    .map(({ p, dye, solvent, medium }) => ({
      dye,
      solventId: p.solventId,
      solvent,
      medium,
      lab: [p.l, p.a, p.b] as Lab,
      uncertaintyDeltaE00: p.uncertaintyDeltaE00,
      extrapolated: p.extrapolated,
      route: p.route,
      model: p.model,
    }));
}

/**
 * Predictions that match a search filter, models brought up to date first. Predictions are of the
 * neutral form in a neat solvent with no pH recorded, so acid/base filters and pH bounds exclude them.
 */
export function searchPredictions(
  db: Db,
  { filter, accept }: { filter: ConditionFilter; accept?: (l: number, a: number, b: number) => boolean },
) {
  ensureAllDyeModels(db);
  return listPredictions(db)
    .filter((p) => conditionMatches(filter, { solventId: p.solventId, medium: p.medium, acidBase: "neutral", ph: null }))
    .filter((p) => !accept || accept(p.lab[0], p.lab[1], p.lab[2]))
    .map((p) => ({
      dye: p.dye,
      lab: p.lab,
      uncertaintyDeltaE00: p.uncertaintyDeltaE00,
      extrapolated: p.extrapolated,
      condition: { solvent: p.solvent, medium: p.medium, acidBase: "neutral" as const, pH: null },
      replicates: 0,
    }));
}

/**
 * Tune inputs for one dye or all: the stored models (brought up to date) with each solvent's cautions,
 * and the band positions of measured blends (apparent band with the dye's own width and strength).
 */
export function tuneInputs(db: Db, { dyeId, storedOnly = false }: { dyeId?: string; storedOnly?: boolean } = {}): TuneDye[] {
  const stored = storedOnly ? new Map(db.select().from(dyeModels).all().map((r) => [r.dyeId, r.result as DyeModel])) : null;
  const info = new Map(solventTableForModels(db).map((s) => [s.solventId, { solventId: s.solventId, solvent: s.solvent, cautions: s.cautions, medium: s.medium }]));
  const list = db.select({ id: dyes.id, code: dyes.code, name: dyes.name }).from(dyes).where(dyeId ? eq(dyes.id, dyeId) : sql`1 = 1`).orderBy(asc(dyes.code)).all();
  return list.flatMap((d) => {
    const model = stored ? stored.get(d.id) : ensureDyeModel(db, { dyeId: d.id });
    if (!model) return [];
    const blendRows = db
      .select({ l: measurements.l, a: measurements.a, b: measurements.b, s1: conditions.solventId, s2: conditions.secondSolventId, x2: conditions.secondSolventMoleFraction })
      .from(measurements)
      .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
      .where(and(eq(measurements.dyeId, d.id), eq(measurements.reviewState, "accepted"), eq(conditions.acidBase, "neutral"), eq(measurements.illuminant, "D65")))
      .all()
      .filter((r) => r.s2 !== null && r.x2 !== null);
    const pairs = new Map<string, { solventId1: string; solventId2: string; points: { x2: number; value: number }[] }>();
    if (blendRows.length > 0 && Number.isFinite(model.band.fwhmCm1)) {
      for (const r of blendRows) {
        const key = `${r.s1}|${r.s2}`;
        const entry = pairs.get(key) ?? { solventId1: r.s1, solventId2: r.s2!, points: [] };
        const fit = fitApparentBand([r.l, r.a, r.b], { fwhmCm1: model.band.fwhmCm1, peakAbsorbance: model.band.peakAbsorbance });
        if (fit.status === "ok") entry.points.push({ x2: r.x2!, value: fit.band.wavenumberCm1 });
        pairs.set(key, entry);
      }
    }
    return [tuneDyeFromModel(d, model, info, [...pairs.values()])];
  });
}
