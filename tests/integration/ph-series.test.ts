/**
 * pH series in the app: grouping vials (chemists and admins write, formulators are refused), importing
 * a series from CSV (row problems by line and column, nothing stored unless the whole file is good),
 * the stored pKa fit (recomputed when a vial changes), and GET /api/search with phFrom/phTo.
 *
 * Truth values: pKa = −log10 Ka of handbook indicators in tests/fixtures/ph_indicators_alberta_chem30.csv
 * (Alberta Education, Chemistry 30 Data Booklet, 2010, p. 10). Vial colours: tests/support/indicator-series.ts
 * (log-normal bands mixed per wavelength, CIE 015 summation, noise): a different process from the fit's
 * band model. Band positions of the forms are from memory (bromocresol green yellow ≈ 444 nm, blue ≈ 617 nm;
 * phenol red yellow ≈ 432 nm, red ≈ 558 nm); they only need to give two clearly different colours.
 */
import { and, eq, inArray } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { deletePhSeriesAction, importPhSeriesAction, savePhSeriesAction } from "@/app/actions/ph-series";
import { GET as search } from "@/app/api/search/route";
import { db } from "@/db/client";
import { decideMeasurement } from "@/db/queries/review";
import { ensurePhSeriesFit, getPhSeries, listPhSeries, type StoredPhFit } from "@/db/queries/ph-series";
import { auditLog, conditions, dyes, measurements, phSeries, phSeriesFits } from "@/db/schema";
import { deltaE00 } from "@/lib/color/difference";
import type { PhPoint } from "@/lib/color/pka";
import { readFixtureCsv } from "../support/fixtures";
import { indicatorForm, indicatorSeries } from "../support/indicator-series";
import { actAs, buildWorld, form, PEOPLE, tokenFor } from "../support/world";

const HANDBOOK = readFixtureCsv("ph_indicators_alberta_chem30.csv");
const handbookPka = (name: string) => -Math.log10(Number(HANDBOOK.find((r) => r.indicator === name)!.Ka));
const BCG = handbookPka("bromocresol green"); // Ka 1.3e-5 → 4.89
const PHENOL_RED = handbookPka("phenol red"); // Ka 1.0e-8 → 8.00
/** pH every 0.25 over pKa ± 2 (common practice for a titration series, no source). */
const around = (pKa: number) => Array.from({ length: 17 }, (_, i) => Math.round((pKa - 2 + 0.25 * i) * 100) / 100);

let token = "";
const vialIds: Record<string, string[]> = { bcg: [], pr: [] };

/** Accepted colours of a generated series, by the second chemist, each in a Water condition with its pH. */
function addSeries(key: "bcg" | "pr", dyeId: string, points: PhPoint[]) {
  points.forEach((p, i) => {
    const conditionId = `cond_ph_${key}_${i}`;
    db().insert(conditions).values({ id: conditionId, solventId: "solv-water", acidBase: p.pH < 6 ? "acid" : p.pH > 8 ? "base" : "neutral", ph: p.pH, additive: "universal buffer" }).run();
    const id = `ms_ph_${key}_${i}`;
    db()
      .insert(measurements)
      .values({ id, dyeId, conditionId, rawR: 0.2, rawG: 0.2, rawB: 0.2, x: 10, y: 10, z: 10, l: p.lab[0], a: p.lab[1], b: p.lab[2], pixelCount: 1000, rejectedCount: 0, spread: 0.3, createdBy: PEOPLE.chemist2.id, reviewState: "accepted" })
      .run();
    vialIds[key].push(id);
  });
}

const payload = (head: Record<string, unknown>, vials: { measurementId: string; pH: number }[], id?: string) =>
  form({ payload: JSON.stringify({ id, head: { secondSolventId: null, secondSolventMoleFraction: null, ionicStrengthMolL: 0.1, notes: "", ...head }, vials }) });
const vialsOf = (key: "bcg" | "pr", pHs: number[]) => vialIds[key].map((measurementId, i) => ({ measurementId, pH: pHs[i] }));

async function callSearch(query: string) {
  const res = await search(new Request(`http://localhost:3000/api/search?${query}`, { headers: { authorization: `Bearer ${token}` } }));
  return { status: res.status, body: await res.json() };
}

const bcgPHs = around(BCG);
const prPHs = around(PHENOL_RED);

