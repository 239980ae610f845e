/**
 * GET /api/search on the seeded demo database: exact against brute force over every accepted
 * measurement, the condition filters, colour words, the key cache staying right as measurements are
 * accepted, rejected or reassigned, and the error messages for bad input.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { GET as search } from "@/app/api/search/route";
import { db } from "@/db/client";
import { databaseFile, openDatabase } from "@/db/connection";
import { searchByColour } from "@/db/queries/search";
import { replicateMeanUncertainty } from "@/lib/search/replicates";
import { isTie } from "@/lib/color/uncertainty";
import { acceptedMeasurements } from "@/db/queries/bench";
import { conditions, measurements, solvents } from "@/db/schema";
import { seedDemo } from "@/db/seed/demo";
import { dataDir } from "@/lib/config/env";
import { createApiToken } from "@/lib/auth/service";
import type { Lab } from "@/lib/color/types";
import { findColourWord, matchesColourWord, prototypeLab } from "@/lib/search/colour-words";
import { conditionMatches, type ConditionFilter } from "@/lib/search/filters";
import { hexToLabD65 } from "@/lib/search/query";
import { rankByColourExhaustive } from "@/lib/search/rank";
import { ciede2000 } from "@/lib/search/ciede2000";
import { GET as shiftSearch } from "@/app/api/search/shift/route";

let token = "";
type Hit = { dye: { id: string; code: string; name: string }; deltaE00: number; lab: Lab; condition: { solvent: string; medium: string; acidBase: string; pH: number | null }; predicted: boolean; measurements: number; replicates: number; spreadDeltaE00: number };

beforeAll(async () => {
  await seedDemo(db(), dataDir());
  token = createApiToken(db(), { userId: "usr_demo_formulator", name: "search test", actorId: null }).token;
}, 120_000);

async function call(query: string, auth = true) {
  const res = await search(new Request(`http://localhost:3000/api/search?${query}`, { headers: auth ? { authorization: `Bearer ${token}` } : {} }));
  return { status: res.status, body: await res.json() };
}

type Row = ReturnType<typeof acceptedMeasurements>[number];
/**
 * The reference: every accepted measurement grouped here by dye, solvent, acid/base and pH (written
 * out in the test, not lib/search/replicates), each group's component-wise mean, then an exhaustive
 * CIEDE2000 scan of the means that match the filter.
 */
function groupMeans(): { lab: Lab; rows: Row[] }[] {
  const groups = new Map<string, Row[]>();
  for (const r of acceptedMeasurements(db())) {
    const key = JSON.stringify([r.dye.id, r.solvent.id, r.condition.acidBase, r.condition.ph]);
    groups.set(key, [...(groups.get(key) ?? []), r]);
  }
  return [...groups.values()].map((rows) => ({
    rows,
    lab: [0, 1, 2].map((c) => rows.reduce((s, r) => s + [r.m.l, r.m.a, r.m.b][c], 0) / rows.length) as Lab,
  }));
}

function brute(target: Lab, filter: ConditionFilter & { solventName?: string }, limit: number, accept?: (l: number, a: number, b: number) => boolean) {
  const means = groupMeans().filter(
    ({ lab, rows: [r] }) =>
      conditionMatches(filter, { solventId: r.solvent.id, medium: r.solvent.medium, acidBase: r.condition.acidBase, ph: r.condition.ph }) &&
      (!filter.solventName || r.solvent.name === filter.solventName) &&
      (!accept || accept(...lab)),
  );
  return rankByColourExhaustive(target, means.map((g) => ({ dyeId: g.rows[0].dye.id, lab: g.lab, payload: { ...g.rows[0], replicates: g.rows } })), limit);
}

/** A fresh condition (a pH no demo condition uses), so a test colour forms a group of its own. */
function freshCondition(id: string, solventId: string, ph: number): string {
  db().insert(conditions).values({ id, solventId, acidBase: "acid", ph, additive: "" }).run();
  return id;
}

