/**
 * Search over replicate means (lib/search/replicates) with the exact indexed ranking (lib/search/rank
 * over lib/search/grid), against an exhaustive scan of means computed here by hand. Exactness checks
 * only: no published figures involved.
 */
import { describe, expect, it } from "vitest";
import type { Lab } from "@/lib/color/types";
import { mulberry32 as rng, gaussian } from "@/lib/random";
import { ciede2000 } from "@/lib/search/ciede2000";
import { buildLabGrid, queryLabGrid } from "@/lib/search/grid";
import { rankByColourExhaustive, rankByColourIndexed, type ColourColumns } from "@/lib/search/rank";
import { replicateMeans, replicateMeanUncertainty, type ReplicateRow } from "@/lib/search/replicates";

function rows(random: () => number, dyes: number): ReplicateRow[] {
  const out: ReplicateRow[] = [];
  for (let d = 0; d < dyes; d++) {
    for (const solventId of ["s1", "s2", "s3"]) {
      for (const [acidBase, ph] of [["neutral", null], ["acid", 2], ["base", 12]] as const) {
        if (random() < 0.4) continue;
        const centre: Lab = [20 + 70 * random(), 160 * random() - 80, 160 * random() - 80];
        const n = 1 + Math.floor(random() * 5);
        // A noisy dye scatters widely around its colour; a careful one does not.
        const noise = d % 3 === 0 ? 8 : 0.5;
        for (let k = 0; k < n; k++) {
          out.push({
            dyeId: `dye${String(d).padStart(3, "0")}`,
            conditionId: `${solventId}-${acidBase}-${k % 2}`, // two condition rows per group (e.g. another additive wording)
            solventId,
            acidBase,
            ph,
            lab: [centre[0] + noise * gaussian(random), centre[1] + noise * gaussian(random), centre[2] + noise * gaussian(random)],
          });
        }
      }
    }
  }
  return out;
}

/** Means written out plainly, grouped by dye, solvent, acid/base and pH. */
function handMeans(all: ReplicateRow[]) {
  const groups = new Map<string, ReplicateRow[]>();
  for (const r of all) {
    const k = [r.dyeId, r.solventId, r.acidBase, r.ph].join("|");
    groups.set(k, [...(groups.get(k) ?? []), r]);
  }
  return [...groups.values()].map((g) => ({ dyeId: g[0].dyeId, acidBase: g[0].acidBase, lab: [0, 1, 2].map((c) => g.reduce((s, r) => s + r.lab[c], 0) / g.length) as Lab, n: g.length, rows: g }));
}