beforeAll(async () => {
  await buildWorld();
  token = tokenFor("formulator");
  db().insert(dyes).values({ id: "dye_bcg", code: "PH-BCG", name: "Bromocresol green (test)", dyeClass: "sulfonephthalein" }).run();
  db().insert(dyes).values({ id: "dye_pr", code: "PH-PR", name: "Phenol red (test)", dyeClass: "sulfonephthalein" }).run();
  addSeries("bcg", "dye_bcg", indicatorSeries(indicatorForm(444, 1.0), indicatorForm(617, 1.0), BCG, bcgPHs, 0.3, 11));
  addSeries("pr", "dye_pr", indicatorSeries(indicatorForm(432, 1.0), indicatorForm(558, 1.0), PHENOL_RED, prPHs, 0.3, 12));
}, 120_000);

describe("grouping vials into a pH series", () => {
  it("refuses a formulator and stores nothing", async () => {
    await actAs("formulator");
    const r = await savePhSeriesAction(null, payload({ dyeId: "dye_bcg", name: "Formulator's", solventId: "solv-water" }, vialsOf("bcg", bcgPHs)));
    expect(r?.ok).toBe(false);
    expect(r?.code).toBe("forbidden");
    expect(db().select().from(phSeries).all()).toHaveLength(0);
  });

  it("lets a chemist create and an admin edit a series, with audit entries; refuses a vial of another dye in words", async () => {
    await actAs("chemist");
    const wrong = await savePhSeriesAction(null, payload({ dyeId: "dye_bcg", name: "Mixed", solventId: "solv-water" }, [...vialsOf("bcg", bcgPHs), { measurementId: vialIds.pr[0], pH: 6 }]));
    expect(wrong?.ok).toBe(false);
    expect(wrong?.message).toMatch(/another dye/);
    expect(db().select().from(phSeries).all()).toHaveLength(0);

    const created = await savePhSeriesAction(null, payload({ dyeId: "dye_bcg", name: "Water, universal buffer", solventId: "solv-water" }, vialsOf("bcg", bcgPHs)));
    expect(created?.ok, created?.message).toBe(true);
    expect(created?.message).toMatch(/pKa \d+\.\d\d ± \d+\.\d\d from 17 accepted vials/);
    const id = created!.data!.id as string;
    const prSaved = await savePhSeriesAction(null, payload({ dyeId: "dye_pr", name: "Water, universal buffer", solventId: "solv-water", ionicStrengthMolL: null }, vialsOf("pr", prPHs)));
    expect(prSaved?.ok, prSaved?.message).toBe(true);

    await actAs("admin");
    const edited = await savePhSeriesAction(null, payload({ dyeId: "dye_bcg", name: "Water, universal buffer, 23 °C", solventId: "solv-water" }, vialsOf("bcg", bcgPHs).slice(1), id));
    expect(edited?.ok, edited?.message).toBe(true);
    const s = getPhSeries(db(), { id })!;
    expect(s.name).toBe("Water, universal buffer, 23 °C");
    expect(s.vials).toHaveLength(16);
    expect(s.ionicStrengthMolL).toBe(0.1);
    const actions = db().select({ a: auditLog.action }).from(auditLog).where(eq(auditLog.entityId, id)).all().map((r) => r.a);
    expect(actions.filter((a) => a.startsWith("ph-series."))).toEqual(["ph-series.create", "ph-series.update"]);

    await actAs("formulator");
    expect((await deletePhSeriesAction(null, form({ id })))?.code).toBe("forbidden");
    expect(getPhSeries(db(), { id })).not.toBeNull();
  }, 120_000);
});

