import { performance } from "node:perf_hooks";
import Database from "better-sqlite3";
import { sql } from "drizzle-orm";
import type { Lab } from "../../lib/color/types";
import { runInSlices, type Sliced } from "../../lib/ops/slices";
import type { LabBox } from "../../lib/search/bound";
import { conditionMatches, type ConditionFilter } from "../../lib/search/filters";
import { ReplicateMeansIndex, type KeyedMean } from "../../lib/search/means-index";
import { rankByColourIndexed, type ColourColumns } from "../../lib/search/rank";
import { replicateGroupKey, replicateMeanGroups, replicateMeans, replicateMeanUncertainty, type ReplicateRow } from "../../lib/search/replicates";
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
  /** ± ΔE00 of the mean `lab` (lib/search/replicates `replicateMeanUncertainty`); null when no replicate has one. */
  uncertaintyDeltaE00: number | null;
};

/** How the in-memory means were brought to the current state for this search. */
export type MeansRefresh = "reused" | "replayed" | "rebuilt";
export type ColourSearch = {
  results: ColourHit[];
  /** `meansMs`: time spent bringing the means up to date (reading the counter included). */
  stats: { radius: number; rounds: number; scanned: number; means: MeansRefresh; meansMs: number };
};

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
 * The replicate means kept per connection (lib/search/means-index) and the counter value they reflect
 * (migration 0013: 'search_means' moves only when something a mean reads changes, whichever connection
 * or process wrote it). `conditions` maps a condition to its group fields for replaying changes.
 */
type MeansState = { counter: number; index: ReplicateMeansIndex; conditions: Map<string, GroupFields> };
type GroupFields = { solventId: string; acidBase: string; ph: number | null };

/**
 * Changes are replayed one group at a time up to a sixteenth of the means (at least 4096), beyond
 * which a rebuild costs about the same; never more than the change rows kept (migration 0013 prunes
 * them 65,536 behind, every 4096).
 */
const maxReplay = (means: number) => Math.min(65_536 - 4096, Math.max(4096, Math.floor(means / 16)));

/**
 * Per connection: its means, and a background build in progress (warmSearchMeans). Kept on globalThis:
 * scripts/start.ts (run by tsx) and the route handlers (bundled by Next) load separate copies of this
 * module but share the app's one handle (db/client.ts), so they must share its means too.
 */
type MeansRegistry = { states: WeakMap<Database.Database, MeansState>; warming: WeakMap<Database.Database, Sliced<MeansState | undefined>> };
const registry: MeansRegistry = ((globalThis as { [k: symbol]: MeansRegistry })[Symbol.for("solvatlas.searchMeans")] ??= {
  states: new WeakMap(),
  warming: new WeakMap(),
});
const meansStates = registry.states;
const meansStatements = new WeakMap<Database.Database, ReturnType<typeof prepareMeansStatements>>();

function prepareMeansStatements(client: Database.Database) {
  const groupColumns = "m.dye_id, m.condition_id, c.solvent_id, c.acid_base, c.ph, m.l, m.a, m.b, m.u_delta_e00";
  return {
    counter: client.prepare("SELECT n FROM change_counters WHERE name = 'search_means'").pluck(true),
    // Ordered by condition and id within a dye, so a group's sums add up in the same order either way.
    all: client
      .prepare(`SELECT ${groupColumns} FROM measurements m JOIN conditions c ON c.id = m.condition_id WHERE m.review_state = 'accepted' ORDER BY m.dye_id, m.condition_id, m.id`)
      .raw(true),
    group: client
      .prepare(
        `SELECT ${groupColumns} FROM measurements m JOIN conditions c ON c.id = m.condition_id
         WHERE m.dye_id = ? AND m.review_state = 'accepted' AND c.solvent_id = ? AND c.acid_base = ? AND c.ph IS ? ORDER BY m.condition_id, m.id`,
      )
      .raw(true),
    conditions: client.prepare("SELECT id, solvent_id, acid_base, ph FROM conditions").raw(true),
    condition: client.prepare("SELECT id, solvent_id, acid_base, ph FROM conditions WHERE id = ?").raw(true),
    changes: client.prepare("SELECT old_dye_id, old_condition_id, new_dye_id, new_condition_id FROM search_mean_changes WHERE seq > ? AND seq <= ?").raw(true),
  };
}

