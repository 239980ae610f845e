/**
 * The write API (CONTRACT.md): POST /api/dyes, PATCH /api/dyes/{id}, POST /api/measurements, for
 * every caller; the same checks and audit entries as the UI; and "accept all from this photo".
 * Real database, real tokens and sessions.
 */
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { POST as postDye } from "@/app/api/dyes/route";
import { PATCH as patchDye } from "@/app/api/dyes/[id]/route";
import { POST as postMeasurements } from "@/app/api/measurements/route";
import { acceptPhotoAction } from "@/app/actions/review";
import { importCsvAction } from "@/app/actions/imports";
import { db } from "@/db/client";
import { auditLog, dyes, measurements, photos } from "@/db/schema";
import { deltaE00 } from "@/lib/color/difference";
import { localMailbox } from "@/lib/mail";
import { actAs, buildWorld, form, PEOPLE, sessionCookieFor, tokenFor, type Who } from "../support/world";

type Caller = Who | "anonymous";
const auth = (who: Caller): Record<string, string> => (who === "anonymous" ? {} : { authorization: `Bearer ${tokenFor(who)}` });
const json = (url: string, method: string, headers: Record<string, string>, body: unknown) =>
  new Request(`http://localhost:3000${url}`, { method, headers: { "content-type": "application/json", ...headers }, body: JSON.stringify(body) });
const auditCount = (action: string) => db().select({ n: sql<number>`count(*)` }).from(auditLog).where(eq(auditLog.action, action)).get()!.n;
const measurementCount = () => db().select({ n: sql<number>`count(*)` }).from(measurements).get()!.n;

beforeAll(async () => {
  await buildWorld();
}, 60_000);

const INSTRUMENT = { dye: "T-001", lab: [34.5, 30.5, -34.5], whitePoint: "D65", observer: "2", instrument: "Test plate reader, 1 cm cell", condition: { solvent: "methanol" } };

describe("POST /api/dyes: the role matrix", () => {
  it.each([
    ["anonymous", 401],
    ["retired", 401],
    ["formulator", 403],
    ["chemist", 201],
    ["admin", 201],
  ] as const)("%s → %i", async (who, status) => {
    const before = auditCount("dye.create");
    const res = await postDye(json("/api/dyes", "POST", auth(who), { code: `W-${who}`, name: `Write ${who}`, class: "azo", synonyms: ["WX"], molarMass: 310.3 }));
    expect(res.status).toBe(status);
    const body = await res.json();
    if (status === 201) {
      expect(body.dye).toMatchObject({ code: `W-${who}`, name: `Write ${who}`, class: "azo", synonyms: ["WX"], molarMass: 310.3 });
      expect(auditCount("dye.create")).toBe(before + 1);
    } else {
      expect(body.error.code).toBe(status === 401 ? "unauthenticated" : "forbidden");
      expect(auditCount("dye.create")).toBe(before);
    }
  });

  it("refuses with 422 what the catalogue form refuses: a wrong CAS check digit (CAS Registry check-digit rule), and 409 for a taken code", async () => {
    // 7732-18-5 (water) has check digit 5; 7732-18-4 fails the published check-digit rule.
    const bad = await postDye(json("/api/dyes", "POST", auth("chemist"), { code: "W-CAS", name: "x", class: "azo", casNumber: "7732-18-4" }));
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.message).toMatch(/check digit|CAS/i);
    const taken = await postDye(json("/api/dyes", "POST", auth("chemist"), { code: "t-001", name: "Copy", class: "azo" }));
    expect(taken.status).toBe(409);
    expect(db().select().from(dyes).where(eq(dyes.code, "W-CAS")).get()).toBeUndefined();
  });

  it("a session cookie from another site is refused (same-origin check), one from the page is accepted", async () => {
    const cookie = await sessionCookieFor("chemist");
    expect((await postDye(json("/api/dyes", "POST", { cookie, origin: "https://elsewhere.example" }, { code: "W-X1", name: "x", class: "azo" }))).status).toBe(403);
    expect((await postDye(json("/api/dyes", "POST", { cookie, origin: "http://localhost:3000", host: "localhost:3000" }, { code: "W-X2", name: "x", class: "azo" }))).status).toBe(201);
  });
});

