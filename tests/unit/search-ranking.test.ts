/**
 * The colour ranking: the inlined CIEDE2000 against the published test pairs, the ΔE00 → Lab box
 * bound against brute force on random pairs, and the indexed top-k against exhaustive ranking.
 */
import { describe, expect, it } from "vitest";
import { deltaE00 as culoriDeltaE00 } from "@/lib/color/difference";
import type { Lab } from "@/lib/color/types";
import { boxContains, ellipsoidMetric, labBoxForDeltaE00, type LabBox } from "@/lib/search/bound";
import { ciede2000 } from "@/lib/search/ciede2000";
import { rankByColourExhaustive, rankByColourIndexed, type ColourColumns } from "@/lib/search/rank";
import { readFixtureCsv } from "../support/fixtures";
import { gaussian, mulberry32 as rng } from "@/lib/random";

/** Sharma et al. print ΔE00 to 4 decimals. */
const TABLE_TOLERANCE = 5e-5;

describe("ciede2000 (inlined)", () => {
  // Sharma, Wu & Dalal, Color Res. Appl. 30 (2005) 21–30, Table 1 (tests/fixtures/ciede2000_sharma2005_table1.csv).
  const rows = readFixtureCsv("ciede2000_sharma2005_table1.csv");
  it("has the 34 published pairs", () => expect(rows).toHaveLength(34));
  it.each(rows.map((r) => [r.pair, r] as const))("matches Sharma 2005 Table 1 pair %s, both ways round", (_, r) => {
    const [L1, a1, b1, L2, a2, b2, de] = ["L1", "a1", "b1", "L2", "a2", "b2", "dE00"].map((k) => Number(r[k]));
    expect(Math.abs(ciede2000(L1, a1, b1, L2, a2, b2) - de)).toBeLessThan(TABLE_TOLERANCE);
    expect(Math.abs(ciede2000(L2, a2, b2, L1, a1, b1) - de)).toBeLessThan(TABLE_TOLERANCE);
  });

  it("agrees with culori's CIEDE2000 on 20 000 random pairs, neutrals and saturated colours included", () => {
    const random = rng(7);
    let worst = 0;
    for (let i = 0; i < 20_000; i++) {
      const x: Lab = [random() * 100, (random() - 0.5) * 260, (random() - 0.5) * 260];
      const y: Lab = i % 5 === 0 ? [random() * 100, 0, 0] : [random() * 100, (random() - 0.5) * 260, (random() - 0.5) * 260];
      worst = Math.max(worst, Math.abs(ciede2000(...x, ...y) - culoriDeltaE00(x, y)));
    }
    expect(worst).toBeLessThan(1e-9);
  });

  it("is zero for identical colours and for two neutrals of the same lightness", () => {
    expect(ciede2000(50, 20, -30, 50, 20, -30)).toBe(0);
    expect(ciede2000(70, 0, 0, 70, 0, 0)).toBe(0);
  });
});

/** A colour chosen to stress the bound: blue region (large RT), saturated, neutral, extreme L. */
function stressColour(random: () => number, kind: number): Lab {
  switch (kind % 6) {
    case 0: {
      const h = ((255 + random() * 40) * Math.PI) / 180; // around h̄′ = 275°, where RT peaks
      const c = 20 + random() * 110;
      return [random() * 100, c * Math.cos(h), c * Math.sin(h)];
    }
    case 1:
      return [random() * 100, (random() - 0.5) * 2, (random() - 0.5) * 2]; // near-neutral
    case 2: {
      const h = random() * 2 * Math.PI;
      return [random() * 100, 128 * Math.cos(h), 128 * Math.sin(h)]; // saturated
    }
    case 3:
      return [random() < 0.5 ? random() * 3 : 97 + random() * 3, (random() - 0.5) * 60, (random() - 0.5) * 60];
    default:
      return [random() * 100, (random() - 0.5) * 200, (random() - 0.5) * 200];
  }
}