describe("replicate means", () => {
  it("groups by dye, solvent, acid/base and pH (not by condition row), with count and RMS ΔE00 spread", () => {
    const all = rows(rng(3), 30);
    const mine = replicateMeans(all);
    const hand = handMeans(all);
    expect(mine).toHaveLength(hand.length);
    mine.forEach((m, i) => {
      expect(m.dyeId).toBe(hand[i].dyeId);
      expect(m.replicates).toBe(hand[i].n);
      for (let c = 0; c < 3; c++) expect(m.lab[c]).toBeCloseTo(hand[i].lab[c], 10);
      const rms = Math.sqrt(hand[i].rows.reduce((s, r) => s + ciede2000(...r.lab, ...hand[i].lab) ** 2, 0) / hand[i].n);
      expect(m.spreadDeltaE00).toBeCloseTo(hand[i].n > 1 ? rms : 0, 10);
    });
  });

  it("indexed ranking over the means equals an exhaustive scan of the means, under filters, limits 1–30", () => {
    const random = rng(5);
    const all = rows(random, 200);
    const means = replicateMeans(all);
    const dyeIds = [...new Set(means.map((m) => m.dyeId))];
    const dyeIndex = new Map(dyeIds.map((id, i) => [id, i]));
    const acidBases = ["neutral", "acid", "base"];
    const cond = Int32Array.from(means.map((m) => acidBases.indexOf(all.find((r) => r.dyeId === m.dyeId && r.conditionId === m.conditionId)!.acidBase)));
    const grid = buildLabGrid({
      key: Int32Array.from(means.map((_, i) => i)),
      cond,
      l: means.map((m) => m.lab[0]),
      a: means.map((m) => m.lab[1]),
      b: means.map((m) => m.lab[2]),
      count: means.length,
      conditions: 3,
    });
    const hand = handMeans(all);
    for (let t = 0; t < 120; t++) {
      const target: Lab = [100 * random(), 200 * random() - 100, 200 * random() - 100];
      const allowed = [random() < 0.7, random() < 0.7, true];
      const limit = 1 + Math.floor(random() * 30);
      const fetch = (box: Parameters<typeof queryLabGrid>[1]): ColourColumns => {
        const out = { dye: [] as number[], l: [] as number[], a: [] as number[], b: [] as number[], ref: [] as number[], count: 0 };
        queryLabGrid(grid, box, allowed, (key, l, a, b) => {
          out.dye.push(dyeIndex.get(means[key].dyeId)!);
          out.l.push(l);
          out.a.push(a);
          out.b.push(b);
          out.ref.push(key);
          out.count++;
        });
        return out;
      };
      const indexed = rankByColourIndexed(target, fetch, { limit, dyeKey: (d) => dyeIds[d], startRadius: 0.3 });
      const expected = rankByColourExhaustive(
        target,
        hand.filter((g) => allowed[acidBases.indexOf(g.acidBase)]).map((g) => ({ dyeId: g.dyeId, lab: g.lab, payload: g })),
        limit,
      );
      expect(indexed.hits.map((h) => dyeIds[h.dye])).toEqual(expected.map((e) => e.dyeId));
      indexed.hits.forEach((h, i) => expect(h.deltaE00).toBeCloseTo(expected[i].deltaE00, 9));
    }
  });

  it("does not reward the luckiest vial: a noisy dye with one replicate on the target ranks below a steady dye near it", () => {
    const target: Lab = [50, 40, -30];
    const near = (dl: number): Lab => [target[0] + dl, target[1], target[2]];
    const all: ReplicateRow[] = [
      // Noisy: one replicate exactly on the target, two far off.
      { dyeId: "noisy", conditionId: "c", solventId: "s", acidBase: "neutral", ph: null, lab: target },
      { dyeId: "noisy", conditionId: "c", solventId: "s", acidBase: "neutral", ph: null, lab: near(15) },
      { dyeId: "noisy", conditionId: "c", solventId: "s", acidBase: "neutral", ph: null, lab: near(13) },
      // Steady: three replicates about 2 L* units away.
      ...[2, 2.2, 1.8].map((dl) => ({ dyeId: "steady", conditionId: "c", solventId: "s", acidBase: "neutral", ph: null, lab: near(dl) })),
    ];
    const ranked = rankByColourExhaustive(target, replicateMeans(all).map((m) => ({ dyeId: m.dyeId, lab: m.lab, payload: m })), 2);
    expect(ranked.map((r) => r.dyeId)).toEqual(["steady", "noisy"]);
    // Ranking single vials would have put the noisy dye first (ΔE00 0).
    const byVial = rankByColourExhaustive(target, all.map((r) => ({ dyeId: r.dyeId, lab: r.lab, payload: r })), 2);
    expect(byVial[0].dyeId).toBe("noisy");
    expect(ranked[1].payload.spreadDeltaE00).toBeGreaterThan(5);
  });

  it("carries mean(uᵢ²) of the replicates that have a ± ΔE00, and u = √(mean(uᵢ²) + s²/n) from it (GUM §4.2.3; values worked by hand)", () => {
    const at = (u: number | null | undefined, ph: number | null): ReplicateRow => ({ dyeId: "d", conditionId: "c", solventId: "s", acidBase: "neutral", ph, lab: [50, 0, 0], u });
    const [withU, withoutU] = replicateMeans([at(0.3, 7), at(null, 7), at(0.4, 7), at(null, null), at(undefined, null)]);
    // (0.3² + 0.4²) / 2 = 0.125: the replicate without a figure neither counts nor adds a zero.
    expect(withU.meanSquaredU).toBeCloseTo(0.125, 14);
    expect(withoutU.meanSquaredU).toBeNull();
    expect(replicateMeanUncertainty({ meanSquaredU: 0.125, replicates: 3, spreadDeltaE00: 0.6 })).toBeCloseTo(Math.sqrt(0.125 + 0.36 / 3), 14);
    expect(replicateMeanUncertainty({ meanSquaredU: 0.25, replicates: 1, spreadDeltaE00: 0 })).toBe(0.5);
    expect(replicateMeanUncertainty({ meanSquaredU: null, replicates: 3, spreadDeltaE00: 0.6 })).toBeNull();
  });
});
