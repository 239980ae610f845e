/**
 * A dye's colour in one condition is the mean of its accepted replicates there, not its luckiest vial.
 * "One condition" means the same solvent, acid/base state and pH (other condition fields such as the
 * additive's wording do not split replicates). Means are component-wise in CIELAB (D65); the spread is
 * the root mean square of the replicates' CIEDE2000 distances from their mean (0 for one replicate),
 * a summary of how well the replicates agree (common practice, no source).
 */
import type { Lab } from "@/lib/color/types";
import { ciede2000 } from "./ciede2000";

export type ReplicateRow = {
  dyeId: string;
  conditionId: string;
  solventId: string;
  acidBase: string;
  ph: number | null;
  lab: Lab;
  /** The replicate's own ± ΔE00 (null or absent when it has none). */
  u?: number | null;
};

export type ReplicateMean = {
  dyeId: string;
  /** The condition of the group's first replicate (all share solvent, acid/base and pH). */
  conditionId: string;
  lab: Lab;
  replicates: number;
  spreadDeltaE00: number;
  /** Mean of uᵢ² over the replicates that have a ± ΔE00 (null when none has one): see {@link replicateMeanUncertainty}. */
  meanSquaredU: number | null;
};

/**
 * ± ΔE00 of a replicate mean: the replicates' own uncertainties do not average down (the calibration
 * part is shared by all of them), so u = √(mean(uᵢ²) + s²/n) with s the replicates' RMS spread from
 * their mean (JCGM 100:2008, GUM §4.2.3: Type A for the mean; Type B kept whole: conservative). Null
 * when no replicate has an uncertainty.
 */
export function replicateMeanUncertainty(mean: Pick<ReplicateMean, "meanSquaredU" | "replicates" | "spreadDeltaE00">): number | null {
  if (mean.meanSquaredU === null) return null;
  return Math.sqrt(mean.meanSquaredU + (mean.spreadDeltaE00 * mean.spreadDeltaE00) / Math.max(1, mean.replicates));
}

/** The key that groups replicates: dye, solvent, acid/base and pH. */
export function replicateGroupKey(r: Pick<ReplicateRow, "dyeId" | "solventId" | "acidBase" | "ph">): string {
  return `${r.dyeId}\u0000${r.solventId}\u0000${r.acidBase}\u0000${r.ph === null ? "" : r.ph}`;
}

/** Groups replicates and returns each group's mean CIELAB, count and spread, in first-seen order. */
export function replicateMeans(rows: Iterable<ReplicateRow>): ReplicateMean[] {
  return replicateMeanGroups(rows).map((g) => g.mean);
}

/** {@link replicateMeans} with each group's {@link replicateGroupKey}. */
export function replicateMeanGroups(rows: Iterable<ReplicateRow>): { key: string; mean: ReplicateMean }[] {
  const groups = new Map<string, { first: ReplicateRow; labs: Lab[]; uSq: number; uKnown: number }>();
  for (const r of rows) {
    const key = replicateGroupKey(r);
    let g = groups.get(key);
    if (g) g.labs.push(r.lab);
    else groups.set(key, (g = { first: r, labs: [r.lab], uSq: 0, uKnown: 0 }));
    if (typeof r.u === "number") {
      g.uSq += r.u * r.u;
      g.uKnown++;
    }
  }
  const out: { key: string; mean: ReplicateMean }[] = [];
  for (const [key, { first, labs, uSq, uKnown }] of groups) {
    const n = labs.length;
    const mean: Lab = [0, 0, 0];
    for (const l of labs) for (let c = 0; c < 3; c++) mean[c] += l[c];
    for (let c = 0; c < 3; c++) mean[c] /= n;
    let sq = 0;
    if (n > 1) for (const l of labs) sq += ciede2000(l[0], l[1], l[2], mean[0], mean[1], mean[2]) ** 2;
    out.push({ key, mean: { dyeId: first.dyeId, conditionId: first.conditionId, lab: mean, replicates: n, spreadDeltaE00: n > 1 ? Math.sqrt(sq / n) : 0, meanSquaredU: uKnown > 0 ? uSq / uKnown : null } });
  }
  return out;
}
