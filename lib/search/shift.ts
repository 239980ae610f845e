/**
 * Search by colour shift: for each dye, the pair of its colours (one under condition A, one under B)
 * that best fits what the formulator asked for, scored exactly with CIEDE2000 over every pair.
 *
 *  - both ends given (X in A, Y in B): minimise ΔE00(x, X) + ΔE00(y, Y);
 *  - one end given: minimise the distance at that end; equal distances prefer the larger shift;
 *  - no end given: maximise the shift ("largest change between A and B"), measured by ΔEOK
 *    (Euclidean OKLab distance, lib/color/large-difference.ts): CIEDE2000 was fitted to small
 *    differences and is discontinuous for large ones, so large shifts are ranked by ΔEOK while ΔE00
 *    is still reported beside it.
 *
 * Only pairs whose shift is at least `minShift` count (ΔE00 ≈ 1 is about a just-noticeable
 * difference: common practice). With `viewers`, a pair must also keep ΔE00 ≥ `viewerMinShift` when
 * both colours are seen by a protan, deutan or tritan dichromat (the colour engine's simulation);
 * a dye with no passing pair is reported with the reason, from its best pair otherwise.
 * `sameSolvent` pairs only colours measured in the same solvent (acid vs base in one solvent).
 */
import type { Lab } from "@/lib/color/types";
import { deltaEOK } from "@/lib/color/large-difference";
import { ciede2000 } from "./ciede2000";

export type ViewerKind = "protan" | "deutan" | "tritan";
export const VIEWER_KINDS: readonly ViewerKind[] = ["protan", "deutan", "tritan"];

export type ShiftColour<T> = { lab: Lab; solventId: string; payload: T };
export type ShiftDye<T> = { dyeId: string; a: ShiftColour<T>[]; b: ShiftColour<T>[] };

export type ShiftQuery = {
  from?: Lab;
  to?: Lab;
  minShift: number;
  sameSolvent: boolean;
  viewers: readonly ViewerKind[];
  viewerMinShift: number;
};

export type ViewerCheck = { kind: ViewerKind; deltaE00: number; passes: boolean };

export type ShiftResult<T> = {
  dyeId: string;
  a: ShiftColour<T>;
  b: ShiftColour<T>;
  /** ΔE00 between the two colours (normal colour vision). */
  shift: number;
  /** ΔEOK between the two colours (OKLab distance ×100): the metric large shifts are ranked by. */
  shiftOK: number;
  fromDeltaE00: number | null;
  toDeltaE00: number | null;
  /** Lower is better; ranks the results. */
  score: number;
  viewers: ViewerCheck[];
};

export type ShiftFailure<T> = { dyeId: string; reason: string; best: ShiftResult<T> | null };

const de = (x: Lab, y: Lab) => ciede2000(x[0], x[1], x[2], y[0], y[1], y[2]);

const KIND_LABEL: Record<ViewerKind, string> = { protan: "protan", deutan: "deutan", tritan: "tritan" };

export function scoreShifts<T>(
  dyes: Iterable<ShiftDye<T>>,
  query: ShiftQuery,
  viewerDeltaE00: (x: Lab, y: Lab, kind: ViewerKind) => number,
): { results: ShiftResult<T>[]; failures: ShiftFailure<T>[] } {
  const results: ShiftResult<T>[] = [];
  const failures: ShiftFailure<T>[] = [];
  for (const dye of dyes) {
    if (dye.a.length === 0 || dye.b.length === 0) {
      failures.push({ dyeId: dye.dyeId, reason: dye.a.length === 0 ? "No accepted colour under the first condition." : "No accepted colour under the second condition.", best: null });
      continue;
    }
    let best: ShiftResult<T> | null = null;
    let bestAny: ShiftResult<T> | null = null; // best pair ignoring the viewer requirement, for the reason
    let largestShift = 0;
    let sameSolventPairs = 0;
    for (const x of dye.a) {
      for (const y of dye.b) {
        if (query.sameSolvent && x.solventId !== y.solventId) continue;
        sameSolventPairs++;
        const shift = de(x.lab, y.lab);
        largestShift = Math.max(largestShift, shift);
        if (shift < query.minShift) continue;
        const fromD = query.from ? de(x.lab, query.from) : null;
        const toD = query.to ? de(y.lab, query.to) : null;
        const shiftOK = deltaEOK(x.lab, y.lab);
        // Without targets, rank by the shift in ΔEOK (largest first); with one, ties prefer larger shifts.
        const score = fromD === null && toD === null ? -shiftOK : (fromD ?? 0) + (toD ?? 0) - shiftOK * 1e-9;
        const candidate: ShiftResult<T> = { dyeId: dye.dyeId, a: x, b: y, shift, shiftOK, fromDeltaE00: fromD, toDeltaE00: toD, score, viewers: [] };
        if (!bestAny || score < bestAny.score) bestAny = candidate;
        if (best && score >= best.score) continue;
        if (query.viewers.length) {
          candidate.viewers = query.viewers.map((kind) => {
            const d = viewerDeltaE00(x.lab, y.lab, kind);
            return { kind, deltaE00: d, passes: d >= query.viewerMinShift };
          });
          if (candidate.viewers.some((v) => !v.passes)) continue;
        }
        best = candidate;
      }
    }
    if (best) {
      results.push(best);
      continue;
    }
    if (query.sameSolvent && sameSolventPairs === 0) {
      failures.push({ dyeId: dye.dyeId, reason: "Never measured in the same solvent under both conditions.", best: null });
    } else if (!bestAny) {
      failures.push({ dyeId: dye.dyeId, reason: `Largest shift is ΔE00 ${largestShift.toFixed(1)}, below the minimum ${query.minShift}.`, best: null });
    } else {
      const checks = query.viewers.map((kind) => {
        const d = viewerDeltaE00(bestAny!.a.lab, bestAny!.b.lab, kind);
        return { kind, deltaE00: d, passes: d >= query.viewerMinShift };
      });
      bestAny.viewers = checks;
      const failing = checks.filter((c) => !c.passes);
      failures.push({
        dyeId: dye.dyeId,
        reason: `No pair stays visible to every chosen viewer: the best pair's ΔE00 ${bestAny.shift.toFixed(1)} falls to ${failing
          .map((c) => `${c.deltaE00.toFixed(1)} for ${KIND_LABEL[c.kind]} viewers`)
          .join(", ")} (threshold ${query.viewerMinShift}).`,
        best: bestAny,
      });
    }
  }
  results.sort((x, y) => x.score - y.score || (x.dyeId < y.dyeId ? -1 : 1));
  return { results, failures };
}