describe("GET /api/search", () => {
  it("answers 401 without credentials", async () => {
    expect((await call("lab=50,0,0", false)).status).toBe(401);
  });

  const FILTERS: [string, ConditionFilter & { solventName?: string }][] = [
    ["", { medium: "any", acidBase: "any" }],
    ["&medium=protic", { medium: "protic", acidBase: "any" }],
    ["&medium=dipolar-aprotic", { medium: "dipolar-aprotic", acidBase: "any" }],
    ["&medium=nonpolar", { medium: "nonpolar", acidBase: "any" }],
    ["&medium=aprotic", { medium: "aprotic", acidBase: "any" }],
    ["&acidBase=base", { medium: "any", acidBase: "base" }],
    ["&acidBase=acid&phMin=2&phMax=4", { medium: "any", acidBase: "acid", phMin: 2, phMax: 4 }],
    ["&solvent=Methanol", { medium: "any", acidBase: "any", solventName: "Methanol" }],
    ["&solvent=Toluene&medium=protic", { medium: "protic", acidBase: "any", solventName: "Toluene" }],
  ];
  const TARGETS: Lab[] = [[40, 45, -50], [85, -5, 70], [50, 0, 0], [30, 10, -40], [60, 60, 30], [95, 0, 2]];

  it.each(FILTERS)("ranks exactly as brute force over the accepted measurements (filter '%s')", async (qs, filter) => {
    for (const t of TARGETS) {
      for (const limit of [1, 5, 20, 200]) {
        const { status, body } = await call(`lab=${t.join(",")}&limit=${limit}${qs}`);
        expect(status).toBe(200);
        const expected = brute(t, filter, limit);
        expect(body.results.map((r: Hit) => r.dye.id)).toEqual(expected.map((e) => e.dyeId));
        body.results.forEach((r: Hit, i: number) => {
          expect(r.deltaE00).toBeCloseTo(expected[i].deltaE00, 9);
          for (let c = 0; c < 3; c++) expect(r.lab[c]).toBeCloseTo(expected[i].lab[c], 9);
          expect(r.predicted).toBe(false);
          expect(r.condition.solvent).toBe(expected[i].payload.solvent.name);
          expect(r.condition.acidBase).toBe(expected[i].payload.condition.acidBase);
          expect(r.condition.pH).toBe(expected[i].payload.condition.ph);
          const reps = expected[i].payload.replicates;
          expect(r.replicates).toBe(reps.length);
          // Spread: RMS ΔE00 of the replicates from their mean (0 for one replicate).
          const rms = Math.sqrt(reps.reduce((s, x) => s + ciede2000(x.m.l, x.m.a, x.m.b, ...expected[i].lab) ** 2, 0) / reps.length);
          expect(r.spreadDeltaE00).toBeCloseTo(rms, 6);
        });
      }
    }
  }, 120_000); // 24 searches and 24 brute-force scans; slow on a loaded 2-core machine

  it("gives each dye once and matches the contract's shape", async () => {
    const { body } = await call("hex=7a3fa0&medium=aprotic&limit=50");
    const ids = body.results.map((r: Hit) => r.dye.id);
    expect(new Set(ids).size).toBe(ids.length);
    expect(body.results[0]).toMatchObject({ dye: { id: expect.any(String), code: expect.any(String), name: expect.any(String) }, deltaE00: expect.any(Number), lab: [expect.any(Number), expect.any(Number), expect.any(Number)], condition: { solvent: expect.any(String), medium: expect.stringMatching(/dipolar-aprotic|nonpolar/), acidBase: expect.any(String) }, predicted: false });
    const expected = brute(hexToLabD65("7a3fa0")!, { medium: "aprotic", acidBase: "any" }, 50);
    expect(ids).toEqual(expected.map((e) => e.dyeId));
  });

  it("finds the betaine dyes for 'blue in an aprotic medium', in dipolar aprotic solvents", async () => {
    // The demo betaines sit at hab 260–308° there: blue, like the sRGB blue primary (306°).
    const { body } = await call("word=blue&medium=aprotic&limit=10");
    expect(body.target.word).toBe("blue");
    const blue = findColourWord("blue")!;
    for (const r of body.results as Hit[]) expect(matchesColourWord(blue, ...r.lab)).toBe(true);
    const codes = body.results.map((r: Hit) => r.dye.code);
    expect(codes.some((c: string) => c.startsWith("KB-BT-"))).toBe(true);
    const betaine = (body.results as Hit[]).find((r) => r.dye.code.startsWith("KB-BT-"))!;
    expect(betaine.condition.medium).toBe("dipolar-aprotic");
    const expected = brute(prototypeLab(blue), { medium: "aprotic", acidBase: "any" }, 10, (l, a, b) => matchesColourWord(blue, l, a, b));
    expect(codes).toEqual(expected.map((e) => e.payload.dye.code));
  });

  it("ranks the mean of the replicates, not the luckiest vial: a dye with one far-off replicate drops", async () => {
    const target: Lab = [22, 64, -84];
    const template = acceptedMeasurements(db())[0];
    const cond = freshCondition("cond_it_reps", template.solvent.id, 2.71);
    // Two replicates: one exactly on the target, one 20 L* units off; the mean sits 10 L* away.
    db().insert(measurements).values({ ...template.m, id: "ms_it_rep1", conditionId: cond, l: target[0], a: target[1], b: target[2], reviewState: "accepted" }).run();
    db().insert(measurements).values({ ...template.m, id: "ms_it_rep2", conditionId: cond, l: target[0] + 20, a: target[1], b: target[2], reviewState: "accepted" }).run();
    const { body } = await call(`lab=${target.join(",")}&limit=3`);
    const hit = (body.results as (Hit & { replicates: number; spreadDeltaE00: number })[]).find((r) => r.dye.id === template.dye.id && r.condition.pH === 2.71)!;
    expect(hit.replicates).toBe(2);
    expect(hit.lab[0]).toBeCloseTo(target[0] + 10, 9);
    expect(hit.deltaE00).toBeCloseTo(ciede2000(...target, target[0] + 10, target[1], target[2]), 9);
    const mean: Lab = [target[0] + 10, target[1], target[2]];
    const rms = Math.sqrt((ciede2000(...target, ...mean) ** 2 + ciede2000(target[0] + 20, target[1], target[2], ...mean) ** 2) / 2);
    expect(hit.spreadDeltaE00).toBeCloseTo(rms, 6);
    expect(hit.deltaE00).toBeGreaterThan(1);
    db().delete(measurements).where(eq(measurements.id, "ms_it_rep1")).run();
    db().delete(measurements).where(eq(measurements.id, "ms_it_rep2")).run();
  });

  it("sees a newly accepted measurement, drops a rejected one and follows a reassigned one (no stale cache)", async () => {
    const { body: before } = await call("lab=12,70,-90&limit=1");
    const far = [12, 70, -90];
    const template = acceptedMeasurements(db())[0];
    const cond = freshCondition("cond_it_new", template.solvent.id, 3.33);
    db().insert(measurements).values({ ...template.m, id: "ms_it_new", conditionId: cond, l: far[0], a: far[1], b: far[2], reviewState: "accepted" }).run();
    const { body: after } = await call("lab=12,70,-90&limit=1");
    expect(after.results[0].deltaE00).toBeLessThan(1e-9);
    expect(after.results[0]).toMatchObject({ dye: { id: template.dye.id }, replicates: 1, spreadDeltaE00: 0 });
    expect(before.results[0].deltaE00).toBeGreaterThan(1);

    const other = acceptedMeasurements(db()).find((r) => r.dye.id !== template.dye.id && r.solvent.medium !== template.solvent.medium)!;
    const otherCond = freshCondition("cond_it_moved", other.solvent.id, 3.34);
    db().update(measurements).set({ dyeId: other.dye.id, conditionId: otherCond }).where(eq(measurements.id, "ms_it_new")).run();
    const { body: moved } = await call(`lab=12,70,-90&limit=1&medium=${other.solvent.medium}`);
    expect(moved.results[0]).toMatchObject({ dye: { id: other.dye.id }, replicates: 1 });
    expect(moved.results[0].deltaE00).toBeLessThan(1e-9);

    db().update(measurements).set({ reviewState: "rejected" }).where(eq(measurements.id, "ms_it_new")).run();
    const { body: gone } = await call("lab=12,70,-90&limit=1");
    expect(gone.results[0].deltaE00).toBeCloseTo(before.results[0].deltaE00, 9);
  });

  it("inside a transaction sees its own uncommitted colour, and forgets it after a rollback", async () => {
    const target: Lab = [88, -75, 70];
    const before = searchByColour(db(), { target, filter: { medium: "any", acidBase: "any" }, limit: 1 });
    const template = acceptedMeasurements(db())[0];
    const cond = freshCondition("cond_it_tx", template.solvent.id, 3.35);
    expect(() =>
      db().transaction((tx) => {
        tx.insert(measurements).values({ ...template.m, id: "ms_it_tx", conditionId: cond, l: target[0], a: target[1], b: target[2], reviewState: "accepted" }).run();
        // Same connection, so the search runs inside the open transaction.
        const inside = searchByColour(db(), { target, filter: { medium: "any", acidBase: "any" }, limit: 1 });
        expect(inside.results[0].deltaE00).toBeLessThan(1e-9);
        expect(inside.results[0].condition.pH).toBe(3.35);
        throw new Error("roll back");
      }),
    ).toThrow("roll back");
    const after = searchByColour(db(), { target, filter: { medium: "any", acidBase: "any" }, limit: 1 });
    expect(after.results).toEqual(before.results);
  });

  it("drops a measurement deleted through another connection after the in-memory index was built", async () => {
    const target: Lab = [5, 40, 60];
    const template = acceptedMeasurements(db())[0];
    const cond = freshCondition("cond_it_other", template.solvent.id, 3.36);
    db().insert(measurements).values({ ...template.m, id: "ms_it_other", conditionId: cond, l: target[0], a: target[1], b: target[2], reviewState: "accepted" }).run();
    const seen = searchByColour(db(), { target, filter: { medium: "any", acidBase: "any" }, limit: 2 });
    expect(seen.results[0].deltaE00).toBeLessThan(1e-9);
    const other = openDatabase(databaseFile(dataDir()));
    other.$client.prepare("DELETE FROM measurements WHERE id = 'ms_it_other'").run();
    other.$client.close();
    const after = searchByColour(db(), { target, filter: { medium: "any", acidBase: "any" }, limit: 2 });
    expect(after.results).toHaveLength(2);
    expect(after.results.map((r) => r.condition.pH)).not.toContain(3.36);
    expect(after.results[0]).toEqual(seen.results[1]);
  });

  it("follows a solvent moved to another medium class (the R*Tree's class dimension is re-keyed)", async () => {
    const { body: before } = await call("lab=50,0,0&solvent=Toluene&medium=nonpolar&limit=3");
    expect(before.results.length).toBeGreaterThan(0);
    db().update(solvents).set({ medium: "dipolar-aprotic" }).where(eq(solvents.name, "Toluene")).run();
    const { body: moved } = await call("lab=50,0,0&solvent=Toluene&medium=dipolar-aprotic&limit=3");
    expect(moved.results.map((r: Hit) => r.dye.id)).toEqual(before.results.map((r: Hit) => r.dye.id));
    expect((await call("lab=50,0,0&solvent=Toluene&medium=nonpolar&limit=3")).body.results).toEqual([]);
    db().update(solvents).set({ medium: "nonpolar" }).where(eq(solvents.name, "Toluene")).run();
    expect((await call("lab=50,0,0&solvent=Toluene&medium=nonpolar&limit=3")).body.results.map((r: Hit) => r.dye.id)).toEqual(before.results.map((r: Hit) => r.dye.id));
  });

  it("carries each hit's ± ΔE00 and tie mark in the means: equal to the per-group query, and follows a changed uᵢ", async () => {
    // Invented uncertainties on the demo's accepted rows (every seventh left without one), so groups mix
    // known and missing figures and neighbouring hits tie; the ranking itself does not read them.
    const ids = db().$client.prepare("SELECT id FROM measurements WHERE review_state = 'accepted' ORDER BY id").pluck().all() as string[];
    const setU = db().$client.prepare("UPDATE measurements SET u_delta_e00 = ? WHERE id = ?");
    db().$client.transaction(() => ids.forEach((id, i) => setU.run(i % 7 === 3 ? null : 0.4 + ((i * 37) % 23) / 10, id)))();
    type UHit = Hit & { uncertaintyDeltaE00: number | null; tieWithPrevious: boolean };
    // The independent check: each hit's group read straight from its accepted rows with SQL, not from the means index.
    const groupU = db().$client.prepare(
      `SELECT m.u_delta_e00 AS u FROM measurements m JOIN conditions c ON c.id = m.condition_id JOIN solvents s ON s.id = c.solvent_id
       WHERE m.dye_id = ? AND m.review_state = 'accepted' AND s.name = ? AND c.acid_base = ? AND (c.ph IS ? OR c.ph = ?)`,
    );
    const perGroup = (r: UHit) => {
      const rows = groupU.all(r.dye.id, r.condition.solvent, r.condition.acidBase, r.condition.pH, r.condition.pH) as { u: number | null }[];
      const known = rows.map((x) => x.u).filter((u): u is number => typeof u === "number");
      const meanSquaredU = known.length === 0 ? null : known.reduce((sum, u) => sum + u * u, 0) / known.length;
      return replicateMeanUncertainty({ meanSquaredU, replicates: r.replicates, spreadDeltaE00: r.spreadDeltaE00 });
    };
    let ties = 0;
    let known = 0;
    for (const target of ["50,0,0", "30,40,-60", "70,-30,50", "60,60,30"]) {
      for (const qs of ["", "&medium=protic", "&acidBase=base"]) {
        const { body } = await call(`lab=${target}&limit=20${qs}`);
        const hits = body.results as UHit[];
        hits.forEach((r, i) => {
          const u = perGroup(r);
          if (u === null) expect(r.uncertaintyDeltaE00).toBeNull();
          else expect(r.uncertaintyDeltaE00).toBeCloseTo(u, 12);
          const prevU = i > 0 ? perGroup(hits[i - 1]) : null;
          expect(r.tieWithPrevious).toBe(i > 0 && u !== null && prevU !== null && isTie({ deltaE00: r.deltaE00, uncertaintyDeltaE00: u }, { deltaE00: hits[i - 1].deltaE00, uncertaintyDeltaE00: prevU }));
          if (r.tieWithPrevious) ties++;
          if (u !== null) known++;
        });
      }
    }
    expect(ties).toBeGreaterThan(0);
    expect(known).toBeGreaterThan(0);

    // One replicate's uᵢ changed after the means were built: the next search replays that group.
    const { body: first } = await call("lab=50,0,0&limit=1");
    const top = first.results[0] as UHit;
    const row = acceptedMeasurements(db()).find((r) => r.dye.id === top.dye.id && r.solvent.name === top.condition.solvent && r.condition.acidBase === top.condition.acidBase && r.condition.ph === top.condition.pH)!;
    db().update(measurements).set({ uDeltaE00: 9 }).where(eq(measurements.id, row.m.id)).run();
    const { body: second } = await call("lab=50,0,0&limit=1");
    expect(second.results[0].uncertaintyDeltaE00).toBeCloseTo(perGroup(second.results[0])!, 12);
    expect(second.results[0].uncertaintyDeltaE00).not.toBeCloseTo(top.uncertaintyDeltaE00 ?? 0, 6);
  });

  it("returns an empty list when no condition matches", async () => {
    const { status, body } = await call("lab=50,0,0&acidBase=acid&phMin=13&phMax=14");
    expect(status).toBe(200);
    expect(body.results).toEqual([]);
  });

  it.each([
    ["", /hex=rrggbb, lab=L,a,b or word/],
    ["hex=12345", /hex must be six hexadecimal digits/],
    ["lab=50,abc,0", /lab must be three numbers/],
    ["lab=150,0,0", /0 ≤ L ≤ 100/],
    ["lab=50,0,0&hex=ffffff", /one target/],
    ["lab=50,0,0&medium=water", /medium must be one of/],
    ["lab=50,0,0&acidBase=salty", /acidBase must be one of/],
    ["lab=50,0,0&limit=0", /limit must be a whole number/],
    ["lab=50,0,0&limit=abc", /limit must be a whole number/],
    ["lab=50,0,0&phMin=9&phMax=3", /phMin must not be above phMax/],
    ["lab=50,0,0&phMin=x", /phMin must be a number/],
    ["word=chartreuse", /word must be one of/],
    ["lab=50,0,0&solvent=Unobtainium", /no solvent called/],
  ])("answers 422 with a clear message for '%s'", async (qs, message) => {
    const { status, body } = await call(qs);
    expect(status).toBe(422);
    expect(body.error.code).toBe("invalid_input");
    expect(body.error.message).toMatch(message);
  });
});

