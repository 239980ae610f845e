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
};

export type ReplicateMean = {
  dyeId: string;
  /** The condition of the group's first replicate (all share solvent, acid/base and pH). */
  conditionId: string;
  lab: Lab;
  replicates: number;
  spreadDeltaE00: number;
};

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
  const groups = new Map<string, { first: ReplicateRow; labs: Lab[] }>();
  for (const r of rows) {
    const key = replicateGroupKey(r);
    const g = groups.get(key);
    if (g) g.labs.push(r.lab);
    else groups.set(key, { first: r, labs: [r.lab] });
  }
  const out: { key: string; mean: ReplicateMean }[] = [];
  for (const [key, { first, labs }] of groups) {
    const n = labs.length;
    const mean: Lab = [0, 0, 0];
    for (const l of labs) for (let c = 0; c < 3; c++) mean[c] += l[c];
    for (let c = 0; c < 3; c++) mean[c] /= n;
    let sq = 0;
    if (n > 1) for (const l of labs) sq += ciede2000(l[0], l[1], l[2], mean[0], mean[1], mean[2]) ** 2;
    out.push({ key, mean: { dyeId: first.dyeId, conditionId: first.conditionId, lab: mean, replicates: n, spreadDeltaE00: n > 1 ? Math.sqrt(sq / n) : 0 } });
  }
  return out;
}