describe("labBoxForDeltaE00: every colour within ΔE00 ≤ r lies in the box", () => {
  it("holds with r set to the pair's own ΔE00 (the tightest case) for 200 000 random pairs", () => {
    const random = rng(11);
    let failures = 0;
    for (let i = 0; i < 200_000; i++) {
      const t = stressColour(random, i);
      const near: Lab = random() < 0.5 ? [t[0] + (random() - 0.5) * 20, t[1] + (random() - 0.5) * 40, t[2] + (random() - 0.5) * 40] : stressColour(random, i + 1);
      const d = ciede2000(...t, ...near);
      if (!boxContains(labBoxForDeltaE00(t, d), ...near)) failures++;
    }
    expect(failures).toBe(0);
  });

  it("holds for colours on the surface ΔE00 = r itself (found by bisection along random rays), r from 0.5 to 15", () => {
    const random = rng(17);
    let failures = 0;
    for (let i = 0; i < 20_000; i++) {
      const t = stressColour(random, i);
      const r = 0.5 + random() * 14.5;
      const u = [gaussian(random), gaussian(random), gaussian(random)];
      const n = Math.hypot(...u);
      const at = (s: number): Lab => [t[0] + (s * u[0]) / n, t[1] + (s * u[1]) / n, t[2] + (s * u[2]) / n];
      let lo = 0;
      let hi = 1;
      while (ciede2000(...t, ...at(hi)) < r && hi < 1e4) hi *= 2;
      for (let k = 0; k < 60; k++) {
        const mid = (lo + hi) / 2;
        if (ciede2000(...t, ...at(mid)) < r) lo = mid;
        else hi = mid;
      }
      const p = at(lo); // just inside: ΔE00 < r
      if (!boxContains(labBoxForDeltaE00(t, r), ...p)) failures++;
    }
    expect(failures).toBe(0);
  });

  it("so does the ellipsoid inscribed in the box (step 7), for 200 000 random pairs at r = their own ΔE00 and on the published pairs", () => {
    const random = rng(23);
    const inside = (t: Lab, r: number, x: Lab) => {
      const box = labBoxForDeltaE00(t, r);
      const half = (lo: number, hi: number) => (hi - lo) / 2;
      return ellipsoidMetric(x[0] - t[0], x[1] - t[1], x[2] - t[2], half(box.lMin, box.lMax), half(box.aMin, box.aMax), half(box.bMin, box.bMax)) <= 1;
    };
    let failures = 0;
    let cornersCut = 0;
    for (let i = 0; i < 200_000; i++) {
      const t = stressColour(random, i);
      const near: Lab = random() < 0.5 ? [t[0] + (random() - 0.5) * 20, t[1] + (random() - 0.5) * 40, t[2] + (random() - 0.5) * 40] : stressColour(random, i + 1);
      const d = ciede2000(...t, ...near);
      if (!inside(t, d, near)) failures++;
      // Not vacuous: a box corner at a finite radius lies outside.
      const box = labBoxForDeltaE00(t, 2);
      if (!inside(t, 2, [box.lMax, box.aMax, box.bMax])) cornersCut++;
    }
    expect(failures).toBe(0);
    expect(cornersCut).toBe(200_000);
    // Sharma, Wu & Dalal 2005, Table 1 (tests/fixtures/ciede2000_sharma2005_table1.csv).
    for (const r of readFixtureCsv("ciede2000_sharma2005_table1.csv")) {
      const x: Lab = [Number(r.L1), Number(r.a1), Number(r.b1)];
      const y: Lab = [Number(r.L2), Number(r.a2), Number(r.b2)];
      const d = ciede2000(...x, ...y);
      expect(inside(x, d, y) && inside(y, d, x)).toBe(true);
    }
  });

  it("holds on the published pairs (Sharma 2005 Table 1) with r = their ΔE00", () => {
    for (const r of readFixtureCsv("ciede2000_sharma2005_table1.csv")) {
      const x: Lab = [Number(r.L1), Number(r.a1), Number(r.b1)];
      const y: Lab = [Number(r.L2), Number(r.a2), Number(r.b2)];
      const d = ciede2000(...x, ...y);
      expect(boxContains(labBoxForDeltaE00(x, d), ...y)).toBe(true);
      expect(boxContains(labBoxForDeltaE00(y, d), ...x)).toBe(true);
    }
  });

  it("is not vacuous: for small radii it excludes most of the space", () => {
    const box = labBoxForDeltaE00([50, 0, 0], 2);
    expect(box.lMax - box.lMin).toBeLessThan(5);
    expect(box.aMax - box.aMin).toBeLessThan(14);
    expect(boxContains(box, 50, 30, 0)).toBe(false);
  });

  it("opens up (infinite sides) for radii where no finite a–b bound follows, and rejects a negative radius", () => {
    const box = labBoxForDeltaE00([50, 10, 10], 20);
    expect(box.aMax).toBe(Infinity);
    expect(Number.isFinite(box.lMax)).toBe(true);
    expect(labBoxForDeltaE00([50, 10, 10], 200).lMax).toBe(Infinity);
    expect(() => labBoxForDeltaE00([50, 0, 0], -1)).toThrow(/radius/);
  });
});

type World = { cols: ColourColumns; ids: string[]; points: { dyeId: string; lab: Lab; payload: number }[] };