describe("the stored pKa fit", () => {
  it("recovers the handbook pKa, is stored with a cache key, kept while the vials stay, and fitted again when a vial changes", async () => {
    const series = listPhSeries(db(), { dyeId: "dye_bcg" })[0];
    const row = () => db().select().from(phSeriesFits).where(eq(phSeriesFits.seriesId, series.id)).get()!;
    const first = row();
    const fit = first.result as StoredPhFit;
    expect(fit.ok && fit.steps).toBe(1);
    if (!fit.ok || fit.steps !== 1) return;
    // Alberta Chemistry 30 Data Booklet: bromocresol green Ka 1.3e-5.
    expect(Math.abs(fit.fit.pKa - BCG)).toBeLessThan(0.05);
    expect(fit.fit.pKaStdErr).toBeGreaterThan(0);
    expect(fit.vials).toBe(16);

    // Read again, nothing changed: the stored row is reused, not recomputed.
    ensurePhSeriesFit(db(), { seriesId: series.id });
    expect(row().computedAt.getTime()).toBe(first.computedAt.getTime());
    expect(row().cacheKey).toBe(first.cacheKey);

    // One vial's colour is rejected in review: the key no longer matches and the fit is redone from 15 vials.
    db().update(measurements).set({ reviewState: "pending" }).where(eq(measurements.id, vialIds.bcg[8])).run();
    decideMeasurement(db(), { reviewer: { id: PEOPLE.admin.id, role: "admin" }, measurementId: vialIds.bcg[8], decision: "rejected", note: "bubble in the cell" });
    const again = ensurePhSeriesFit(db(), { seriesId: series.id });
    expect(again.vials).toBe(15);
    expect(row().cacheKey).not.toBe(first.cacheKey);
    expect(row().computedAt.getTime()).toBeGreaterThanOrEqual(first.computedAt.getTime());
    expect(again.ok && again.steps === 1 && again.fit.pKa).not.toBe(fit.fit.pKa);
  }, 120_000);
});

describe("importing a pH series from CSV", () => {
  const csvOf = (rows: string[]) => ["pH,L,a,b,white_point,instrument", ...rows].join("\n");
  const good = indicatorSeries(indicatorForm(444, 1.0), indicatorForm(617, 1.0), BCG, around(BCG), 0.3, 21).map((p) => `${p.pH},${p.lab.map((v) => v.toFixed(2)).join(",")},D65,plate reader 2`);
  const head = { dyeId: "dye_bcg", name: "Imported, ethanol–water", solventId: "solv-water", secondSolventId: "solv-ethanol", secondSolventMoleFraction: "0.1", ionicStrengthMolL: "0.05" };
  const count = () => db().select().from(measurements).all().length;

  it("refuses a formulator", async () => {
    await actAs("formulator");
    const r = await importPhSeriesAction(null, form({ ...head, csv: csvOf(good), mode: "all" }));
    expect(r?.code).toBe("forbidden");
  });

  it("names the line and column of a bad row and stores nothing, not even the good rows", async () => {
    await actAs("chemist");
    const before = count();
    const rows = [...good];
    rows[2] = rows[2].replace(/^([^,]+),[^,]+,/, "$1,abc,"); // line 4 (header is line 1): L* is not a number
    const r = await importPhSeriesAction(null, form({ ...head, csv: csvOf(rows), mode: "all" }));
    expect(r?.ok).toBe(false);
    expect(r?.message).toMatch(/Nothing was stored/);
    expect(r?.message).toMatch(/line 4, column L:/);
    expect(count()).toBe(before);
    expect(listPhSeries(db(), { dyeId: "dye_bcg" }).map((s) => s.name)).not.toContain(head.name);

    const noPh = [...good];
    noPh[5] = noPh[5].replace(/^[^,]+,/, ",");
    const preview = await importPhSeriesAction(null, form({ ...head, csv: csvOf(noPh), mode: "preview" }));
    expect(preview?.ok).toBe(true);
    const problems = (preview?.data as { problems: { line: number; column: string }[] }).problems;
    expect(problems).toContainEqual(expect.objectContaining({ line: 7, column: "pH" }));
    expect(count()).toBe(before);

    const withDye = await importPhSeriesAction(null, form({ ...head, csv: ["dye,pH,L,a,b,white_point", "PH-BCG,4,50,0,0,D65"].join("\n"), mode: "preview" }));
    expect(withDye?.ok).toBe(false);
    expect(withDye?.message).toMatch(/remove it/);
  });

  it("stores a good file as pending instrument measurements grouped into one series, in the blend it names", async () => {
    await actAs("chemist");
    const before = count();
    const r = await importPhSeriesAction(null, form({ ...head, csv: csvOf(good), mode: "all" }));
    expect(r?.ok, r?.message).toBe(true);
    expect(count()).toBe(before + good.length);
    const id = (r?.data as { id: string }).id;
    const s = getPhSeries(db(), { id })!;
    expect(s.mediumLabel).toBe("Water + Ethanol, x₂ = 0.1");
    expect(s.ionicStrengthMolL).toBe(0.05);
    expect(s.vials.map((v) => v.pH)).toEqual(around(BCG));
    expect(new Set(s.vials.map((v) => v.reviewState))).toEqual(new Set(["pending"]));
    const stored = db().select({ instrument: measurements.instrument, cond: conditions }).from(measurements).innerJoin(conditions, eq(measurements.conditionId, conditions.id)).where(inArray(measurements.id, s.vials.map((v) => v.measurementId))).all();
    expect(stored.every((m) => m.instrument === "plate reader 2" && m.cond.secondSolventId === "solv-ethanol" && m.cond.secondSolventMoleFraction === 0.1)).toBe(true);
    // Pending vials are not fitted: no pKa until they are accepted.
    const fit = ensurePhSeriesFit(db(), { seriesId: id });
    expect(fit.ok).toBe(false);
    expect(fit.vials).toBe(0);
  }, 120_000);
});

