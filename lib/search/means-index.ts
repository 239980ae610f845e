import type { LabBox } from "./bound";
import { buildLabGrid, queryLabGrid, type LabGrid } from "./grid";
import type { ColourColumns } from "./rank";
import type { ReplicateMean } from "./replicates";

/**
 * The replicate means of every (dye, solvent, acid/base, pH) group, held in memory for the exact colour
 * search and updated one group at a time, so that one accepted measurement costs one mean, not a
 * rebuild of all of them.
 *
 * Each mean lives in a numbered slot. Slots up to `gridded` are in a bucket grid (lib/search/grid);
 * a group whose mean changes gets a new slot in a small overflow list, and its old slot is marked dead.
 * A box query reads the grid (skipping dead slots) and scans the overflow list, so it returns exactly the
 * live means inside the box, whatever was changed. When the overflow list outgrows a sixteenth of the
 * means (at least {@link MIN_OVERFLOW}), the grid is rebuilt from the live slots (renumbered when more
 * than half the slots are dead). A slot's mean is kept in columns (no object per mean: at a million
 * measurements the objects alone took about 100 MB); {@link mean} assembles one on demand.
 */
const MIN_OVERFLOW = 1024;

export type KeyedMean = { key: string; mean: ReplicateMean };

export class ReplicateMeansIndex {
  /** Dense dye number → dye id. */
  readonly dyeIds: string[] = [];
  private readonly dyeIndex = new Map<string, number>();
  /** Dense condition number → condition id. */
  readonly condIds: string[] = [];
  private readonly condIndex = new Map<string, number>();
  /** Live means per condition number (the filter's share of the means, for the start radius). */
  private liveByCond: number[] = [];

  /** Replicates per slot; 0 marks a dead slot. */
  private slotReplicates: number[] = [];
  private slotSpread: number[] = [];
  /** Mean uᵢ² of the replicates that have a ± ΔE00; NaN when none has (the tie rule's input). */
  private slotMeanSqU: number[] = [];
  private slotDye: number[] = [];
  private slotCond: number[] = [];
  private slotLab: number[] = [];
  private groups = new Map<string, number>();
  private live = 0;

  private grid!: LabGrid;
  private gridded = 0;
  private overflow: number[] = [];

  private out = { dye: new Int32Array(0), l: new Float64Array(0), a: new Float64Array(0), b: new Float64Array(0), ref: new Int32Array(0) };

  constructor(means: Iterable<KeyedMean>) {
    for (const { key, mean } of means) this.add(key, mean);
    this.regrid();
  }

  /**
   * The same index built step by step: yields after every `every` means, so a caller can spread the
   * build over event-loop turns (lib/ops/slices); the grid is built in the last step.
   */
  static *building(means: Iterable<KeyedMean>, every = 256): Generator<void, ReplicateMeansIndex> {
    const index = new ReplicateMeansIndex([]);
    let n = 0;
    for (const { key, mean } of means) {
      index.add(key, mean);
      if (++n % every === 0) yield;
    }
    index.regrid();
    return index;
  }

  /** Live means (groups with at least one accepted replicate). */
  get size(): number {
    return this.live;
  }

  /** The mean in a slot returned by {@link fetch} (live at the time of the fetch). */
  mean(slot: number): ReplicateMean {
    if (!(this.slotReplicates[slot] > 0)) throw new RangeError(`slot ${slot} holds no mean`);
    const lab = this.slotLab;
    return {
      dyeId: this.dyeIds[this.slotDye[slot]],
      conditionId: this.condIds[this.slotCond[slot]],
      lab: [lab[3 * slot], lab[3 * slot + 1], lab[3 * slot + 2]],
      replicates: this.slotReplicates[slot],
      spreadDeltaE00: this.slotSpread[slot],
      meanSquaredU: Number.isNaN(this.slotMeanSqU[slot]) ? null : this.slotMeanSqU[slot],
    };
  }

  /** The mean of one group, if it has accepted replicates. */
  get(key: string): ReplicateMean | undefined {
    const slot = this.groups.get(key);
    return slot === undefined ? undefined : this.mean(slot);
  }

  /** Replaces a group's mean, or removes the group (`undefined`: no accepted replicate left). */
  set(key: string, mean: ReplicateMean | undefined): void {
    const old = this.groups.get(key);
    if (old !== undefined) {
      this.kill(old);
      this.groups.delete(key);
    }
    if (mean) {
      this.overflow.push(this.add(key, mean));
      if (this.overflow.length > Math.max(MIN_OVERFLOW, this.live / 16)) this.regrid();
    }
  }

  /** Per condition number, whether `matches(condition id)`; condition numbers follow {@link condIds}. */
  allowedConditions(matches: (conditionId: string) => boolean): boolean[] {
    return this.condIds.map(matches);
  }

  /** Live means under the allowed conditions. */
  countAllowed(allowed: ArrayLike<boolean>): number {
    let n = 0;
    for (let c = 0; c < this.liveByCond.length; c++) if (allowed[c]) n += this.liveByCond[c];
    return n;
  }

