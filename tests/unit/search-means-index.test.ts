/**
 * The updatable index of replicate means (lib/search/means-index): after any sequence of groups added,
 * changed and removed — enough to overflow into a rebuilt grid and a renumbering — a box fetch returns
 * exactly the live means inside the box, and the indexed ranking equals an exhaustive scan of the means
 * kept here in a plain Map. Exactness checks only: no published figures involved.
 */
import { describe, expect, it } from "vitest";
import type { Lab } from "@/lib/color/types";
import { mulberry32 as rng } from "@/lib/random";
import { labBoxForDeltaE00 } from "@/lib/search/bound";
import { ReplicateMeansIndex } from "@/lib/search/means-index";
import { rankByColourExhaustive, rankByColourIndexed } from "@/lib/search/rank";
import type { ReplicateMean } from "@/lib/search/replicates";

const CONDITIONS = ["c0", "c1", "c2", "c3", "c4"];

function randomMean(random: () => number, dyeId: string, conditionId: string): ReplicateMean {
  const lab: Lab = [100 * random(), 180 * random() - 90, 180 * random() - 90];
  // meanSquaredU null for a group without any ± ΔE00, so both forms go through the index.
  return { dyeId, conditionId, lab, replicates: 1 + Math.floor(random() * 4), spreadDeltaE00: random(), meanSquaredU: random() < 0.3 ? null : random() };
}

describe("ReplicateMeansIndex", () => {
  it("fetches exactly the live means in a box and ranks as an exhaustive scan, through 6000 changes", () => {
    const random = rng(11);
    const truth = new Map<string, ReplicateMean>();
    const keyOf = (d: number, c: string) => `dye${d}|${c}`;
    const initial: { key: string; mean: ReplicateMean }[] = [];
    for (let d = 0; d < 300; d++)
      for (const c of CONDITIONS)
        if (random() < 0.5) {
          const mean = randomMean(random, `dye${d}`, c);
          truth.set(keyOf(d, c), mean);
          initial.push({ key: keyOf(d, c), mean });
        }
    const index = new ReplicateMeansIndex(initial);
    expect(index.size).toBe(truth.size);

    let checks = 0;
    for (let step = 1; step <= 6000; step++) {
      // Change, add or remove one group; dyes and conditions beyond the initial ones appear too.
      const d = Math.floor(random() * 330);
      const c = random() < 0.95 ? CONDITIONS[Math.floor(random() * CONDITIONS.length)] : "c-new";
      const key = keyOf(d, c);
      if (random() < 0.3) {
        truth.delete(key);
        index.set(key, undefined);
      } else {
        const mean = randomMean(random, `dye${d}`, c);
        truth.set(key, mean);
        index.set(key, mean);
      }
      if (step % 97 !== 0) continue;
      checks++;
      expect(index.size).toBe(truth.size);
      const target: Lab = [100 * random(), 160 * random() - 80, 160 * random() - 80];
      const allowed = index.allowedConditions((id) => id !== "c1" || step % 2 === 0);
      const isAllowed = (m: ReplicateMean) => m.conditionId !== "c1" || step % 2 === 0;
      expect(index.countAllowed(allowed)).toBe([...truth.values()].filter(isAllowed).length);

      const box = labBoxForDeltaE00(target, 25);
      const cols = index.fetch(box, allowed);
      const got = Array.from({ length: cols.count }, (_, i) => index.mean(cols.ref[i])).sort((x, y) => (x.dyeId + x.conditionId < y.dyeId + y.conditionId ? -1 : 1));
      const inBox = (m: ReplicateMean) =>
        m.lab[0] >= box.lMin && m.lab[0] <= box.lMax && m.lab[1] >= box.aMin && m.lab[1] <= box.aMax && m.lab[2] >= box.bMin && m.lab[2] <= box.bMax;
      const want = [...truth.values()].filter((m) => isAllowed(m) && inBox(m)).sort((x, y) => (x.dyeId + x.conditionId < y.dyeId + y.conditionId ? -1 : 1));
      expect(got).toEqual(want);

      const limit = 1 + Math.floor(random() * 25);
      const ranked = rankByColourIndexed(target, (b) => index.fetch(b, allowed), { limit, dyeKey: (i) => index.dyeIds[i], startRadius: 0.5 });
      const expected = rankByColourExhaustive(target, [...truth.values()].filter(isAllowed).map((m) => ({ dyeId: m.dyeId, lab: m.lab, payload: m })), limit);
      expect(ranked.hits.map((h) => index.dyeIds[h.dye])).toEqual(expected.map((e) => e.dyeId));
      ranked.hits.forEach((h, i) => {
        expect(h.deltaE00).toBe(expected[i].deltaE00);
        expect(index.mean(h.ref)).toEqual(expected[i].payload);
      });
    }
    expect(checks).toBe(61);
  });

  it("answers get() per group and forgets removed groups", () => {
    const m: ReplicateMean = { dyeId: "d", conditionId: "c", lab: [50, 1, 2], replicates: 2, spreadDeltaE00: 0.3, meanSquaredU: 0.09 };
    const index = new ReplicateMeansIndex([{ key: "k", mean: m }]);
    expect(index.get("k")).toEqual(m);
    const moved = { ...m, lab: [60, 1, 2] as Lab, meanSquaredU: null };
    index.set("k", moved);
    expect(index.get("k")).toEqual(moved);
    expect(index.size).toBe(1);
    index.set("k", undefined);
    expect(index.get("k")).toBeUndefined();
    expect(index.size).toBe(0);
    expect(index.fetch(labBoxForDeltaE00([60, 1, 2], 1000), [true]).count).toBe(0);
  });
});