describe("GET /api/search with phFrom and phTo", () => {
  type PhHit = { dye: { code: string }; phTransition: { pKa: number; pKaStdErr: number; transition: [number, number]; acidLab: number[]; baseLab: number[] }; deltaE00?: number };

  it("returns the indicator whose transition lies in the range, not one outside, with pKa ± SE, transition and both colours", async () => {
    const low = await callSearch("phFrom=2.5&phTo=7");
    expect(low.status).toBe(200);
    expect(low.body.phRange.rule).toMatch(/wholly within/);
    const lowHits = low.body.results as PhHit[];
    expect(lowHits.map((h) => h.dye.code)).toEqual(["PH-BCG"]);
    const t = lowHits[0].phTransition;
    expect(Math.abs(t.pKa - BCG)).toBeLessThan(0.1);
    expect(t.pKaStdErr).toBeGreaterThan(0);
    expect(t.transition[0]).toBeGreaterThanOrEqual(2.5);
    expect(t.transition[1]).toBeLessThanOrEqual(7);
    expect(t.transition[0]).toBeLessThan(t.pKa);
    expect(t.transition[1]).toBeGreaterThan(t.pKa);
    expect(deltaE00(t.acidLab as [number, number, number], t.baseLab as [number, number, number])).toBeGreaterThan(20);

    const high = (await callSearch("phFrom=6&phTo=11")).body.results as PhHit[];
    expect(high.map((h) => h.dye.code)).toEqual(["PH-PR"]);
    expect(Math.abs(high[0].phTransition.pKa - PHENOL_RED)).toBeLessThan(0.1);
    // Both fit in a wide range; the one whose transition is more centred comes first (centre 6.5).
    const both = (await callSearch("phFrom=1&phTo=12")).body.results as PhHit[];
    expect(both.map((h) => h.dye.code)).toEqual(["PH-PR", "PH-BCG"]);
    // A range narrower than the transition holds no dye.
    expect((await callSearch("phFrom=4.5&phTo=5.5")).body.results).toEqual([]);
  }, 120_000);

  it("with a target colour keeps the exact ΔE00 ranking among the qualifying dyes only", async () => {
    const blue = await callSearch("phFrom=2.5&phTo=7&hex=2050c0");
    expect(blue.status).toBe(200);
    const hits = blue.body.results as (PhHit & { deltaE00: number; lab: number[] })[];
    expect(hits.map((h) => h.dye.code)).toEqual(["PH-BCG"]);
    expect(hits[0].phTransition.pKa).toBeGreaterThan(0);
    // Without the pH range, the other dyes take part and the first hit is at most as far.
    const open = (await callSearch("hex=2050c0")).body.results as { dye: { code: string }; deltaE00: number }[];
    const bcgOpen = open.find((h) => h.dye.code === "PH-BCG")!;
    expect(hits[0].deltaE00).toBeCloseTo(bcgOpen.deltaE00, 10);
    // A red target: phenol red's base form is closer, but it changes colour outside 2.5–7, so it is left out.
    const red = (await callSearch("phFrom=2.5&phTo=7&hex=c02040")).body.results as PhHit[];
    expect(red.map((h) => h.dye.code)).toEqual(["PH-BCG"]);
    expect((await callSearch("hex=c02040&limit=200")).body.results.some((h: PhHit) => h.dye.code === "PH-PR")).toBe(true);
  }, 120_000);

  it("refuses half a range and a reversed one in one sentence", async () => {
    const half = await callSearch("phFrom=4");
    expect(half.status).toBe(422);
    expect(half.body.error.message).toMatch(/both phFrom and phTo/);
    const reversed = await callSearch("phFrom=8&phTo=4");
    expect(reversed.status).toBe(422);
    expect(reversed.body.error.message).toMatch(/phFrom must be below phTo/);
  });
});