function meansStatementsOf(client: Database.Database) {
  let st = meansStatements.get(client);
  if (!st) meansStatements.set(client, (st = prepareMeansStatements(client)));
  return st;
}

type GroupRow = [dyeId: string, conditionId: string, solventId: string, acidBase: string, ph: number | null, l: number, a: number, b: number, u: number | null];
const replicateRows = function* (rows: Iterable<GroupRow>): Generator<ReplicateRow> {
  for (const [dyeId, conditionId, solventId, acidBase, ph, l, a, b, u] of rows) yield { dyeId, conditionId, solventId, acidBase, ph, lab: [l, a, b], u };
};

/** Builds the means from `client`'s current snapshot, yielding every few hundred means (see warmSearchMeans). */
function* buildingMeansState(client: Database.Database, counter: number): Generator<void, MeansState> {
  const st = meansStatementsOf(client);
  const conditions = new Map(
    (st.conditions.all() as [string, string, string, number | null][]).map(([id, solventId, acidBase, ph]) => [id, { solventId, acidBase, ph }]),
  );
  const index = yield* ReplicateMeansIndex.building(meansDyeByDye(st.all.iterate() as IterableIterator<GroupRow>));
  return { counter, conditions, index };
}

function buildMeansState(client: Database.Database, counter: number): MeansState {
  const steps = buildingMeansState(client, counter);
  for (;;) {
    const r = steps.next();
    if (r.done) return r.value;
  }
}

/**
 * Builds the means of `db`'s connection in the background (scripts/start.ts calls it once the server
 * listens), so the first search does not pay for them: the rows are read on a second, read-only
 * connection inside one read transaction (one snapshot; the app's connection stays free for requests),
 * a few milliseconds per event-loop turn. A search that arrives before the end finishes this same build
 * (searchMeansReady waits for it; a synchronous caller completes it at once) and then replays whatever
 * was written since the snapshot. Resolves with the number of means; resolves at once when the means
 * exist already or the database is in memory (no second connection can see it).
 */
export function warmSearchMeans(db: Db, { sliceMs = 8 }: { sliceMs?: number } = {}): Promise<number> {
  const client = db.$client;
  const known = meansStates.get(client);
  if (known) return Promise.resolve(known.index.size);
  const running = registry.warming.get(client);
  if (running) return running.done.then((s) => s?.index.size ?? 0);
  if (client.memory) return Promise.resolve(0);
  const reader = new Database(client.name, { readonly: true, fileMustExist: true });
  const steps = (function* (): Generator<void, MeansState | undefined> {
    try {
      reader.exec("BEGIN");
      const state = yield* buildingMeansState(reader, meansStatementsOf(reader).counter.get() as number);
      // Searches finish this build before keeping means of their own, so none are there yet; checked anyway.
      if (!meansStates.has(client)) meansStates.set(client, state);
      return meansStates.get(client);
    } finally {
      registry.warming.delete(client);
      // Closing ends the read transaction (nothing was written).
      reader.close();
    }
  })();
  const sliced = runInSlices(steps, { sliceMs });
  registry.warming.set(client, sliced);
  return sliced.done.then((s) => s?.index.size ?? 0);
}

/** Resolves when no background build of the means (warmSearchMeans) is running on `db`'s connection. */
export function searchMeansReady(db: Db): Promise<unknown> | undefined {
  return registry.warming.get(db.$client)?.done.catch(() => undefined);
}

/** Groups rows ordered by dye one dye at a time, so only one dye's rows are held at once. */
function* meansDyeByDye(rows: Iterable<GroupRow>): Generator<KeyedMean> {
  let dye: GroupRow[] = [];
  for (const row of rows) {
    if (dye.length > 0 && row[0] !== dye[0][0]) {
      yield* replicateMeanGroups(replicateRows(dye));
      dye = [];
    }
    dye.push(row);
  }
  yield* replicateMeanGroups(replicateRows(dye));
}

/**
 * Brings `state` from its counter to `counter` by recomputing, from SQLite, each group named by the
 * change rows in between. False (state untouched) when a number is missing — a condition or dye change,
 * or rows pruned — or too many groups changed: the caller rebuilds.
 */
