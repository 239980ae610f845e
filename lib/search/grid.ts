import type { LabBox } from "./bound";

/**
 * An in-memory bucket index of colours for the box prefilter of the exact colour search
 * (lib/search/rank). Colours are grouped by condition (a small integer per colour), then by a coarse
 * CIELAB cell, so a box query under a condition filter reads only the allowed conditions' colours in
 * the cells the box touches: one contiguous run of colours per (condition, L cell, a cell).
 *
 * Exactness: every colour lies in exactly one cell (coordinates outside the gridded range fall into
 * the edge cells, which are open-ended), and a query visits every cell that overlaps the box, so
 * every colour inside the box is returned. The grid never decides a result; the caller re-ranks.
 */

/** Cell sizes and ranges (CIELAB units). Edge cells also hold everything beyond the range. */
const L_STEP = 10;
const L_CELLS = 10; // [0, 100]
const AB_STEP = 10;
const AB_MIN = -130;
const AB_CELLS = 26; // [−130, 130]
const CELLS = L_CELLS * AB_CELLS * AB_CELLS;

const cellOf = (v: number, min: number, step: number, n: number): number => {
  const c = Math.floor((v - min) / step);
  return c < 0 ? 0 : c >= n ? n - 1 : c; // also maps NaN to 0 (never stored in practice)
};
const lCell = (l: number) => cellOf(l, 0, L_STEP, L_CELLS);
const abCell = (v: number) => cellOf(v, AB_MIN, AB_STEP, AB_CELLS);

export type GridInput = {
  /** Caller's key per colour (e.g. an R*Tree key), returned by queries. */
  key: ArrayLike<number>;
  /** Condition index per colour, 0 ≤ cond < conditions. */
  cond: ArrayLike<number>;
  l: ArrayLike<number>;
  a: ArrayLike<number>;
  b: ArrayLike<number>;
  count: number;
  conditions: number;
};

export type LabGrid = {
  conditions: number;
  /** Colours in (condition, L cell, a cell, b cell) order. */
  key: Int32Array;
  l: Float64Array;
  a: Float64Array;
  b: Float64Array;
  /** start[cond·CELLS + cell] … start[… + 1]: that cell's colours. */
  start: Int32Array;
  count: number;
};

/** Builds the grid with a counting sort: O(colours + conditions · cells). */
export function buildLabGrid(input: GridInput): LabGrid {
  const { count, conditions } = input;
  const slot = new Int32Array(count);
  const start = new Int32Array(conditions * CELLS + 1);
  for (let i = 0; i < count; i++) {
    const c = input.cond[i];
    if (!(c >= 0 && c < conditions)) throw new RangeError(`condition index ${c} out of range 0–${conditions - 1}`);
    const s = c * CELLS + (lCell(input.l[i]) * AB_CELLS + abCell(input.a[i])) * AB_CELLS + abCell(input.b[i]);
    slot[i] = s;
    start[s + 1]++;
  }
  for (let s = 0; s < conditions * CELLS; s++) start[s + 1] += start[s];
  const fill = start.slice(0, conditions * CELLS);
  const key = new Int32Array(count);
  const l = new Float64Array(count);
  const a = new Float64Array(count);
  const b = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    const j = fill[slot[i]]++;
    key[j] = input.key[i];
    l[j] = input.l[i];
    a[j] = input.a[i];
    b[j] = input.b[i];
  }
  return { conditions, key, l, a, b, start, count };
}

/**
 * Calls `visit(key, l, a, b)` for every colour of an allowed condition inside the box (closed
 * bounds, infinite sides allowed); colours outside the box are not visited.
 */
export function queryLabGrid(
  grid: LabGrid,
  box: LabBox,
  allowed: ArrayLike<boolean>,
  visit: (key: number, l: number, a: number, b: number) => void,
): void {
  const l0 = lCell(box.lMin);
  const l1 = lCell(box.lMax);
  const a0 = abCell(box.aMin);
  const a1 = abCell(box.aMax);
  const b0 = abCell(box.bMin);
  const b1 = abCell(box.bMax);
  const { lMin, lMax, aMin, aMax, bMin, bMax } = box;
  const { start, key, l, a, b } = grid;
  for (let c = 0; c < grid.conditions; c++) {
    if (!allowed[c]) continue;
    const base = c * CELLS;
    if (start[base] === start[base + CELLS]) continue; // condition without colours
    for (let li = l0; li <= l1; li++)
      for (let ai = a0; ai <= a1; ai++) {
        const row = base + (li * AB_CELLS + ai) * AB_CELLS;
        const end = start[row + b1 + 1];
        for (let j = start[row + b0]; j < end; j++) {
          const lj = l[j];
          const aj = a[j];
          const bj = b[j];
          if (lj >= lMin && lj <= lMax && aj >= aMin && aj <= aMax && bj >= bMin && bj <= bMax) visit(key[j], lj, aj, bj);
        }
      }
  }
}
