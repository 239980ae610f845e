import { and, eq, isNotNull, isNull } from "drizzle-orm";
import type { Lab } from "../../lib/color/types";
import type { Db } from "../connection";
import { conditions, measurements, solvents } from "../schema";

export type PhSeries = {
  solvent: { id: string; name: string; medium: string };
  /** Additives named on the vials' conditions (buffers, acids, bases), as recorded. */
  additives: string[];
  /** Ionic strengths recorded on the conditions, mol/L (empty when none was recorded). */
  ionicStrengthsMolL: number[];
  vials: { pH: number; lab: Lab; measurementId: string }[];
};

/**
 * A dye's implicit pH series: its accepted colours with a recorded pH, one series per neat solvent (each vial a
 * point; replicates at one pH stay separate vials). Series with fewer than 5 vials are left out.
 */
export function phSeriesForDye(db: Db, { dyeId }: { dyeId: string }): PhSeries[] {
  const rows = db
    .select({ m: measurements, condition: conditions, solvent: solvents })
    .from(measurements)
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .where(and(eq(measurements.dyeId, dyeId), eq(measurements.reviewState, "accepted"), isNotNull(conditions.ph), isNull(conditions.secondSolventId)))
    .all();
  const bySolvent = new Map<string, PhSeries>();
  for (const { m, condition, solvent } of rows) {
    let s = bySolvent.get(solvent.id);
    if (!s) bySolvent.set(solvent.id, (s = { solvent: { id: solvent.id, name: solvent.name, medium: solvent.medium }, additives: [], ionicStrengthsMolL: [], vials: [] }));
    if (condition.additive && !s.additives.includes(condition.additive)) s.additives.push(condition.additive);
    if (condition.ionicStrengthMolL !== null && !s.ionicStrengthsMolL.includes(condition.ionicStrengthMolL)) s.ionicStrengthsMolL.push(condition.ionicStrengthMolL);
    s.vials.push({ pH: condition.ph!, lab: [m.l, m.a, m.b], measurementId: m.id });
  }
  return [...bySolvent.values()].filter((s) => s.vials.length >= 5).map((s) => ({ ...s, vials: s.vials.sort((x, y) => x.pH - y.pH) }));
}
