/**
 * The replicate check (lib/bench/replicates.ts). The rule itself (three-sigma limit, spread floor of
 * 1 ΔE00) is common practice, no source; the distances it compares are checked against the published
 * CIEDE2000 test pairs of Sharma, Wu & Dalal, Color Res. Appl. 30 (2005) 21–30, Table 1, so a wrong
 * colour difference would move a verdict.
 */
import { describe, expect, it } from "vitest";
import { checkReplicate, LIGHTNESS_FLAG, REPLICATE_FLAG, replicateFlags, summarizeReplicates } from "@/lib/bench/replicates";
import type { Lab } from "@/lib/color/types";
import { readFixtureCsv } from "../support/fixtures";

const pairs = readFixtureCsv("ciede2000_sharma2005_table1.csv").map((r) => ({
  pair: Number(r.pair),
  x: [Number(r.L1), Number(r.a1), Number(r.b1)] as Lab,
  y: [Number(r.L2), Number(r.a2), Number(r.b2)] as Lab,
  dE00: Number(r.dE00),
}));
const pair = (n: number) => pairs.find((p) => p.pair === n)!;

describe("one earlier replicate: the limit is 3 ΔE00 (floor 1 ΔE00 × k = 3)", () => {
  it.each(pairs)("Sharma pair $pair (ΔE00 $dE00) disagrees exactly when its published ΔE00 exceeds 3", ({ x, y, dE00 }) => {
    const v = checkReplicate(y, [x])!;
    expect(v.deltaE00).toBeCloseTo(dE00, 4);
    expect(v.limitDeltaE00).toBe(3);
    expect(v.disagrees).toBe(dE00 > 3);
  });

  it("widens the limit with the new colour's own uncertainty: √(1² + u²)·3", () => {
    // Pair 3: published ΔE00 3.4412 (Sharma 2005) — beyond 3, within 3·√(1 + 0.6²) = 3.499.
    const p = pair(3);
    expect(checkReplicate(p.y, [p.x])!.disagrees).toBe(true);
    const v = checkReplicate(p.y, [p.x], 0.6)!;
    expect(v.limitDeltaE00).toBeCloseTo(3 * Math.sqrt(1.36), 10);
    expect(v.disagrees).toBe(false);
  });
});

describe("several earlier replicates", () => {
  it("two identical replicates have zero spread and their own value as mean", () => {
    const s = summarizeReplicates([
      [50, 10, 10],
      [50, 10, 10],
    ])!;
    expect(s.n).toBe(2);
    expect(s.mean).toEqual([50, 10, 10]);
    expect(s.spreadDeltaE00).toBe(0);
  });

  it("the mean of two opposite colours is grey, and each of them is far from it (why the dye page shows replicates, not a mean)", () => {
    const s = summarizeReplicates([
      [50, 40, 0],
      [50, -40, 0],
    ])!;
    expect(s.mean).toEqual([50, 0, 0]);
    expect(s.maxDeltaE00).toBeGreaterThan(20);
  });

  it("a wide spread of earlier replicates widens the limit, so a colour that disagreed with a tight set agrees with a loose one", () => {
    const target: Lab = [60, 20, 20];
    const tight: Lab[] = [
      [50, 20, 20],
      [50.2, 20, 20],
      [49.8, 20, 20],
    ];
    const loose: Lab[] = [
      [44, 20, 20],
      [56, 20, 20],
      [50, 20, 20],
    ];
    expect(checkReplicate(target, tight)!.disagrees).toBe(true);
    expect(checkReplicate(target, loose)!.disagrees).toBe(false);
  });

  it("no earlier replicates: no verdict", () => {
    expect(checkReplicate([50, 0, 0], [])).toBeNull();
  });
});

describe("flags", () => {
  it("flags L* above 100 (lighter than the reference white) and a disagreeing replicate", () => {
    const far = pair(17); // ΔE00 27.1492 (Sharma 2005)
    expect(replicateFlags([100.4, 0, 0], null)).toEqual([LIGHTNESS_FLAG]);
    expect(replicateFlags(far.y, checkReplicate(far.y, [far.x]))).toEqual([REPLICATE_FLAG]);
    expect(replicateFlags([99.9, 0, 0], checkReplicate([99.9, 0, 0], [[99.5, 0, 0]]))).toEqual([]);
  });
});
