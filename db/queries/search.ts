import type Database from "better-sqlite3";
import { sql } from "drizzle-orm";
import type { Lab } from "../../lib/color/types";
import type { LabBox } from "../../lib/search/bound";
import { conditionMatches, type ConditionFilter } from "../../lib/search/filters";
import { buildLabGrid, queryLabGrid, type LabGrid } from "../../lib/search/grid";
import { rankByColourIndexed, type ColourColumns } from "../../lib/search/rank";
import { replicateMeans, type ReplicateMean } from "../../lib/search/replicates";
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
  /** Accepted replicates behind the mean colour `lab` (same dye, solvent, acid/base and pH). */
  replicates: number;
  /** Root mean square ΔE00 of the replicates from their mean (0 for one replicate). */
  spreadDeltaE00: number;
  /** Same as `replicates` (kept for existing clients). */
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

/**
 * The replicate means of one database state, with the in-memory grid index over them
 * (lib/search/grid: bucketed by condition, then by a coarse CIELAB cell). `stamp` identifies the state:
 * SQLite's `data_version` (changes when any other connection commits) and this connection's
 * `total_changes()` (changes with each of its own writes), so a mean is never stale.
 */
type MeansIndex = {
  stamp: string;
  means: ReplicateMean[];
  dyeIds: string[];
  /** Dense dye index per mean. */
  dye: Int32Array;
  condIds: string[];
  grid: LabGrid;
  /** Reused output columns of a box fetch. */
  out: { dye: Int32Array; l: Float64Array; a: Float64Array; b: Float64Array; ref: Int32Array };
};

const meansIndexes = new WeakMap<Database.Database, MeansIndex>();
const rowStatements = new WeakMap<Database.Database, Database.Statement>();

function stampOf(client: Database.Database): string {
  const version = client.pragma("data_version", { simple: true }) as number;
  const own = client.prepare("SELECT total_changes()").pluck(true).get() as number;
  return `${version}:${own}`;
}

function buildMeansIndex(client: Database.Database, stamp: string): MeansIndex {
  let st = rowStatements.get(client);
  if (!st) {
    st = client
      .prepare(
        `SELECT m.dye_id, m.condition_id, c.solvent_id, c.acid_base, c.ph, m.l, m.a, m.b
         FROM measurements m JOIN conditions c ON c.id = m.condition_id
         WHERE m.review_state = 'accepted' ORDER BY m.dye_id, m.condition_id, m.id`,
      )
      .raw(true);
    rowStatements.set(client, st);
  }
  const rows = st.all() as [string, string, string, string, number | null, number, number, number][];
  const means = replicateMeans(rows.map(([dyeId, conditionId, solventId, acidBase, ph, l, a, b]) => ({ dyeId, conditionId, solventId, acidBase, ph, lab: [l, a, b] as Lab })));
  const dyeIds: string[] = [];
  const dyeIndex = new Map<string, number>();
  const condIds: string[] = [];
  const condIndex = new Map<string, number>();
  const intern = (ids: string[], index: Map<string, number>, id: string) => {
    let i = index.get(id);
    if (i === undefined) {
      i = ids.length;
      ids.push(id);
      index.set(id, i);
    }
    return i;
  };
  const n = means.length;
  const dye = new Int32Array(n);
  const cond = new Int32Array(n);
  const key = new Int32Array(n);
  const l = new Float64Array(n);
  const a = new Float64Array(n);
  const b = new Float64Array(n);
  means.forEach((m, i) => {
    dye[i] = intern(dyeIds, dyeIndex, m.dyeId);
    cond[i] = intern(condIds, condIndex, m.conditionId);
    key[i] = i;
    [l[i], a[i], b[i]] = m.lab;
  });
  const grid = buildLabGrid({ key, cond, l, a, b, count: n, conditions: condIds.length });
  return { stamp, means, dyeIds, dye, condIds, grid, out: { dye: new Int32Array(n), l: new Float64Array(n), a: new Float64Array(n), b: new Float64Array(n), ref: new Int32Array(n) } };
}

/**
 * The index for the current state: reused while nothing has changed. Inside a transaction it is built
 * afresh and not kept (what the transaction wrote may still roll back).
 */
function meansIndex(client: Database.Database): MeansIndex {
  const stamp = stampOf(client);
  if (client.inTransaction) return buildMeansIndex(client, stamp);
  const cached = meansIndexes.get(client);
  if (cached && cached.stamp === stamp) return cached;
  const fresh = buildMeansIndex(client, stamp);
  meansIndexes.set(client, fresh);
  return fresh;
}

/**
 * Exact top-`limit` dyes by CIEDE2000 to `target`, one per dye, where a dye's colour in one condition
 * (same solvent, acid/base and pH) is the mean CIELAB of its accepted replicates there
 * (lib/search/replicates) and only conditions matching `filter` count. The ranking is the box
 * prefilter grown until provably complete (lib/search/rank, lib/search/bound) over the in-memory grid
 * of the means (lib/search/grid), then exact ΔE00: no matching mean is closer than the last returned.
 * `accept` narrows the means that count (e.g. those a colour word names); ranking stays exact among them.
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
  const index = meansIndex(client);
  const allowed = index.condIds.map((id) => allowedIds.has(id));

  const fetch = (box: LabBox): ColourColumns => {
    const out = index.out;
    let k = 0;
    queryLabGrid(index.grid, box, allowed, (key, l, a, b) => {
      if (accept && !accept(l, a, b)) return;
      out.dye[k] = index.dye[key];
      out.l[k] = l;
      out.a[k] = a;
      out.b[k] = b;
      out.ref[k] = key;
      k++;
    });
    return { ...out, count: k };
  };

  // Start wider when the filter leaves fewer means (radius ∝ cube root of the density); speed only.
  const matching = index.means.reduce((sum, m) => sum + (allowedIds.has(m.conditionId) ? 1 : 0), 0);
  const startRadius = 0.5 * Math.min(4, Math.max(1, Math.cbrt(index.means.length / Math.max(1, matching))));
  const ranking = rankByColourIndexed(target, fetch, { limit, dyeKey: (d) => index.dyeIds[d], startRadius });
  const dyeFacts = dyeStatement(client);
  const facts = new Map(
    (dyeFacts.all(JSON.stringify(ranking.hits.map((h) => index.dyeIds[h.dye]))) as [string, string, string][]).map((r) => [r[0], r]),
  );
  const results = ranking.hits.flatMap((h): ColourHit[] => {
    const mean = index.means[h.ref];
    const f = facts.get(mean.dyeId);
    const c = byId.get(mean.conditionId);
    if (!f || !c) return [];
    return [
      {
        dye: { id: f[0], code: f[1], name: f[2] },
        deltaE00: h.deltaE00,
        lab: h.lab,
        condition: { solvent: c.solvent, medium: c.medium, acidBase: c.acidBase, pH: c.ph },
        predicted: false,
        replicates: mean.replicates,
        spreadDeltaE00: mean.spreadDeltaE00,
        measurements: mean.replicates,
      },
    ];
  });
  return { results, stats: { radius: ranking.radius, rounds: ranking.rounds, scanned: ranking.scanned } };
}

const dyeStatements = new WeakMap<Database.Database, Database.Statement>();
function dyeStatement(client: Database.Database): Database.Statement {
  let st = dyeStatements.get(client);
  if (!st) {
    st = client.prepare("SELECT id, code, name FROM dyes WHERE id IN (SELECT value FROM json_each(?))").raw(true);
    dyeStatements.set(client, st);
  }
  return st;
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
