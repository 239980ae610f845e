import type Database from "better-sqlite3";
import { eq, sql } from "drizzle-orm";
import type { Lab } from "../../lib/color/types";
import type { LabBox } from "../../lib/search/bound";
import { classRuns, conditionClass, conditionMatches, type ConditionFilter } from "../../lib/search/filters";
import { rankByColourIndexed, type ColourColumns } from "../../lib/search/rank";
import type { ShiftDye } from "../../lib/search/shift";
import type { Db } from "../connection";
import { conditions, solvents, type AcidBase, type Medium } from "../schema";

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

/** Every condition with its solvent's class: a small table, read whole per search. */
export function conditionCatalogue(db: Db): ConditionInfo[] {
  return db
    .select({ id: conditions.id, solventId: conditions.solventId, solvent: solvents.name, medium: solvents.medium, acidBase: conditions.acidBase, ph: conditions.ph })
    .from(conditions)
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .all();
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
};

const caches = new WeakMap<Database.Database, KeyCache>();

function keyCache(client: Database.Database): KeyCache {
  let c = caches.get(client);
  if (!c) {
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
    };
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

function store(c: KeyCache, rows: Iterable<KeyRow>) {
  for (const [key, dyeId, condId, l, a, b] of rows) {
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
}

function learn(c: KeyCache, keys: number[]) {
  for (let start = 0; start < keys.length; start += 20_000) store(c, c.lookup.all(JSON.stringify(keys.slice(start, start + 20_000))) as KeyRow[]);
}

/**
 * Reads every R*Tree key's facts once per process (about 2 s per million measurements on two cores),
 * so searches after the first touch only the R*Tree and memory. Keys added later are read on demand.
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
  store(c, all.iterate() as IterableIterator<KeyRow>);
  c.warm = true;
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
 * one per dye: R*Tree box prefilter grown until provably complete (lib/search/rank), then exact ΔE00.
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
  const cache = keyCache(db.$client);
  if (!cache.warm) warmUp(db.$client, cache);

  // The R*Tree's fourth dimension holds the condition class, so only matching classes are read.
  const runs = classRuns(catalogue.filter((c) => allowedIds.has(c.id)).map((c) => conditionClass(c.medium, c.acidBase)));
  const fetch = (box: LabBox): ColourColumns => {
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
  const ranking = rankByColourIndexed(target, fetch, { limit, dyeKey: (d) => cache.dyeIds[d], startRadius });
  // One statement for the hits' identities and replicate counts (prepared once per connection).
  const detail = detailStatement(db.$client);
  const facts = new Map(
    (detail.all(JSON.stringify(ranking.hits.map((h) => h.ref))) as [number, string, string, string, string, number][]).map((r) => [r[0], r]),
  );
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
