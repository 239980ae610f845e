import type Database from "better-sqlite3";
import { sql } from "drizzle-orm";
import type { Lab } from "../../lib/color/types";
import { boxContains, type LabBox } from "../../lib/search/bound";
import { classRuns, conditionClass, conditionMatches, type ConditionFilter } from "../../lib/search/filters";
import { buildLabGrid, queryLabGrid, type LabGrid } from "../../lib/search/grid";
import { rankByColourIndexed, type ColourColumns } from "../../lib/search/rank";
import type { ShiftDye } from "../../lib/search/shift";
import type { Db } from "../connection";
import { solvents, type AcidBase, type Medium } from "../schema";

export type ConditionInfo = { id: string; solventId: string; solvent: string; medium: Medium; acidBase: AcidBase; ph: number | null };

export type ColourHit = {
  dye: { id: string; code: string; name: string };
  deltaE00: number;
  lab: Lab;
  condition: { solvent: string; medium: Medium; acidBase: AcidBase; pH: number | null };
  predicted: false;
  measurementId: string;
  /** Accepted measurements of this dye under the same condition (replicates behind the colour). */
  measurements: number;
};

export type ColourSearch = { results: ColourHit[]; stats: { radius: number; rounds: number; scanned: number } };

const catalogueStatements = new WeakMap<Database.Database, Database.Statement>();

/**
 * Every condition with its solvent's class: a small table, read whole per search (one statement
 * prepared once per connection; the query builder's per-call overhead was a fifth of a search).
 */
export function conditionCatalogue(db: Db): ConditionInfo[] {
  const client = db.$client;
  let st = catalogueStatements.get(client);
  if (!st) {
    st = client.prepare(
      `SELECT c.id AS id, c.solvent_id AS solventId, s.name AS solvent, s.medium AS medium, c.acid_base AS acidBase, c.ph AS ph
       FROM conditions c JOIN solvents s ON s.id = c.solvent_id`,
    );
    catalogueStatements.set(client, st);
  }
  return st.all() as ConditionInfo[];
}

const BIG = 1e30; // SQLite has no ±Infinity literal in bound parameters that the R*Tree compares cleanly
const clamp = (v: number) => (v === Infinity ? BIG : v === -Infinity ? -BIG : v);

/**
 * What each R*Tree key stands for: dye, condition and the exact (64-bit) L*, a*, b* of the
 * measurement. Keys come from AUTOINCREMENT and the triggers re-key an entry whenever any of these
 * columns or the review state changes (migration 0003), so a key's meaning never changes and the
 * cache never goes stale; keys not yet seen are read from the database in one batch.
 */
type KeyCache = {
  known: Uint8Array;
  dye: Int32Array;
  cond: Int32Array;
  l: Float64Array;
  a: Float64Array;
  b: Float64Array;
  dyeIds: string[];
  dyeIndex: Map<string, number>;
  condIds: string[];
  condIndex: Map<string, number>;
  /** Colours seen per condition index: only a hint for the first search radius, never for results. */
  condCount: number[];
  boxIds: Database.Statement;
  lookup: Database.Statement;
  warm: boolean;
  /**
   * The in-memory index (outside transactions). `live[key]` is 0 for keys known to be gone; a key
   * still marked live may have been deleted since, which the hit check after ranking catches.
   * Every key above `watermark` is read before each search (keys only grow: AUTOINCREMENT), so
   * every current key is in `grid` or `extra`.
   */
  live: Uint8Array;
  watermark: number;
  grid?: LabGrid;
  /** Keys learned after the grid was built. */
  extra: number[];
  newer: Database.Statement;
  /** Reused output columns of a box fetch. */
  out: { dye: Int32Array; l: Float64Array; a: Float64Array; b: Float64Array; ref: Int32Array };
};

const caches = new WeakMap<Database.Database, KeyCache>();

