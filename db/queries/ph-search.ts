/**
 * Colour search restricted to a few dyes (those whose pH transition lies in an asked range): an
 * exhaustive CIEDE2000 scan of the replicate means of just those dyes, so the ranking stays exact
 * without the grid index (db/queries/search.ts) — the candidate dyes are the indicators with a stored
 * pKa fit, a handful, not the catalogue.
 */
import { and, eq, inArray } from "drizzle-orm";
import type { Lab } from "../../lib/color/types";
import { ciede2000 } from "../../lib/search/ciede2000";
import { conditionMatches, type ConditionFilter } from "../../lib/search/filters";
import { dyesChangingWithin, type PhRange, type TransitionHit } from "../../lib/search/ph-range";
import { replicateMeans, replicateMeanUncertainty } from "../../lib/search/replicates";
import type { Db } from "../connection";
import { conditions, dyes, measurements, type Medium } from "../schema";
import { transitionCandidates } from "./ph-series";
import { conditionCatalogue, type ColourHit } from "./search";

export function searchByColourAmongDyes(
  db: Db,
  { target, filter, dyeIds, limit, accept }: { target: Lab; filter: ConditionFilter; dyeIds: readonly string[]; limit: number; accept?: (l: number, a: number, b: number) => boolean },
): ColourHit[] {
  if (dyeIds.length === 0) return [];
  const catalogue = new Map(conditionCatalogue(db).map((c) => [c.id, c]));
  const rows = db
    .select({ dyeId: measurements.dyeId, conditionId: measurements.conditionId, solventId: conditions.solventId, acidBase: conditions.acidBase, ph: conditions.ph, l: measurements.l, a: measurements.a, b: measurements.b, u: measurements.uDeltaE00 })
    .from(measurements)
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .where(and(eq(measurements.reviewState, "accepted"), inArray(measurements.dyeId, [...dyeIds])))
    .orderBy(measurements.dyeId, measurements.conditionId, measurements.id)
    .all()
    .filter((r) => conditionMatches(filter, catalogue.get(r.conditionId)!));
  const best = new Map<string, { mean: ReturnType<typeof replicateMeans>[number]; d: number }>();
  for (const mean of replicateMeans(rows.map((r) => ({ ...r, lab: [r.l, r.a, r.b] as Lab })))) {
    if (accept && !accept(...mean.lab)) continue;
    const d = ciede2000(target[0], target[1], target[2], mean.lab[0], mean.lab[1], mean.lab[2]);
    const held = best.get(mean.dyeId);
    if (!held || d < held.d) best.set(mean.dyeId, { mean, d });
  }
  const facts = new Map(db.select({ id: dyes.id, code: dyes.code, name: dyes.name }).from(dyes).where(inArray(dyes.id, [...best.keys()])).all().map((d) => [d.id, d]));
  return [...best.values()]
    .sort((p, q) => p.d - q.d || p.mean.dyeId.localeCompare(q.mean.dyeId))
    .slice(0, limit)
    .map(({ mean, d }) => {
      const c = catalogue.get(mean.conditionId)!;
      return {
        dye: facts.get(mean.dyeId)!,
        deltaE00: d,
        lab: mean.lab,
        condition: { solvent: c.solvent, medium: c.medium, acidBase: c.acidBase, pH: c.ph },
        predicted: false as const,
        replicates: mean.replicates,
        spreadDeltaE00: mean.spreadDeltaE00,
        measurements: mean.replicates,
        uncertaintyDeltaE00: replicateMeanUncertainty(mean),
      };
    });
}

/** Dyes whose stored pKa fit changes colour within the range (lib/search/ph-range.ts), best-centred first, keyed by dye id. */
export function dyesChangingColourWithin(db: Db, { range, solventId, media }: { range: PhRange; solventId?: string; media?: readonly Medium[] }): Map<string, TransitionHit> {
  return new Map(dyesChangingWithin(transitionCandidates(db, { solventId, media }), range).map((h) => [h.dye.id, h]));
}

/** What a search hit shows of the dye's pH transition. */
export function transitionSummary(h: TransitionHit) {
  return {
    series: h.series,
    pKa: h.pKa,
    pKaStdErr: h.pKaStdErr,
    transition: h.transition,
    thresholdDeltaE00: h.thresholdDeltaE00,
    acidLab: h.acidLab,
    baseLab: h.baseLab,
    flags: h.flags,
    centreOffset: h.centreOffset,
  };
}
