import type { Lab } from "@/lib/color/types";
import { boxIsUnbounded, ellipsoidMetric, labBoxForDeltaE00, type LabBox } from "./bound";
import { ciede2000 } from "./ciede2000";

export type Candidate<T> = { dyeId: string; lab: Lab; payload: T };
export type Ranked<T> = Candidate<T> & { deltaE00: number };

/** Orders by ΔE00 ascending, ties by dye id, so brute force and the indexed search agree exactly. */
function compareRanked(x: { deltaE00: number; dyeId: string }, y: { deltaE00: number; dyeId: string }): number {
  return x.deltaE00 - y.deltaE00 || (x.dyeId < y.dyeId ? -1 : x.dyeId > y.dyeId ? 1 : 0);
}

/**
 * Exact ranking by CIEDE2000 to a target, one result per dye (its closest colour), ascending, by
 * looking at every candidate. The reference the indexed search is tested against.
 * Within one dye, the first of equally close colours wins.
 */
export function rankByColourExhaustive<T>(target: Lab, candidates: Iterable<Candidate<T>>, limit: number): Ranked<T>[] {
  const best = new Map<string, Ranked<T>>();
  const [L, A, B] = target;
  for (const c of candidates) {
    const d = ciede2000(L, A, B, c.lab[0], c.lab[1], c.lab[2]);
    const prev = best.get(c.dyeId);
    if (!prev || d < prev.deltaE00) best.set(c.dyeId, { ...c, deltaE00: d });
  }
  return [...best.values()].sort(compareRanked).slice(0, limit);
}

/** Columnar candidates returned by a box fetch (typed arrays keep the hot loop allocation-free). */
export type ColourColumns = {
  /** Dense dye index per colour (any integer id; mapped back through `dyeIds`). */
  dye: Int32Array | number[];
  l: Float64Array | number[];
  a: Float64Array | number[];
  b: Float64Array | number[];
  /** Caller's reference per colour (e.g. a row number), returned with the winner. */
  ref: Int32Array | number[];
  count: number;
};

/**
 * The candidates whose colour lies in a box, already restricted to the condition filters.
 * Must return every stored colour inside the box (extra colours outside it are harmless).
 */
export type BoxFetch = (box: LabBox) => ColourColumns;

/** The `k` smallest of `values[i]` over the indices `of`, ascending (fewer when `of` is shorter). */
export function smallest(of: readonly number[], values: Float64Array, k: number): Float64Array {
  const top = new Float64Array(Math.max(0, k));
  let n = 0;
  for (const i of of) {
    const v = values[i];
    if (n === k && !(v < top[n - 1])) continue;
    // Insertion into the sorted buffer, dropping its largest when full.
    let j = n < k ? n++ : n - 1;
    while (j > 0 && top[j - 1] > v) {
      top[j] = top[j - 1];
      j--;
    }
    top[j] = v;
  }
  return top.subarray(0, n);
}

export type IndexedHit = { dye: number; ref: number; lab: Lab; deltaE00: number };
export type IndexedRanking = {
  hits: IndexedHit[];
  /** ΔE00 radius whose box was searched last. */
  radius: number;
  rounds: number;
  /** Colours compared by exact CIEDE2000, all rounds together (each at most once). */
  scanned: number;
};

/**
 * Exact top-`limit` dyes by CIEDE2000, one hit per dye, using a box prefilter (an R*Tree in practice).
 *
 * Round by round: fetch the box {@link labBoxForDeltaE00}(target, r), which holds every colour within
 * ΔE00 ≤ r, and so does the ellipsoid inscribed in it. Compute ΔE00 exactly for each fetched colour
 * inside this round's ellipsoid and not inside the last round's (those were computed then: by
 * induction every colour in the current ellipsoid has been computed), and keep each dye's best over
 * all rounds. A dye whose best is ≤ r is exact: any closer colour of that dye would also be within r,
 * hence in the ellipsoid, hence computed. If at least `limit` dyes are exact, they are the answer:
 * every other dye's true best is > r. Otherwise grow r: to the `limit`-th best ΔE00 seen so far when
 * `limit` dyes were seen at all (their bests are upper bounds of the true ones, so the true `limit`-th
 * distance is no larger and the next round finishes), else multiplied by `growth`. A box with no
 * finite side sees everything, so the last round is always exact.
 * Ties are broken by the dye's `dyeKey` (its id), as in {@link rankByColourExhaustive}.
 */
