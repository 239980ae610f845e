/**
 * The in-memory grid index behind the colour search (lib/search/grid) against a plain scan, and the
 * indexed ranking fed by it, shells only (each round returns only what lies outside the last box),
 * against exhaustive ranking. Exactness checks only: no published figures involved.
 */
import { describe, expect, it } from "vitest";
import type { Lab } from "@/lib/color/types";
import { boxContains, type LabBox } from "@/lib/search/bound";
import { buildLabGrid, queryLabGrid } from "@/lib/search/grid";
import { rankByColourExhaustive, rankByColourIndexed, smallest, type ColourColumns } from "@/lib/search/rank";
import { mulberry32 as rng } from "@/lib/random";

/** Colours in and beyond the gridded range (L outside 0–100, |a|, |b| up to 200), some on cell edges. */
function colours(random: () => number, n: number, conditions: number) {
  const cond = new Int32Array(n);
  const dye = new Int32Array(n);
  const l = new Float64Array(n);
  const a = new Float64Array(n);
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    cond[i] = Math.floor(random() * conditions);
    dye[i] = Math.floor(random() * (n / 8));
    const edge = i % 7 === 0;
    l[i] = edge ? 10 * Math.round(random() * 11) - 5 : random() * 110 - 5;
    a[i] = edge ? 10 * Math.round(random() * 40 - 20) : random() * 400 - 200;
    b[i] = edge ? -130 : random() * 400 - 200;
  }
  return { key: Int32Array.from({ length: n }, (_, i) => i), cond, dye, l, a, b, count: n, conditions };
}

describe("buildLabGrid / queryLabGrid", () => {
  const random = rng(11);
  const data = colours(random, 20_000, 7);
  const grid = buildLabGrid(data);

  it("returns exactly the allowed colours inside the box, for finite, half-open and unbounded boxes", () => {
    for (let t = 0; t < 300; t++) {
      const allowed = Array.from({ length: 7 }, () => random() < 0.5);
      const c: Lab = [random() * 120 - 10, random() * 300 - 150, random() * 300 - 150];
      const w = t % 10 === 0 ? Infinity : random() * 60;
      const box: LabBox = { lMin: c[0] - w, lMax: c[0] + random() * 30, aMin: c[1] - w, aMax: c[1] + w, bMin: t % 3 === 0 ? -Infinity : c[2] - w, bMax: c[2] + w };
      const got: number[] = [];
      queryLabGrid(grid, box, allowed, (key, l, a, b) => {
        expect([l, a, b]).toEqual([data.l[key], data.a[key], data.b[key]]);
        got.push(key);
      });
      const want: number[] = [];
      for (let i = 0; i < data.count; i++) if (allowed[data.cond[i]] && boxContains(box, data.l[i], data.a[i], data.b[i])) want.push(i);
      expect(got.sort((x, y) => x - y)).toEqual(want);
    }
  });

  it("rejects a condition index outside the declared range", () => {
    expect(() => buildLabGrid({ ...data, conditions: 3 })).toThrow(/condition index/);
  });
});

describe("rankByColourIndexed over the grid", () => {
  it("equals exhaustive ranking under condition filters, computing ΔE00 at most once per colour", () => {
    const random = rng(5);
    const data = colours(random, 30_000, 9);
    const grid = buildLabGrid(data);
    for (let t = 0; t < 60; t++) {
      const allowed = Array.from({ length: 9 }, (_, k) => k === t % 9 || random() < 0.3);
      const target: Lab = [random() * 100, random() * 200 - 100, random() * 200 - 100];
      const fetch = (box: LabBox): ColourColumns => {
        const keys: number[] = [];
        queryLabGrid(grid, box, allowed, (key) => keys.push(key));
        return {
          dye: keys.map((k) => data.dye[k]),
          l: keys.map((k) => data.l[k]),
          a: keys.map((k) => data.a[k]),
          b: keys.map((k) => data.b[k]),
          ref: keys,
          count: keys.length,
        };
      };
      const limit = 1 + (t % 25);
      const got = rankByColourIndexed(target, fetch, { limit, dyeKey: (d) => `d${String(d).padStart(6, "0")}`, startRadius: 0.3 });
      const candidates = [];
      for (let i = 0; i < data.count; i++)
        if (allowed[data.cond[i]]) candidates.push({ dyeId: `d${String(data.dye[i]).padStart(6, "0")}`, lab: [data.l[i], data.a[i], data.b[i]] as Lab, payload: i });
      const want = rankByColourExhaustive(target, candidates, limit);
      expect(got.hits.map((h) => [`d${String(h.dye).padStart(6, "0")}`, h.deltaE00])).toEqual(want.map((w) => [w.dyeId, w.deltaE00]));
      // The hit's colour is the one its distance was computed for.
      for (const h of got.hits) expect(h.lab).toEqual([data.l[h.ref], data.a[h.ref], data.b[h.ref]]);
      // Each colour compared at most once over all rounds.
      expect(got.scanned).toBeLessThanOrEqual(candidates.length);
    }
  });
});

describe("smallest (the per-round selection of rankByColourIndexed)", () => {
  it("equals sorting and slicing, ties, infinities and short inputs included", () => {
    const random = rng(3);
    for (let t = 0; t < 200; t++) {
      const values = Float64Array.from({ length: 50 }, () => (random() < 0.1 ? Infinity : Math.round(random() * 20) / 4));
      const of = Array.from({ length: Math.floor(random() * 50) }, () => Math.floor(random() * 50));
      const k = Math.floor(random() * 25);
      const want = of.map((i) => values[i]).sort((x, y) => x - y).slice(0, k);
      expect([...smallest(of, values, k)]).toEqual(want);
    }
  });
});