  /**
   * Every live mean of an allowed condition inside the box that `accept` (if given) keeps, as columns
   * for lib/search/rank (`ref` is the slot). The columns are reused by the next fetch.
   */
  fetch(box: LabBox, allowed: ArrayLike<boolean>, accept?: (l: number, a: number, b: number) => boolean): ColourColumns {
    this.ensureOut();
    const out = this.out;
    const { slotReplicates, slotDye } = this;
    let k = 0;
    const take = (slot: number, l: number, a: number, b: number) => {
      if (slotReplicates[slot] === 0 || (accept && !accept(l, a, b))) return;
      out.dye[k] = slotDye[slot];
      out.l[k] = l;
      out.a[k] = a;
      out.b[k] = b;
      out.ref[k] = slot;
      k++;
    };
    queryLabGrid(this.grid, box, allowed, take);
    const { lMin, lMax, aMin, aMax, bMin, bMax } = box;
    const lab = this.slotLab;
    for (const slot of this.overflow) {
      if (!allowed[this.slotCond[slot]]) continue;
      const l = lab[3 * slot];
      const a = lab[3 * slot + 1];
      const b = lab[3 * slot + 2];
      if (l >= lMin && l <= lMax && a >= aMin && a <= aMax && b >= bMin && b <= bMax) take(slot, l, a, b);
    }
    return { ...out, count: k };
  }

  private intern(ids: string[], index: Map<string, number>, id: string): number {
    let i = index.get(id);
    if (i === undefined) {
      i = ids.push(id) - 1;
      index.set(id, i);
    }
    return i;
  }

  private add(key: string, mean: ReplicateMean): number {
    if (!(mean.replicates > 0)) throw new RangeError(`a mean needs at least one replicate, got ${mean.replicates}`);
    const slot = this.slotReplicates.length;
    const cond = this.intern(this.condIds, this.condIndex, mean.conditionId);
    while (this.liveByCond.length <= cond) this.liveByCond.push(0);
    this.liveByCond[cond]++;
    this.slotReplicates.push(mean.replicates);
    this.slotSpread.push(mean.spreadDeltaE00);
    this.slotMeanSqU.push(mean.meanSquaredU ?? Number.NaN);
    this.slotDye.push(this.intern(this.dyeIds, this.dyeIndex, mean.dyeId));
    this.slotCond.push(cond);
    this.slotLab.push(mean.lab[0], mean.lab[1], mean.lab[2]);
    this.groups.set(key, slot);
    this.live++;
    return slot;
  }

  private kill(slot: number): void {
    if (this.slotReplicates[slot] === 0) return;
    this.slotReplicates[slot] = 0;
    this.liveByCond[this.slotCond[slot]]--;
    this.live--;
    // A dead overflow slot is dropped from the list; a dead gridded slot is skipped by fetch.
    if (slot >= this.gridded) {
      const i = this.overflow.indexOf(slot);
      if (i >= 0) this.overflow.splice(i, 1);
    }
  }

  /** Rebuilds the grid over the live slots, renumbering them first when most slots are dead. */
  private regrid(): void {
    if (this.slotReplicates.length > 2 * this.live) this.compact();
    const slots: number[] = [];
    for (let s = 0; s < this.slotReplicates.length; s++) if (this.slotReplicates[s] > 0) slots.push(s);
    const lab = this.slotLab;
    this.grid = buildLabGrid({
      key: slots,
      cond: slots.map((s) => this.slotCond[s]),
      l: slots.map((s) => lab[3 * s]),
      a: slots.map((s) => lab[3 * s + 1]),
      b: slots.map((s) => lab[3 * s + 2]),
      count: slots.length,
      conditions: this.condIds.length,
    });
    this.gridded = this.slotReplicates.length;
    this.overflow = [];
  }

  private compact(): void {
    const old = { replicates: this.slotReplicates, spread: this.slotSpread, meanSqU: this.slotMeanSqU, dye: this.slotDye, cond: this.slotCond, lab: this.slotLab };
    this.slotReplicates = [];
    this.slotSpread = [];
    this.slotMeanSqU = [];
    this.slotDye = [];
    this.slotCond = [];
    this.slotLab = [];
    // Every live slot has exactly one group pointing at it.
    for (const [key, s] of this.groups) {
      this.groups.set(key, this.slotReplicates.push(old.replicates[s]) - 1);
      this.slotSpread.push(old.spread[s]);
      this.slotMeanSqU.push(old.meanSqU[s]);
      this.slotDye.push(old.dye[s]);
      this.slotCond.push(old.cond[s]);
      this.slotLab.push(old.lab[3 * s], old.lab[3 * s + 1], old.lab[3 * s + 2]);
    }
  }

  private ensureOut(): void {
    const n = this.slotReplicates.length;
    if (this.out.ref.length >= n) return;
    const size = Math.max(n, 2 * this.out.ref.length);
    this.out = { dye: new Int32Array(size), l: new Float64Array(size), a: new Float64Array(size), b: new Float64Array(size), ref: new Int32Array(size) };
  }
}