describe("PATCH /api/dyes/{id}", () => {
  const call = (who: Caller, id: string, body: unknown) => patchDye(json(`/api/dyes/${id}`, "PATCH", auth(who), body), { params: Promise.resolve({ id }) });

  it.each([
    ["anonymous", 401],
    ["formulator", 403],
    ["chemist", 200],
    ["admin", 200],
  ] as const)("%s → %i", async (who, status) => {
    const res = await call(who, "dye_t1", { notes: `checked by ${who}` });
    expect(res.status).toBe(status);
    if (status === 200) expect((await res.json()).dye).toMatchObject({ id: "dye_t1", code: "T-001", notes: `checked by ${who}`, name: "Test Violet" });
  });

  it("keeps the fields not sent, refuses an empty name with 422 and an unknown id with 404, and records before/after", async () => {
    expect((await call("chemist", "dye_t1", { name: "  " })).status).toBe(422);
    expect((await call("chemist", "dye_nope", { name: "x" })).status).toBe(404);
    const last = db().select().from(auditLog).where(and(eq(auditLog.action, "dye.update"), eq(auditLog.entityId, "dye_t1"))).all().pop()!;
    expect((last.before as { notes: string }).notes).toMatch(/checked by/);
    expect(db().select().from(dyes).where(eq(dyes.id, "dye_t1")).get()!.name).toBe("Test Violet");
  });
});

describe("POST /api/measurements (instrument colours)", () => {
  it.each([
    ["anonymous", 401],
    ["formulator", 403],
    ["chemist", 201],
    ["admin", 201],
  ] as const)("%s → %i; stored ones wait for review", async (who, status) => {
    const before = measurementCount();
    const res = await postMeasurements(json("/api/measurements", "POST", auth(who), INSTRUMENT));
    expect(res.status).toBe(status);
    if (status === 201) {
      const body = await res.json();
      expect(body.measurement).toMatchObject({ reviewState: "pending", illuminant: "D65", observer: "CIE 1931 2°", instrument: INSTRUMENT.instrument, condition: expect.objectContaining({ solvent: "Methanol" }) });
      expect(measurementCount()).toBe(before + 1);
    } else expect(measurementCount()).toBe(before);
  });

  it("adapts D50 colours to D65: the D50 white stays white (Bradford keeps the white point; CIE 15:2004 whites)", async () => {
    const res = await postMeasurements(json("/api/measurements", "POST", auth("chemist"), { ...INSTRUMENT, lab: [100, 0, 0], whitePoint: "D50", flagReason: "white tile check" }));
    expect(res.status).toBe(201);
    const { measurement } = await res.json();
    expect(deltaE00(measurement.lab, [100, 0, 0])).toBeLessThan(1e-3);
  });

  it("refuses 10° data, an unknown solvent and an unknown dye with 422 naming the problem, storing nothing", async () => {
    const before = measurementCount();
    const tenDeg = await postMeasurements(json("/api/measurements", "POST", auth("chemist"), { ...INSTRUMENT, observer: "10" }));
    expect(tenDeg.status).toBe(422);
    expect((await tenDeg.json()).error.message).toMatch(/2° observer/);
    const solvent = await postMeasurements(json("/api/measurements", "POST", auth("chemist"), { ...INSTRUMENT, condition: { solvent: "unobtainium" } }));
    expect((await solvent.json()).error.message).toMatch(/unobtainium.*solvent table/);
    const batch = await postMeasurements(json("/api/measurements", "POST", auth("chemist"), { measurements: [INSTRUMENT, { ...INSTRUMENT, dye: "NOPE-1" }] }));
    expect(batch.status).toBe(422);
    expect((await batch.json()).error.message).toMatch(/^Measurement 2: No dye has the code or id “NOPE-1”/);
    expect(measurementCount()).toBe(before);
  });

  it("a colour far from the accepted replicates (Sharma 2005 pair 17 is 27.1 ΔE00 apart) needs a flagReason, like on the bench", async () => {
    // Make the accepted replicate of T-001 in methanol pair 17's first colour; send the second.
    db().update(measurements).set({ l: 50, a: 2.5, b: 0, reviewState: "accepted" }).where(eq(measurements.id, "ms_t1")).run();
    const far = { ...INSTRUMENT, lab: [73, 25, -18] };
    const refused = await postMeasurements(json("/api/measurements", "POST", auth("chemist"), far));
    expect(refused.status).toBe(422);
    expect((await refused.json()).error.message).toMatch(/disagrees-with-replicates.*flagReason/);
    const kept = await postMeasurements(json("/api/measurements", "POST", auth("chemist"), { ...far, flagReason: "new batch of dye" }));
    expect(kept.status).toBe(201);
    expect((await kept.json()).measurement.flags).toEqual(["disagrees-with-replicates"]);
    // Pair 22 (ΔE00 1.0000) is within the 3 ΔE00 limit for one replicate; pair 16 (ΔE00 4.3065) is not.
    const near = await postMeasurements(json("/api/measurements", "POST", auth("chemist"), { ...INSTRUMENT, lab: [50, 3.2972, 0] }));
    expect(near.status).toBe(201);
    expect((await near.json()).measurement.flags).toEqual([]);
    expect((await postMeasurements(json("/api/measurements", "POST", auth("chemist"), { ...INSTRUMENT, lab: [50, 0, -2.5] }))).status).toBe(422);
  });
});