export function rankByColourIndexed(
  target: Lab,
  fetch: BoxFetch,
  { limit, dyeKey, startRadius = 0.5, growth = 1.6 }: { limit: number; dyeKey: (dye: number) => string; startRadius?: number; growth?: number },
): IndexedRanking {
  const [L, A, B] = target;
  // A zero or invalid start could never grow; fall back to a small positive radius.
  let r = startRadius > 0 && Number.isFinite(startRadius) ? startRadius : 0.5;
  let rounds = 0;
  let scanned = 0;
  // Each dye's best colour over every round so far (the union of the boxes fetched, which holds the
  // current box), indexed by the dye number (dense in practice).
  let bestD = new Float64Array(0);
  let bestRef = new Int32Array(0);
  let bestLab = new Float64Array(0);
  const touched: number[] = [];
  // Half-widths of the last round's ellipsoid (unused in the first round).
  let pl = 0;
  let pa = 0;
  let pb = 0;
  for (;;) {
    rounds++;
    const box = labBoxForDeltaE00(target, r);
    const all = boxIsUnbounded(box);
    const cols = fetch(box);
    const wl = (box.lMax - box.lMin) / 2;
    const wa = (box.aMax - box.aMin) / 2;
    const wb = (box.bMax - box.bMin) / 2;
    let maxDye = -1;
    for (let i = 0; i < cols.count; i++) if (cols.dye[i] > maxDye) maxDye = cols.dye[i];
    if (bestD.length <= maxDye) {
      const n = Math.max(maxDye + 1, 2 * bestD.length);
      const d = new Float64Array(n).fill(Infinity);
      d.set(bestD);
      const ref = new Int32Array(n);
      ref.set(bestRef);
      const lab = new Float64Array(3 * n);
      lab.set(bestLab);
      bestD = d;
      bestRef = ref;
      bestLab = lab;
    }
    const first = rounds === 1;
    for (let i = 0; i < cols.count; i++) {
      const dl = cols.l[i] - L;
      const da = cols.a[i] - A;
      const db = cols.b[i] - B;
      if (ellipsoidMetric(dl, da, db, wl, wa, wb) > 1) continue; // farther than r: not needed yet
      if (!first && ellipsoidMetric(dl, da, db, pl, pa, pb) <= 1) continue; // computed last round
      scanned++;
      const d = ciede2000(L, A, B, cols.l[i], cols.a[i], cols.b[i]);
      const dye = cols.dye[i];
      const prev = bestD[dye];
      if (prev === Infinity) touched.push(dye);
      if (d < prev) {
        bestD[dye] = d;
        bestRef[dye] = cols.ref[i];
        bestLab[3 * dye] = cols.l[i];
        bestLab[3 * dye + 1] = cols.a[i];
        bestLab[3 * dye + 2] = cols.b[i];
      }
    }
    // The `limit` smallest bests (ascending) and how many bests are ≤ r; no full sort per round.
    const dists = smallest(touched, bestD, limit);
    let exactCount = 0;
    if (all) exactCount = touched.length;
    else for (const dye of touched) if (bestD[dye] <= r) exactCount++;
    if (all || exactCount >= limit) {
      // Everything up to the limit-th distance, ties included, then the exact order (ΔE00, dye id).
      const cut = Math.min(limit, exactCount);
      const threshold = cut > 0 ? dists[cut - 1] : -Infinity;
      const chosen = touched
        .filter((dye) => bestD[dye] <= threshold)
        .map((dye) => ({ dye, deltaE00: bestD[dye], dyeId: dyeKey(dye) }))
        .sort(compareRanked)
        .slice(0, cut);
      const hits = chosen.map(
        ({ dye, deltaE00 }): IndexedHit => ({ dye, ref: bestRef[dye], lab: [bestLab[3 * dye], bestLab[3 * dye + 1], bestLab[3 * dye + 2]], deltaE00 }),
      );
      return { hits, radius: r, rounds, scanned };
    }
    pl = wl;
    pa = wa;
    pb = wb;
    // The limit-th best seen bounds the true limit-th distance from above, so that radius finishes.
    r = dists.length >= limit ? Math.max(dists[limit - 1], r * 1.01) : r * growth;
  }
}