describe("GET /api/search/shift", () => {
  async function shift(query: string) {
    const res = await shiftSearch(new Request(`http://localhost:3000/api/search/shift?${query}`, { headers: { authorization: `Bearer ${token}` } }));
    return { status: res.status, body: await res.json() };
  }
  type ShiftHit = { dye: { code: string }; shift: number; a: { lab: Lab; condition: { solvent: string; acidBase: string; medium: string } }; b: { lab: Lab; condition: { solvent: string; acidBase: string; medium: string } }; viewers: { kind: string; deltaE00: number; passes: boolean }[] };

  it("ranks acid → base in one solvent by the largest ΔEOK, each shift exact for its pair", async () => {
    const { status, body } = await shift("aAcidBase=acid&bAcidBase=base&sameSolvent=true&minShift=5&limit=50");
    expect(status).toBe(200);
    expect(body.results.length).toBeGreaterThan(0);
    for (const r of body.results as ShiftHit[]) {
      expect(r.a.condition.acidBase).toBe("acid");
      expect(r.b.condition.acidBase).toBe("base");
      expect(r.a.condition.solvent).toBe(r.b.condition.solvent);
      expect(r.shift).toBeGreaterThanOrEqual(5);
      expect(r.shift).toBeCloseTo(ciede2000(...r.a.lab, ...r.b.lab), 12);
    }
    // Ranked by ΔEOK (the large-difference metric), ΔE00 reported beside it.
    const shifts = (body.results as (ShiftHit & { shiftDeltaEOK: number })[]).map((r) => r.shiftDeltaEOK);
    expect([...shifts].sort((x, y) => y - x)).toEqual(shifts);
    // Dyes never measured in acid and base are listed with the reason, not silently dropped.
    expect(body.failures.some((f: { reason: string }) => /No accepted colour|same solvent|below the minimum/.test(f.reason))).toBe(true);
  });

  it("protic → aprotic from violet: the closest violet in A comes first", async () => {
    const { body } = await shift("aMedium=protic&bMedium=aprotic&from=violet&limit=5");
    const first = body.results[0] as ShiftHit & { fromDeltaE00: number };
    expect(first.a.condition.medium).toBe("protic");
    expect(first.b.condition.medium).not.toBe("protic");
    const froms = body.results.map((r: { fromDeltaE00: number }) => r.fromDeltaE00);
    expect([...froms].sort((x: number, y: number) => x - y)).toEqual(froms);
  });

  it("with a colour-vision requirement, every result passes it and failures say for which viewers", async () => {
    const { body } = await shift("aAcidBase=acid&bAcidBase=base&sameSolvent=true&minShift=10&viewers=protan,deutan,tritan&viewerMinShift=8");
    for (const r of body.results as ShiftHit[]) {
      expect(r.viewers.map((v) => v.kind)).toEqual(["protan", "deutan", "tritan"]);
      expect(r.viewers.every((v) => v.passes && v.deltaE00 >= 8)).toBe(true);
    }
    for (const f of body.failures as { reason: string; viewers: { passes: boolean }[] }[]) {
      if (/visible/.test(f.reason)) expect(f.viewers.some((v) => !v.passes)).toBe(true);
    }
  });

  it.each([
    ["viewers=owl", /viewers must be/],
    ["minShift=-1", /minShift must be/],
    ["from=plaid", /from must be a colour word/],
    ["aMedium=gas", /aMedium must be one of/],
  ])("answers 422 for '%s'", async (qs, message) => {
    const { status, body } = await shift(qs);
    expect(status).toBe(422);
    expect(body.error.message).toMatch(message);
  });
});
