/**
 * "Changes colour between pH x and y": which stored pKa fits qualify, and in what order. Pure.
 *
 * The rule: a series qualifies when its visual transition interval [low, high] (where the fitted colour
 * differs from both end colours by ΔE00 ≥ the fit's threshold, lib/color/pka.ts) lies wholly inside the
 * asked range: x ≤ low and high ≤ y. A dye qualifies when one of its series does; the series shown for
 * it is the best-centred one. Without a target colour, dyes are ordered by how far the middle of their
 * transition lies from the middle of the range (closest first), then by the smaller of the two margins
 * (larger first), then by code; with a target colour the caller keeps the exact ΔE00 ranking.
 */
import { z } from "zod";
import type { Lab } from "../color/types";

export const PH_RANGE_RULE =
  "A dye qualifies when the visual transition interval of one of its pH series (where the colour differs from both end colours by ΔE00 ≥ 3) lies wholly within pH x to y: x ≤ start and end ≤ y.";

export type PhRange = { from: number; to: number };

export type TransitionCandidate = {
  dye: { id: string; code: string; name: string };
  series: { id: string; name: string; medium: string; solventId: string; ionicStrengthMolL: number | null };
  pKa: number;
  pKaStdErr: number | null;
  transition: [number, number];
  thresholdDeltaE00: number;
  acidLab: Lab;
  baseLab: Lab;
  flags: string[];
};

export type TransitionHit = TransitionCandidate & {
  /** |middle of the transition − middle of the range|, pH units. */
  centreOffset: number;
  /** The smaller of (low − x) and (y − high), pH units. */
  margin: number;
};

export function transitionWithin(transition: readonly [number, number], range: PhRange): boolean {
  return range.from <= transition[0] && transition[1] <= range.to;
}

function scored(c: TransitionCandidate, range: PhRange): TransitionHit {
  const centreOffset = Math.abs((c.transition[0] + c.transition[1]) / 2 - (range.from + range.to) / 2);
  const margin = Math.min(c.transition[0] - range.from, range.to - c.transition[1]);
  return { ...c, centreOffset, margin };
}

const byCentre = (p: TransitionHit, q: TransitionHit) => p.centreOffset - q.centreOffset || q.margin - p.margin || p.dye.code.localeCompare(q.dye.code);

/** One hit per dye (its best-centred qualifying series), best-centred first. */
export function dyesChangingWithin(candidates: readonly TransitionCandidate[], range: PhRange): TransitionHit[] {
  const best = new Map<string, TransitionHit>();
  for (const c of candidates) {
    if (!transitionWithin(c.transition, range)) continue;
    const hit = scored(c, range);
    const held = best.get(c.dye.id);
    if (!held || byCentre(hit, held) < 0) best.set(c.dye.id, hit);
  }
  return [...best.values()].sort(byCentre);
}

const phBound = (name: string) =>
  z
    .string()
    .optional()
    .transform((v, ctx) => {
      if (v === undefined || v.trim() === "") return undefined;
      const n = Number(v);
      if (!Number.isFinite(n) || n < -2 || n > 16) {
        ctx.addIssue({ code: "custom", message: `${name} must be a pH from −2 to 16.`, path: [name] });
        return z.NEVER;
      }
      return n;
    });

/** `phFrom` and `phTo` of GET /api/search: both or neither, phFrom below phTo. */
export const phRangeQuerySchema = z
  .object({ phFrom: phBound("phFrom"), phTo: phBound("phTo") })
  .transform((v, ctx): PhRange | null => {
    if (v.phFrom === undefined && v.phTo === undefined) return null;
    if (v.phFrom === undefined || v.phTo === undefined) {
      ctx.addIssue({ code: "custom", message: "Give both phFrom and phTo (the range the colour change must lie in), or neither.", path: [v.phFrom === undefined ? "phFrom" : "phTo"] });
      return z.NEVER;
    }
    if (!(v.phFrom < v.phTo)) {
      ctx.addIssue({ code: "custom", message: "phFrom must be below phTo.", path: ["phFrom"] });
      return z.NEVER;
    }
    return { from: v.phFrom, to: v.phTo };
  });

/** The solvent classes a `medium=` filter admits (undefined: every class). */
export function mediaOf(medium: "any" | "protic" | "dipolar-aprotic" | "nonpolar" | "aprotic"): ("protic" | "dipolar-aprotic" | "nonpolar")[] | undefined {
  if (medium === "any") return undefined;
  return medium === "aprotic" ? ["dipolar-aprotic", "nonpolar"] : [medium];
}