function makeWorld(seed: number, dyes: number, perDye: number, { grid = false } = {}): World {
  const random = rng(seed);
  const ids = Array.from({ length: dyes }, (_, i) => `dye_${String(i).padStart(4, "0")}`);
  const n = dyes * perDye;
  const cols: ColourColumns = { dye: new Int32Array(n), l: new Float64Array(n), a: new Float64Array(n), b: new Float64Array(n), ref: new Int32Array(n), count: n };
  const points: World["points"] = [];
  let k = 0;
  for (let d = 0; d < dyes; d++) {
    const base = stressColour(random, d);
    for (let j = 0; j < perDye; j++) {
      // grid = coarse integer coordinates, so many colours (and many dyes) tie exactly
      const lab: Lab = grid
        ? [Math.round(random() * 4) * 10 + 30, Math.round((random() - 0.5) * 6) * 10, Math.round((random() - 0.5) * 6) * 10]
        : [Math.min(100, Math.max(0, base[0] + (random() - 0.5) * 30)), base[1] + (random() - 0.5) * 50, base[2] + (random() - 0.5) * 50];
      cols.dye[k] = d;
      [cols.l[k], cols.a[k], cols.b[k]] = lab;
      cols.ref[k] = k;
      points.push({ dyeId: ids[d], lab, payload: k });
      k++;
    }
  }
  return { cols, ids, points };
}

/** An in-memory box fetch with a filter, standing in for the R*Tree query (the integration test uses SQLite). */
function fetchFrom(world: World, keep: (i: number) => boolean = () => true) {
  return (box: LabBox): ColourColumns => {
    const out = { dye: [] as number[], l: [] as number[], a: [] as number[], b: [] as number[], ref: [] as number[], count: 0 };
    const c = world.cols;
    for (let i = 0; i < c.count; i++) {
      if (!keep(i) || !boxContains(box, c.l[i], c.a[i], c.b[i])) continue;
      out.dye.push(c.dye[i]);
      out.l.push(c.l[i]);
      out.a.push(c.a[i]);
      out.b.push(c.b[i]);
      out.ref.push(c.ref[i]);
      out.count++;
    }
    return out;
  };
}

function compare(world: World, target: Lab, limit: number, keep: (i: number) => boolean = () => true, startRadius?: number) {
  const fast = rankByColourIndexed(target, fetchFrom(world, keep), { limit, dyeKey: (d) => world.ids[d], startRadius });
  const brute = rankByColourExhaustive(target, world.points.filter((p) => keep(p.payload)), limit);
  expect(fast.hits.map((h) => world.ids[h.dye])).toEqual(brute.map((b) => b.dyeId));
  expect(fast.hits.map((h) => h.deltaE00)).toEqual(brute.map((b) => b.deltaE00));
  return fast;
}

describe("rankByColourIndexed equals exhaustive ranking", () => {
  const world = makeWorld(3, 400, 25);

  it("on 300 random targets, limits 1–40, from tiny and large start radii", () => {
    const random = rng(5);
    for (let q = 0; q < 300; q++) {
      const target = stressColour(random, q);
      compare(world, target, 1 + Math.floor(random() * 40), undefined, q % 3 === 0 ? 0.1 : q % 3 === 1 ? 3 : 25);
    }
  });

  it("under condition filters, a sparse filter and an empty one", () => {
    const random = rng(9);
    for (let q = 0; q < 60; q++) compare(world, stressColour(random, q), 20, (i) => i % 7 === 3);
    compare(world, [40, 60, -60], 20, (i) => i === 12 || i === 5000);
    const none = compare(world, [40, 60, -60], 20, () => false);
    expect(none.hits).toEqual([]);
  });

  it("terminates and is exact from a zero or non-finite start radius, and on an empty store", () => {
    compare(world, [50, 20, 20], 10, undefined, 0);
    compare(world, [50, 20, 20], 10, undefined, Number.NaN);
    const empty = rankByColourIndexed([50, 0, 0], () => ({ dye: [], l: [], a: [], b: [], ref: [], count: 0 }), { limit: 5, dyeKey: String, startRadius: 0 });
    expect(empty.hits).toEqual([]);
  });

  it("when fewer dyes than the limit match, returns them all", () => {
    const small = makeWorld(4, 5, 3);
    expect(compare(small, [50, 0, 0], 20).hits).toHaveLength(5);
  });

  it("with exact ties between dyes (integer grid colours), broken by dye id like brute force", () => {
    const grid = makeWorld(6, 300, 4, { grid: true });
    const random = rng(13);
    for (let q = 0; q < 80; q++) {
      const target: Lab = q % 2 ? [Math.round(random() * 4) * 10 + 30, Math.round((random() - 0.5) * 6) * 10, Math.round((random() - 0.5) * 6) * 10] : stressColour(random, q);
      compare(grid, target, 1 + (q % 25));
    }
  });

  it("returns one hit per dye, ascending", () => {
    const { hits } = compare(world, [60, -20, 40], 30);
    expect(new Set(hits.map((h) => h.dye)).size).toBe(hits.length);
    for (let i = 1; i < hits.length; i++) expect(hits[i].deltaE00).toBeGreaterThanOrEqual(hits[i - 1].deltaE00);
  });
});
