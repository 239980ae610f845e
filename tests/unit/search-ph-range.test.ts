/**
 * "Changes colour between pH x and y" (lib/search/ph-range.ts): the inclusion rule, one hit per dye,
 * the order by centredness, and the query parameters. Transition intervals here are invented inputs
 * to the rule (common practice, no source); the physics is tested in color-pka.test.ts.
 */
import { describe, expect, it } from "vitest";
import { dyesChangingWithin, mediaOf, phRangeQuerySchema, transitionWithin, type TransitionCandidate } from "@/lib/search/ph-range";

const candidate = (dye: string, transition: [number, number], series = "s1"): TransitionCandidate => ({
  dye: { id: `dye_${dye}`, code: dye, name: dye },
  series: { id: `${dye}_${series}`, name: series, medium: "Water", solventId: "solv-water", ionicStrengthMolL: null },
  pKa: (transition[0] + transition[1]) / 2,
  pKaStdErr: 0.02,
  transition,
  thresholdDeltaE00: 3,
  acidLab: [90, -5, 60],
  baseLab: [45, 10, -50],
  flags: [],
});

describe("transition inside the range", () => {
  it("counts an interval wholly inside, ends included, and nothing that pokes out", () => {
    expect(transitionWithin([4, 6], { from: 4, to: 6 })).toBe(true);
    expect(transitionWithin([4.5, 5.5], { from: 4, to: 6 })).toBe(true);
    expect(transitionWithin([3.9, 5.5], { from: 4, to: 6 })).toBe(false);
    expect(transitionWithin([4.5, 6.1], { from: 4, to: 6 })).toBe(false);
    expect(transitionWithin([1, 12], { from: 4, to: 6 })).toBe(false);
  });
});

describe("dyes changing colour within a range", () => {
  it("keeps one hit per dye (its best-centred qualifying series) and orders by distance of the centres, then margin, then code", () => {
    const hits = dyesChangingWithin(
      [candidate("A", [6, 8]), candidate("B", [3, 5]), candidate("B", [4.5, 6.5], "s2"), candidate("C", [8, 11]), candidate("D", [5, 7]), candidate("E", [5.5, 6.5])],
      { from: 2, to: 10 },
    );
    // Centre of the range 6: E (6.0, margin 3.5), D (6.0, margin 3), B s2 (5.5), A (7.0); C pokes out.
    expect(hits.map((h) => `${h.dye.code}:${h.series.name}`)).toEqual(["E:s1", "D:s1", "B:s2", "A:s1"]);
    expect(hits[0].centreOffset).toBeCloseTo(0, 12);
    expect(hits[2].centreOffset).toBeCloseTo(0.5, 12);
    expect(hits[1].margin).toBeCloseTo(3, 12);
  });

  it("returns nothing when no interval fits", () => {
    expect(dyesChangingWithin([candidate("A", [6, 8])], { from: 6.5, to: 7.5 })).toEqual([]);
  });
});

describe("phFrom / phTo", () => {
  it("takes both or neither, in order, within −2…16", () => {
    expect(phRangeQuerySchema.parse({})).toBeNull();
    expect(phRangeQuerySchema.parse({ phFrom: "4", phTo: "7.5" })).toEqual({ from: 4, to: 7.5 });
    expect(phRangeQuerySchema.safeParse({ phFrom: "4" }).error?.issues[0].message).toMatch(/both phFrom and phTo/);
    expect(phRangeQuerySchema.safeParse({ phFrom: "8", phTo: "4" }).error?.issues[0].message).toMatch(/below phTo/);
    expect(phRangeQuerySchema.safeParse({ phFrom: "x", phTo: "4" }).success).toBe(false);
    expect(phRangeQuerySchema.safeParse({ phFrom: "-3", phTo: "4" }).success).toBe(false);
  });

  it("maps the medium filter to solvent classes", () => {
    expect(mediaOf("any")).toBeUndefined();
    expect(mediaOf("aprotic")).toEqual(["dipolar-aprotic", "nonpolar"]);
    expect(mediaOf("protic")).toEqual(["protic"]);
  });
});