describe("CSV import of instrument colours", () => {
  const CSV = ["dye,solvent,L,a,b,white_point,instrument", "T-001,Methanol,50.5,2,0.5,D65,reader", "T-001,Methanol,abc,2,0,D65,reader", "T-001,Unobtainium,50,2,0,D65,reader"].join("\n");

  it("names each bad row's line and column, and stores nothing when asked for the whole file", async () => {
    await actAs("chemist");
    const before = measurementCount();
    const preview = await importCsvAction(null, form({ kind: "measurements", csv: CSV, mode: "preview" }));
    expect(preview?.ok).toBe(true);
    const problems = (preview!.data as { problems: { line: number; column: string }[] }).problems;
    expect(problems.map((p) => [p.line, p.column])).toEqual([
      [3, "L"],
      [4, "solvent"],
    ]);
    const all = await importCsvAction(null, form({ kind: "measurements", csv: CSV, mode: "all" }));
    expect(all?.ok).toBe(false);
    expect(all?.message).toMatch(/Nothing was stored.*line 3, column L/);
    expect(measurementCount()).toBe(before);
    const good = await importCsvAction(null, form({ kind: "measurements", csv: CSV, mode: "good" }));
    expect(good?.ok).toBe(true);
    expect(measurementCount()).toBe(before + 1);
  });

  it("imports dyes only when every row is good; a duplicate code within the file is named by line", async () => {
    await actAs("chemist");
    const csv = ["code,name,class", "IMP-1,Imported One,azo", "IMP-1,Again,azo"].join("\n");
    const res = await importCsvAction(null, form({ kind: "dyes", csv, mode: "all" }));
    expect(res?.ok).toBe(false);
    expect(res?.message).toMatch(/line 3, column code/);
    expect(db().select().from(dyes).where(eq(dyes.code, "IMP-1")).get()).toBeUndefined();
  });

  it("formulators cannot import", async () => {
    await actAs("formulator");
    const res = await importCsvAction(null, form({ kind: "dyes", csv: "code,name,class\nF-1,x,azo", mode: "all" }));
    expect(res?.code).toBe("forbidden");
  });
});

describe("accept all from this photo", () => {
  it("accepts the others' waiting measurements of the photo, never the reviewer's own, and needs the 'checked' tick", async () => {
    const handle = db();
    handle.insert(photos).values({ id: "ph_acc", storageKey: "k", sha256: "acc", byteSize: 1, mimeType: "image/png", width: 10, height: 10, uploadedBy: PEOPLE.chemist2.id }).run();
    const base = { dyeId: "dye_t1", conditionId: "cond_t1", rawR: 0.2, rawG: 0.1, rawB: 0.3, x: 10, y: 8, z: 20, l: 50, a: 2, b: 0, pixelCount: 10, rejectedCount: 0, spread: 0.4, photoId: "ph_acc" };
    handle.insert(measurements).values({ ...base, id: "ms_acc1", createdBy: PEOPLE.chemist2.id }).run();
    handle.insert(measurements).values({ ...base, id: "ms_acc2", createdBy: PEOPLE.chemist2.id }).run();
    handle.insert(measurements).values({ ...base, id: "ms_acc3", createdBy: PEOPLE.chemist.id }).run();

    await actAs("chemist");
    const unticked = await acceptPhotoAction(null, form({ photoId: "ph_acc" }));
    expect(unticked?.ok).toBe(false);
    expect(unticked?.message).toMatch(/checked every region/);
    const ok = await acceptPhotoAction(null, form({ photoId: "ph_acc", checked: "yes" }));
    expect(ok?.ok).toBe(true);
    expect(ok?.message).toMatch(/Accepted 2 measurements.*1 of your own/);
    const states = Object.fromEntries(handle.select({ id: measurements.id, s: measurements.reviewState }).from(measurements).where(eq(measurements.photoId, "ph_acc")).all().map((r) => [r.id, r.s]));
    expect(states).toEqual({ ms_acc1: "accepted", ms_acc2: "accepted", ms_acc3: "pending" });
    // One mail per author for the photo, listing both measurements (common practice, no source: no mail storm per vial).
    const mails = localMailbox().filter((m) => m.to === PEOPLE.chemist2.email && /accepted/.test(m.subject));
    expect(mails.map((m) => m.subject)).toEqual(["2 measurements accepted from one photo"]);
    expect(mails[0].text.match(/^- T-001 \(Test Violet\) in Methanol, neutral: L\* 50\.0, a\* 2\.0, b\* 0\.0/gm)).toHaveLength(2);
    expect(mails[0].text).toMatch(/\/bench\/photos\/ph_acc/);
    const again = await acceptPhotoAction(null, form({ photoId: "ph_acc", checked: "yes" }));
    expect(again?.message).toMatch(/your own/);
    await actAs("formulator");
    expect((await acceptPhotoAction(null, form({ photoId: "ph_acc", checked: "yes" })))?.code).toBe("forbidden");
  });
});