function newKeyCache(client: Database.Database): KeyCache {
  let c: KeyCache | undefined;
  {
    const n = 1024;
    c = {
      known: new Uint8Array(n),
      dye: new Int32Array(n),
      cond: new Int32Array(n),
      l: new Float64Array(n),
      a: new Float64Array(n),
      b: new Float64Array(n),
      dyeIds: [],
      dyeIndex: new Map(),
      condIds: [],
      condIndex: new Map(),
      condCount: [],
      // Overlap test: points are stored as degenerate boxes rounded outward to float32, so every
      // colour inside the query box is returned.
      boxIds: client
        .prepare(
          "SELECT id FROM measurement_lab_rtree WHERE l_max >= ? AND l_min <= ? AND a_max >= ? AND a_min <= ? AND b_max >= ? AND b_min <= ? AND k_max >= ? AND k_min <= ?",
        )
        .pluck(true),
      lookup: client
        .prepare(
          `SELECT k.rowid_key, m.dye_id, m.condition_id, m.l, m.a, m.b
           FROM measurement_rtree_ids k JOIN measurements m ON m.id = k.measurement_id
           WHERE k.rowid_key IN (SELECT value FROM json_each(?)) AND m.review_state = 'accepted'`,
        )
        .raw(true),
      warm: false,
      live: new Uint8Array(n),
      watermark: 0,
      extra: [],
      // CROSS JOIN keeps the key range first: usually no row, answered from the primary key alone.
      newer: client
        .prepare(
          `SELECT k.rowid_key, m.dye_id, m.condition_id, m.l, m.a, m.b
           FROM measurement_rtree_ids k CROSS JOIN measurements m ON m.id = k.measurement_id
           WHERE k.rowid_key > ? AND m.review_state = 'accepted'`,
        )
        .raw(true),
      out: { dye: new Int32Array(0), l: new Float64Array(0), a: new Float64Array(0), b: new Float64Array(0), ref: new Int32Array(0) },
    };
  }
  return c;
}

function keyCache(client: Database.Database): KeyCache {
  let c = caches.get(client);
  if (!c) {
    c = newKeyCache(client);
    caches.set(client, c);
  }
  return c;
}

function grow(c: KeyCache, maxKey: number) {
  if (maxKey < c.known.length) return;
  let n = c.known.length;
  while (n <= maxKey) n *= 2;
  const g = <T extends Uint8Array | Int32Array | Float64Array>(old: T, make: (n: number) => T): T => {
    const next = make(n);
    next.set(old);
    return next;
  };
  c.known = g(c.known, (k) => new Uint8Array(k));
  c.dye = g(c.dye, (k) => new Int32Array(k));
  c.cond = g(c.cond, (k) => new Int32Array(k));
  c.l = g(c.l, (k) => new Float64Array(k));
  c.a = g(c.a, (k) => new Float64Array(k));
  c.b = g(c.b, (k) => new Float64Array(k));
  c.live = g(c.live, (k) => new Uint8Array(k));
}

const intern = (ids: string[], index: Map<string, number>, id: string) => {
  let i = index.get(id);
  if (i === undefined) {
    i = ids.length;
    ids.push(id);
    index.set(id, i);
  }
  return i;
};

type KeyRow = [number, string, string, number, number, number];

/** Records each row's facts; returns the keys stored, in order. */
function store(c: KeyCache, rows: Iterable<KeyRow>): number[] {
  const keys: number[] = [];
  for (const [key, dyeId, condId, l, a, b] of rows) {
    keys.push(key);
    grow(c, key);
    c.dye[key] = intern(c.dyeIds, c.dyeIndex, dyeId);
    const ci = intern(c.condIds, c.condIndex, condId);
    c.cond[key] = ci;
    c.condCount[ci] = (c.condCount[ci] ?? 0) + 1;
    c.l[key] = l;
    c.a[key] = a;
    c.b[key] = b;
    c.known[key] = 1;
  }
  return keys;
}

function learn(c: KeyCache, keys: number[]) {
  for (let start = 0; start < keys.length; start += 20_000) store(c, c.lookup.all(JSON.stringify(keys.slice(start, start + 20_000))) as KeyRow[]);
}

/**
 * Reads every R*Tree key's facts once per process (about 2 s per million measurements on two cores)
 * and builds the in-memory grid index, so searches after the first touch only memory plus two small
 * statements (keys newer than the watermark; the hits' details). Not called inside a transaction:
 * what a transaction adds or removes may still roll back.
 */
