/**
 * Absorbance spectra: reading a dye's spectra for its page and its solvent model, and storing a new
 * one (write API and the upload panel share `prepareSpectrum` and `saveSpectrum`).
 */
import { randomUUID } from "node:crypto";
import { and, asc, eq, isNull } from "drizzle-orm";
import { lambdaMax, spectrumColour, type SpectrumColour } from "../../lib/color/spectrum";
import { checkAbsorbanceCsv, checkAbsorbancePoints, type SpectrumReport } from "../../lib/import/spectrum";
import type { RowProblem } from "../../lib/import/csv";
import type { SpectrumUpload } from "../../lib/validation/spectrum";
import type { Db } from "../connection";
import { conditions, solvents, spectra } from "../schema";
import { recordAudit } from "./audit";
import { conditionFor, instrumentLookups, resolveDyeAndCondition, type ConditionInput } from "./bench";

export type DyeSpectrum = {
  id: string;
  solvent: string;
  acidBase: string;
  pH: number | null;
  points: [number, number][];
  lambdaMaxNm: number | null;
  concentrationUmolL: number | null;
  pathLengthMm: number | null;
  instrument: string;
  originalName: string;
  wavelengthUnit: string;
  createdAt: Date;
};

/** A dye's stored absorbance spectra with their solvent and condition, by solvent name. */
export function spectraForDye(db: Db, { dyeId }: { dyeId: string }): DyeSpectrum[] {
  return db
    .select({ s: spectra, condition: conditions, solvent: solvents })
    .from(spectra)
    .innerJoin(conditions, eq(spectra.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .where(eq(spectra.dyeId, dyeId))
    .orderBy(asc(solvents.name), asc(spectra.createdAt), asc(spectra.id))
    .all()
    .map(({ s, condition, solvent }) => ({
      id: s.id,
      solvent: solvent.name,
      acidBase: condition.acidBase,
      pH: condition.ph,
      points: s.points,
      lambdaMaxNm: s.lambdaMaxNm,
      concentrationUmolL: s.concentrationUmolL,
      pathLengthMm: s.pathLengthMm,
      instrument: s.instrument,
      originalName: s.originalName,
      wavelengthUnit: s.wavelengthUnit,
      createdAt: s.createdAt,
    }));
}

/**
 * The spectra a solvent model may use: the dye's neutral form in a neat solvent without additive (the
 * same conditions as the colours it fits), with λmax as stored when the spectrum was saved.
 */
export function spectraForModel(db: Db, { dyeId }: { dyeId: string }): { id: string; solventId: string; lambdaMaxNm: number | null }[] {
  return db
    .select({ id: spectra.id, solventId: conditions.solventId, lambdaMaxNm: spectra.lambdaMaxNm })
    .from(spectra)
    .innerJoin(conditions, eq(spectra.conditionId, conditions.id))
    .where(and(eq(spectra.dyeId, dyeId), eq(conditions.acidBase, "neutral"), isNull(conditions.secondSolventId), eq(conditions.additive, "")))
    .orderBy(asc(spectra.id))
    .all();
}

export type SpectrumToSave = {
  dyeId: string;
  condition: ConditionInput;
  points: [number, number][];
  lambdaMaxNm: number | null;
  concentrationUmolL: number;
  pathLengthMm: number;
  instrument: string;
  originalName: string;
  report: SpectrumReport;
};

export type SpectrumPreview = {
  report: SpectrumReport;
  warnings: string[];
  points: [number, number][];
  /** Colour of the spectrum as measured (no Beer–Lambert scaling), CIE 1931 2°, D65. */
  colour: SpectrumColour;
};

export type PreparedSpectrum = { ok: true; item: SpectrumToSave; preview: SpectrumPreview } | { ok: false; problems: RowProblem[]; warnings: string[] };

/**
 * Checks an upload against the catalogue and the solvent table (dye, solvent, blend) and the spectrum
 * itself (lib/import/spectrum.ts), and computes its λmax and colour. Nothing is written.
 * Problems with the dye or condition carry the field name as their column and line 0.
 */
export function prepareSpectrum(db: Db, input: SpectrumUpload): PreparedSpectrum {
  const resolved = resolveDyeAndCondition(instrumentLookups(db), {
    dye: input.dye,
    condition: { ...input.condition, concentrationUmolL: input.concentrationUmolL, pathLengthMm: input.pathLengthMm },
  });
  const checked = input.csv !== undefined ? checkAbsorbanceCsv(input.csv) : checkAbsorbancePoints(input.points ?? [], input.wavelengthUnit);
  const problems: RowProblem[] = [...(resolved.ok ? [] : resolved.errors.map((e) => ({ line: 0, column: e.field, message: e.message }))), ...(checked.ok ? [] : checked.problems)];
  if (!resolved.ok || !checked.ok) return { ok: false, problems, warnings: checked.warnings };
  const { spectrum, report, warnings } = checked;
  const points = spectrum.wavelengths.map((w, i) => [w, spectrum.values[i]] as [number, number]);
  const colour = spectrumColour(spectrum, "D65");
  return {
    ok: true,
    item: {
      dyeId: resolved.dyeId,
      condition: resolved.condition,
      points,
      lambdaMaxNm: lambdaMax(spectrum),
      concentrationUmolL: input.concentrationUmolL,
      pathLengthMm: input.pathLengthMm,
      instrument: input.instrument,
      originalName: input.fileName,
      report,
    },
    preview: { report, warnings, points, colour },
  };
}

/** Stores a checked spectrum with its condition (reused when identical) and an audit entry, in one transaction. */
export function saveSpectrum(db: Db, { actorId, item }: { actorId: string; item: SpectrumToSave }): string {
  return db.transaction((tx) => {
    const id = `sp_${randomUUID()}`;
    const conditionId = conditionFor(tx, actorId, item.condition);
    tx.insert(spectra)
      .values({
        id,
        dyeId: item.dyeId,
        conditionId,
        points: item.points,
        lambdaMaxNm: item.lambdaMaxNm,
        concentrationUmolL: item.concentrationUmolL,
        pathLengthMm: item.pathLengthMm,
        instrument: item.instrument,
        originalName: item.originalName,
        wavelengthUnit: item.report.unit,
        createdBy: actorId,
      })
      .run();
    recordAudit(tx, {
      actorId,
      action: "spectrum.create",
      entity: "spectrum",
      entityId: id,
      after: {
        dyeId: item.dyeId,
        conditionId,
        lambdaMaxNm: item.lambdaMaxNm,
        points: item.report.points,
        rangeNm: item.report.rangeNm,
        stepNm: item.report.stepNm.median,
        sentIn: item.report.unit,
        concentrationUmolL: item.concentrationUmolL,
        pathLengthMm: item.pathLengthMm,
        instrument: item.instrument,
        originalName: item.originalName,
      },
    });
    return id;
  });
}

/** One stored spectrum with its condition, for the API's answer. */
export function findSpectrum(db: Db, { id }: { id: string }): DyeSpectrum | undefined {
  const row = db.select({ dyeId: spectra.dyeId }).from(spectra).where(eq(spectra.id, id)).get();
  return row ? spectraForDye(db, { dyeId: row.dyeId }).find((s) => s.id === id) : undefined;
}
