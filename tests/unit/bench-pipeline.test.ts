/**
 * Folding the in-photo reference scaling into the profile's correction must give the same colour as
 * applying the two one after the other, for every kind of correction (so the stored correction
 * re-derives the stored colour).
 */
import { describe, expect, it } from "vitest";
import { scaleCorrection } from "@/lib/bench/pipeline";
import { applyCorrection, type Correction } from "@/lib/color/correction";
import type { Vec3 } from "@/lib/color/types";

const gains: Vec3 = [1.21, 0.93, 1.47];
const CASES: Correction[] = [
  { kind: "none" },
  { kind: "white-scaling", gains: [0.9, 1.1, 1.3] },
  { kind: "matrix-3x3", matrix: [[1.2, -0.1, -0.1], [-0.05, 1.1, -0.05], [0.02, -0.2, 1.18]] },
  { kind: "root-polynomial", terms: [[1.1, 0, 0, 0.05, 0, -0.02], [0, 0.95, 0.03, 0, 0.01, 0], [0.02, 0, 1.2, 0, -0.03, 0.04]] },
];

describe("scaleCorrection", () => {
  it.each(CASES.map((c) => [c.kind, c] as const))("%s followed by diagonal gains equals one folded correction", (_kind, base) => {
    const folded = scaleCorrection(base, gains);
    for (const rgb of [[0.2, 0.4, 0.6], [0.9, 0.05, 0.3], [0.01, 0.02, 0.015]] as Vec3[]) {
      const sequential = applyCorrection(base, rgb).map((v, i) => v * gains[i]);
      applyCorrection(folded, rgb).forEach((v, i) => expect(v).toBeCloseTo(sequential[i], 12));
    }
    expect(folded.kind).toBe(base.kind === "none" ? "white-scaling" : base.kind);
  });
});