function warmUp(client: Database.Database, c: KeyCache) {
  const all = client
    .prepare(
      `SELECT k.rowid_key, m.dye_id, m.condition_id, m.l, m.a, m.b
       FROM measurement_rtree_ids k JOIN measurements m ON m.id = k.measurement_id WHERE m.review_state = 'accepted'`,
    )
    .raw(true);
  const max = (client.prepare("SELECT max(rowid_key) FROM measurement_rtree_ids").pluck(true).get() as number | null) ?? 0;
  grow(c, max);
  // One statement, one snapshot: a key not returned here and not above its largest key cannot appear
  // later (keys only grow), so the watermark is the largest key this statement saw.
  const keys = store(c, all.iterate() as IterableIterator<KeyRow>);
  for (const key of keys) {
    c.live[key] = 1;
    if (key > c.watermark) c.watermark = key;
  }
  rebuildGrid(c);
  c.warm = true;
}

/** Rebuilds the grid from every key still marked live (drops the known-dead, folds `extra` in). */
function rebuildGrid(c: KeyCache) {
  let n = 0;
  for (let k = 0; k < c.live.length; k++) n += c.live[k];
  const key = new Int32Array(n);
  const cond = new Int32Array(n);
  const l = new Float64Array(n);
  const a = new Float64Array(n);
  const b = new Float64Array(n);
  for (let k = 0, i = 0; k < c.live.length; k++) {
    if (!c.live[k]) continue;
    key[i] = k;
    cond[i] = c.cond[k];
    l[i] = c.l[k];
    a[i] = c.a[k];
    b[i] = c.b[k];
    i++;
  }
  c.grid = buildLabGrid({ key, cond, l, a, b, count: n, conditions: c.condIds.length });
  c.extra = [];
}

/** Reads keys added since the last search (by this or any other connection). */
function catchUp(c: KeyCache) {
  const keys = store(c, c.newer.all(c.watermark) as KeyRow[]);
  for (const key of keys) {
    c.live[key] = 1;
    c.extra.push(key);
    if (key > c.watermark) c.watermark = key;
  }
  // The extra keys are scanned linearly; fold them into the grid once they are many.
  if (c.extra.length > Math.max(5_000, (c.grid?.count ?? 0) * 0.02)) rebuildGrid(c);
}

function ensureOut(c: KeyCache, n: number) {
  if (c.out.dye.length >= n) return;
  const size = Math.max(n, 2 * c.out.dye.length, 4096);
  c.out = { dye: new Int32Array(size), l: new Float64Array(size), a: new Float64Array(size), b: new Float64Array(size), ref: new Int32Array(size) };
}

const details = new WeakMap<Database.Database, Database.Statement>();
function detailStatement(client: Database.Database): Database.Statement {
  let st = details.get(client);
  if (!st) {
    st = client
      .prepare(
        `SELECT k.rowid_key, m.id, d.id, d.code, d.name,
           (SELECT count(*) FROM measurements r WHERE r.dye_id = m.dye_id AND r.condition_id = m.condition_id AND r.review_state = 'accepted')
         FROM measurement_rtree_ids k JOIN measurements m ON m.id = k.measurement_id JOIN dyes d ON d.id = m.dye_id
         WHERE k.rowid_key IN (SELECT value FROM json_each(?))`,
      )
      .raw(true);
    details.set(client, st);
  }
  return st;
}

/**
 * Exact top-`limit` dyes by CIEDE2000 to `target` among accepted measurements that match `filter`,
 * one per dye: box prefilter grown until provably complete (lib/search/rank), then exact ΔE00. The
 * boxes are read from the in-memory grid (lib/search/grid: only the allowed conditions' colours); inside a transaction, from the R*Tree.
 * `accept` narrows the colours that count (e.g. those a colour word names); ranking stays exact
 * among the accepted ones.
 */