function replayChanges(client: Database.Database, state: MeansState, counter: number): boolean {
  if (counter - state.counter > maxReplay(state.index.size)) return false;
  const st = meansStatementsOf(client);
  const changes = st.changes.all(state.counter, counter) as [string | null, string | null, string | null, string | null][];
  if (changes.length !== counter - state.counter) return false;
  const touched = new Map<string, ReplicateRow>();
  const newConditions: [string, GroupFields][] = [];
  for (const [oldDye, oldCond, newDye, newCond] of changes) {
    for (const [dyeId, conditionId] of [[oldDye, oldCond], [newDye, newCond]]) {
      if (dyeId === null || conditionId === null) continue;
      let fields = state.conditions.get(conditionId);
      if (!fields) {
        const row = st.condition.get(conditionId) as [string, string, string, number | null] | undefined;
        if (!row) return false;
        fields = { solventId: row[1], acidBase: row[2], ph: row[3] };
        newConditions.push([conditionId, fields]);
      }
      const probe = { dyeId, conditionId, ...fields, lab: [0, 0, 0] as Lab };
      touched.set(replicateGroupKey(probe), probe);
    }
  }
  // Read every touched group first, then change the index, so a failed read leaves it as it was.
  const updates = [...touched].map(([key, g]) => {
    const rows = st.group.all(g.dyeId, g.solventId, g.acidBase, g.ph) as GroupRow[];
    return { key, mean: replicateMeans(replicateRows(rows))[0] };
  });
  for (const [id, fields] of newConditions) state.conditions.set(id, fields);
  for (const { key, mean } of updates) state.index.set(key, mean);
  state.counter = counter;
  return true;
}

/**
 * The means for the current database state. The counter is one indexed read; when it moved, the
 * changes are replayed (or the means rebuilt) inside one read transaction, so the counter, the change
 * rows and the groups come from one snapshot. Inside a caller's transaction the means are built afresh
 * and not kept when anything changed (what the transaction wrote may still roll back).
 */
function meansIndex(client: Database.Database): { index: ReplicateMeansIndex; means: MeansRefresh } {
  const st = meansStatementsOf(client);
  // A background build in progress is finished here rather than started again beside it; if it
  // fails, this search builds as if there had been none.
  const warming = registry.warming.get(client);
  if (warming) {
    try {
      warming.finishNow();
    } catch {
      /* rebuilt below */
    }
  }
  const cached = meansStates.get(client);
  const counter = st.counter.get() as number;
  if (cached && cached.counter === counter) return { index: cached.index, means: "reused" };
  if (client.inTransaction) return { index: buildMeansState(client, counter).index, means: "rebuilt" };
  return client.transaction(() => {
    const now = st.counter.get() as number;
    if (cached && now >= cached.counter && replayChanges(client, cached, now)) return { index: cached.index, means: "replayed" as const };
    const fresh = buildMeansState(client, now);
    meansStates.set(client, fresh);
    return { index: fresh.index, means: "rebuilt" as const };
  })();
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
  if (allowedIds.size === 0) return { results: [], stats: { radius: 0, rounds: 0, scanned: 0, means: "reused", meansMs: 0 } };
  const client = db.$client;
  const started = performance.now();
  const { index, means } = meansIndex(client);
  const meansMs = performance.now() - started;
  const allowed = index.allowedConditions((id) => allowedIds.has(id));
  const fetch = (box: LabBox): ColourColumns => index.fetch(box, allowed, accept);

  // Start wider when the filter leaves fewer means (radius ∝ cube root of the density); speed only.
  const matching = index.countAllowed(allowed);
  const startRadius = 0.5 * Math.min(4, Math.max(1, Math.cbrt(index.size / Math.max(1, matching))));
  const ranking = rankByColourIndexed(target, fetch, { limit, dyeKey: (d) => index.dyeIds[d], startRadius });
  const dyeFacts = dyeStatement(client);
  const facts = new Map(
    (dyeFacts.all(JSON.stringify(ranking.hits.map((h) => index.dyeIds[h.dye]))) as [string, string, string][]).map((r) => [r[0], r]),
  );
  const results = ranking.hits.flatMap((h): ColourHit[] => {
    const mean = index.mean(h.ref);
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
        uncertaintyDeltaE00: replicateMeanUncertainty(mean),
      },
    ];
  });
  return { results, stats: { radius: ranking.radius, rounds: ranking.rounds, scanned: ranking.scanned, means, meansMs } };
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
