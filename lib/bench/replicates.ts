/**
 * Replicates of one dye in one condition: their spread, and whether a new colour agrees with them.
 *
 * The rule (common practice for repeat measurements, no single published source): the earlier accepted
 * replicates have a mean CIELAB and a spread s, the sample standard deviation of their CIEDE2000
 * distances from that mean. A new colour with standard uncertainty u (its "± ΔE00", 0 when unknown)
 * disagrees when its ΔE00 from the mean exceeds k·√(s² + u²) with k = 3 (the usual three-sigma
 * outlier limit). Because two or three photos say little about the spread, s is never taken below
 * SPREAD_FLOOR_DE00 (1 ΔE00, about a just-noticeable difference between colours side by side;
 * common practice, no source). So with one earlier replicate and no uncertainty the limit is 3 ΔE00.
 *
 * CIEDE2000: Sharma, Wu, Dalal (2005), "The CIEDE2000 color-difference formula: implementation notes,
 * supplementary test data, and mathematical observations", Color Res. Appl. 30(1), 21–30.
 */
import { deltaE00 } from "../color/difference";
import type { Lab } from "../color/types";

export const OUTLIER_K = 3;
export const SPREAD_FLOOR_DE00 = 1;
/** L* above the white reference's 100 cannot come from a vial that transmits light; the light or reference is off. */
export const MAX_LIGHTNESS = 100;

export type ReplicateSummary = {
  /** Number of replicates. */
  n: number;
  /** Arithmetic mean of L*, a*, b*. */
  mean: Lab;
  /** Sample standard deviation of ΔE00 from the mean (0 for one replicate). */
  spreadDeltaE00: number;
  /** Largest ΔE00 between the mean and one replicate. */
  maxDeltaE00: number;
};

export function summarizeReplicates(labs: readonly Lab[]): ReplicateSummary | null {
  const n = labs.length;
  if (n === 0) return null;
  const mean: Lab = [0, 1, 2].map((k) => labs.reduce((s, l) => s + l[k], 0) / n) as unknown as Lab;
  const d = labs.map((l) => deltaE00(l, mean));
  const spread = n > 1 ? Math.sqrt(d.reduce((s, x) => s + x * x, 0) / (n - 1)) : 0;
  return { n, mean, spreadDeltaE00: spread, maxDeltaE00: Math.max(...d) };
}

export type ReplicateVerdict = {
  /** ΔE00 between the new colour and the mean of the earlier replicates. */
  deltaE00: number;
  /** ΔE00 beyond which the new colour disagrees: k·√(max(s, floor)² + u²). */
  limitDeltaE00: number;
  disagrees: boolean;
  earlier: ReplicateSummary;
};

/** Compares a new colour with the earlier accepted replicates of its dye and condition (rule in the module note). */
export function checkReplicate(lab: Lab, earlier: readonly Lab[], uncertaintyDeltaE00: number | null = null): ReplicateVerdict | null {
  const summary = summarizeReplicates(earlier);
  if (!summary) return null;
  const s = Math.max(summary.spreadDeltaE00, SPREAD_FLOOR_DE00);
  const u = uncertaintyDeltaE00 !== null && Number.isFinite(uncertaintyDeltaE00) ? uncertaintyDeltaE00 : 0;
  const limit = OUTLIER_K * Math.sqrt(s * s + u * u);
  const d = deltaE00(lab, summary.mean);
  return { deltaE00: d, limitDeltaE00: limit, disagrees: d > limit, earlier: summary };
}

/** Quality flags from the colour alone and from the replicate check, in the words the bench shows. */
export const REPLICATE_FLAG = "disagrees-with-replicates";
export const LIGHTNESS_FLAG = "lightness-above-100";

export function replicateFlags(lab: Lab, verdict: ReplicateVerdict | null): string[] {
  const flags: string[] = [];
  if (lab[0] > MAX_LIGHTNESS) flags.push(LIGHTNESS_FLAG);
  if (verdict?.disagrees) flags.push(REPLICATE_FLAG);
  return flags;
}