export function searchByColour(
  db: Db,
  { target, filter, limit, accept }: { target: Lab; filter: ConditionFilter; limit: number; accept?: (l: number, a: number, b: number) => boolean },
): ColourSearch {
  const catalogue = conditionCatalogue(db);
  const byId = new Map(catalogue.map((c) => [c.id, c]));
  const allowedIds = new Set(catalogue.filter((c) => conditionMatches(filter, c)).map((c) => c.id));
  if (allowedIds.size === 0) return { results: [], stats: { radius: 0, rounds: 0, scanned: 0 } };
  const client = db.$client;
  // Inside a transaction nothing learned may outlive it (its writes may roll back and its keys be
  // reused), so the search then reads the R*Tree with a throwaway cache.
  const inMemory = !client.inTransaction;
  const cache = inMemory ? keyCache(client) : newKeyCache(client);
  if (inMemory) {
    if (!cache.warm) warmUp(client, cache);
    else catchUp(cache);
  }

  // Grid path: only the allowed conditions' colours in the box, live, read from memory.
  const fetchGrid = (box: LabBox): ColourColumns => {
    const allowed = cache.condIds.map((id) => allowedIds.has(id));
    const grid = cache.grid!;
    const { live, dye } = cache;
    let k = 0;
    let out = cache.out;
    const push = (key: number, l: number, a: number, b: number) => {
      if (!live[key] || (accept && !accept(l, a, b))) return;
      if (k >= out.dye.length) {
        const kept = out;
        ensureOut(cache, k + 1);
        out = cache.out;
        out.dye.set(kept.dye.subarray(0, k));
        out.l.set(kept.l.subarray(0, k));
        out.a.set(kept.a.subarray(0, k));
        out.b.set(kept.b.subarray(0, k));
        out.ref.set(kept.ref.subarray(0, k));
      }
      out.dye[k] = dye[key];
      out.l[k] = l;
      out.a[k] = a;
      out.b[k] = b;
      out.ref[k] = key;
      k++;
    };
    queryLabGrid(grid, box, allowed, push);
    for (const key of cache.extra) {
      if (allowed[cache.cond[key]] && boxContains(box, cache.l[key], cache.a[key], cache.b[key])) push(key, cache.l[key], cache.a[key], cache.b[key]);
    }
    return { ...out, count: k };
  };

  // R*Tree path (inside transactions): the fourth dimension holds the condition class, so only
  // matching classes are read.
  const runs = classRuns(catalogue.filter((c) => allowedIds.has(c.id)).map((c) => conditionClass(c.medium, c.acidBase)));
  const fetchRtree = (box: LabBox): ColourColumns => {
    const keys: number[] = [];
    for (const [kFrom, kTo] of runs) {
      const part = cache.boxIds.all(clamp(box.lMin), clamp(box.lMax), clamp(box.aMin), clamp(box.aMax), clamp(box.bMin), clamp(box.bMax), kFrom - 0.5, kTo + 0.5) as number[];
      for (const key of part) keys.push(key);
    }
    const unknown = keys.filter((k) => !(k < cache.known.length && cache.known[k]));
    if (unknown.length) learn(cache, unknown);
    const allowed = cache.condIds.map((id) => allowedIds.has(id));
    const n = keys.length;
    const cols = { dye: new Int32Array(n), l: new Float64Array(n), a: new Float64Array(n), b: new Float64Array(n), ref: new Int32Array(n), count: 0 };
    let k = 0;
    for (const key of keys) {
      if (!(key < cache.known.length && cache.known[key]) || !allowed[cache.cond[key]]) continue;
      if (accept && !accept(cache.l[key], cache.a[key], cache.b[key])) continue;
      cols.dye[k] = cache.dye[key];
      cols.l[k] = cache.l[key];
      cols.a[k] = cache.a[key];
      cols.b[k] = cache.b[key];
      cols.ref[k] = key;
      k++;
    }
    cols.count = k;
    return cols;
  };

  // Start wider when the filter leaves fewer colours (radius ∝ cube root of the density); speed only.
  const total = cache.condCount.reduce((sum, n) => sum + (n ?? 0), 0);
  const matching = cache.condIds.reduce((sum, id, i) => sum + (allowedIds.has(id) ? (cache.condCount[i] ?? 0) : 0), 0);
  const startRadius = 0.5 * Math.min(4, Math.max(1, Math.cbrt(total / Math.max(1, matching))));
  // One statement for the hits' identities and replicate counts (prepared once per connection); it
  // also proves each hit's key is still current. In memory, a hit whose key has gone (deleted by any
  // connection since it was read) is marked dead and the ranking redone: the ranking is exact over a
  // superset of the current colours, so once every hit is current it is exact over the current ones
  // (a dye's best over the superset is ≤ its best over the current colours).
  const detail = detailStatement(client);
  let ranking: ReturnType<typeof rankByColourIndexed>;
  let facts: Map<number, [number, string, string, string, string, number]>;
  for (;;) {
    ranking = rankByColourIndexed(target, inMemory ? fetchGrid : fetchRtree, { limit, dyeKey: (d) => cache.dyeIds[d], startRadius });
    facts = new Map(
      (detail.all(JSON.stringify(ranking.hits.map((h) => h.ref))) as [number, string, string, string, string, number][]).map((r) => [r[0], r]),
    );
    const gone = ranking.hits.filter((h) => !facts.has(h.ref));
    if (!inMemory || gone.length === 0) break;
    for (const h of gone) cache.live[h.ref] = 0;
  }
  const results = ranking.hits.flatMap((h): ColourHit[] => {
    const f = facts.get(h.ref);
    if (!f) return []; // deleted between the two statements; the next search will not see it
    const c = byId.get(cache.condIds[cache.cond[h.ref]])!;
    return [
      {
        dye: { id: f[2], code: f[3], name: f[4] },
        deltaE00: h.deltaE00,
        lab: h.lab,
        condition: { solvent: c.solvent, medium: c.medium, acidBase: c.acidBase, pH: c.ph },
        predicted: false,
        measurementId: f[1],
        measurements: f[5],
      },
    ];
  });
  return { results, stats: { radius: ranking.radius, rounds: ranking.rounds, scanned: ranking.scanned } };
}

/** A solvent by id or by name (case-insensitive), for the `solvent=` filter. */
export function resolveSolvent(db: Db, { text }: { text: string }): { id: string; name: string } | undefined {
  return db
    .select({ id: solvents.id, name: solvents.name })
    .from(solvents)
    .where(sql`${solvents.id} = ${text} OR lower(${solvents.name}) = lower(${text})`)
    .get();
}

export type ShiftPayload = { measurementId: string; solvent: string; medium: Medium; acidBase: AcidBase; ph: number | null };

/**
 * Each dye's accepted colours under two conditions, for the shift search (lib/search/shift). A few
 * thousand rows at most in a lab's catalogue, so read in one statement.
 */
export function shiftCandidates(db: Db, { a, b }: { a: ConditionFilter; b: ConditionFilter }): { dyes: Map<string, { id: string; code: string; name: string }>; candidates: ShiftDye<ShiftPayload>[] } {
  const rows = db.$client
    .prepare(
      `SELECT m.id, m.dye_id, d.code, d.name, m.l, m.a, m.b, c.solvent_id, s.name, s.medium, c.acid_base, c.ph
       FROM measurements m JOIN dyes d ON d.id = m.dye_id JOIN conditions c ON c.id = m.condition_id JOIN solvents s ON s.id = c.solvent_id
       WHERE m.review_state = 'accepted' ORDER BY d.code, m.id`,
    )
    .raw(true)
    .all() as [string, string, string, string, number, number, number, string, string, Medium, AcidBase, number | null][];
  const dyeInfo = new Map<string, { id: string; code: string; name: string }>();
  const byDye = new Map<string, ShiftDye<ShiftPayload>>();
  for (const [id, dyeId, code, name, l, la, lb, solventId, solvent, medium, acidBase, ph] of rows) {
    if (!dyeInfo.has(dyeId)) dyeInfo.set(dyeId, { id: dyeId, code, name });
    let entry = byDye.get(dyeId);
    if (!entry) byDye.set(dyeId, (entry = { dyeId, a: [], b: [] }));
    const facts = { solventId, medium, acidBase, ph };
    const colour = { lab: [l, la, lb] as Lab, solventId, payload: { measurementId: id, solvent, medium, acidBase, ph } };
    if (conditionMatches(a, facts)) entry.a.push(colour);
    if (conditionMatches(b, facts)) entry.b.push(colour);
  }
  return { dyes: dyeInfo, candidates: [...byDye.values()] };
}
