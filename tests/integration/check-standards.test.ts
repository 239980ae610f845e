/**
 * Check standards on the bench and on the Lighting page (issue 8), on the real database, actions,
 * route handler and colour engine: a photo holding only a check standard, the live reading refused in
 * words when no light correction is chosen, drift readings written in the save's transaction (mail
 * only after the commit), and admins editing and retiring standards (audited; other roles refused).
 *
 * Known values: tile and vial colours are 8-bit sRGB paints whose CIELAB comes from the independent
 * IEC 61966-2-1 / CIE 015:2018 formulas in tests/support/srgb-reference.ts; ΔE00 is checked against
 * tests/support/ciede2000-reference.ts (itself checked against Sharma, Wu & Dalal 2005, Table 1, in
 * lighting.test.ts). The 1 ΔE*ab agreement for an sRGB photo read through an identity profile is common
 * practice, no source.
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq, sql } from "drizzle-orm";
import { createCheckStandardAction, retireCheckStandardAction, updateCheckStandardAction } from "@/app/actions/lighting";
import { saveMeasurementsAction } from "@/app/actions/bench";
import { POST as measure } from "@/app/api/photos/[id]/measure/route";
import { db } from "@/db/client";
import { saveMeasurements } from "@/db/queries/bench";
import { benchCheckStandards, checkHistory, listCheckStandards } from "@/db/queries/lighting";
import { storePhoto } from "@/db/queries/photos";
import { auditLog, checkReadings, checkStandards, driftReadings, lightingProfiles, measurements, photos } from "@/db/schema";
import { checkStandardRefusal } from "@/lib/bench/checks";
import { mailboxDir } from "@/lib/mail";
import { objectStore } from "@/lib/storage";
import { ciede2000Reference } from "../support/ciede2000-reference";
import { RACK, rackPhoto, type Rgb8 } from "../support/photos";
import { deltaE76, labOf8 } from "../support/srgb-reference";
import { actAs, buildWorld, form, PEOPLE, tokenFor } from "../support/world";

const limits = { maxBytes: 40 * 1048576, maxPixels: 100e6 };
const PROFILE = "lp_check_identity";
const PAINT: Rgb8 = [176, 92, 64];
const WHITE: Rgb8 = [235, 235, 235];
const TRUTH = labOf8(PAINT);
// The tile's registered value, as if the spectrophotometer read it 2 L* darker and a little redder (invented offset).
const KNOWN: [number, number, number] = [TRUTH[0] - 2, TRUTH[1] + 1.5, TRUTH[2] - 0.8];

const box = (i: number) => ({ shape: "rect" as const, x: RACK.vial.x0 + i * RACK.vial.step + 15, y: RACK.vial.y + 20, w: RACK.vial.w - 30, h: RACK.vial.h - 40 });
const whiteRegion = { shape: "ellipse" as const, x: RACK.white.x + 20, y: RACK.white.y + 20, w: RACK.white.w - 40, h: RACK.white.h - 40 };
const vial = (i: number, extra: Record<string, unknown> = {}) => ({ region: box(i), dyeId: "dye_t1", solventId: "solv-methanol", acidBase: "neutral", ph: null, concentrationUmolL: 20, flagReason: "", ...extra });
const save = (payload: unknown) => saveMeasurementsAction(null, form({ payload: JSON.stringify(payload) }));
const photoOf = async (vials: Rgb8[], name: string, white: Rgb8 = WHITE) =>
  (await storePhoto(db(), objectStore(), { bytes: await rackPhoto(vials, { white, format: "png" }), originalName: name, uploaderId: PEOPLE.chemist.id, limits })).photo.id;
const rowsOf = (photoId: string) => ({
  measurements: db().select().from(measurements).where(eq(measurements.photoId, photoId)).all().length,
  drift: db().select().from(driftReadings).where(eq(driftReadings.photoId, photoId)).all().length,
  checks: db().select().from(checkReadings).where(eq(checkReadings.photoId, photoId)).all().length,
});
const mailCount = () => (fs.existsSync(mailboxDir()) ? fs.readdirSync(mailboxDir()).length : 0);
const standardForm = (fields: Record<string, string> = {}) => ({ name: "Terracotta check tile", kind: "tile", l: String(KNOWN[0]), a: String(KNOWN[1]), b: String(KNOWN[2]), whitePoint: "D65", sourceInstrument: "test: computed offset", notes: "", ...fields });
const standardNamed = (name: string) => db().select().from(checkStandards).where(eq(checkStandards.name, name)).get()!;

let standardId: string;

beforeAll(async () => {
  await buildWorld();
  // An approved profile whose correction is the identity: an sRGB photo reads as its sRGB values.
  db()
    .insert(lightingProfiles)
    .values({ id: PROFILE, name: "Identity box", illuminant: "D65", lightSource: "LED", camera: "cam", correctionKind: "matrix-3x3", correction: [1, 0, 0, 0, 1, 0, 0, 0, 1], validFrom: new Date("2020-01-01"), state: "approved" })
    .run();
  await actAs("admin");
  const created = await createCheckStandardAction(null, form(standardForm()));
  expect(created, JSON.stringify(created)).toMatchObject({ ok: true });
  standardId = standardNamed("Terracotta check tile").id;
});

describe("a photo holding only a check standard", { timeout: 120_000 }, () => {
  it("saves the check reading and no measurement, with a message saying so", async () => {
    const photoId = await photoOf([PAINT], "check-only.png");
    await actAs("chemist");
    const res = await save({ photoId, lightingProfileId: PROFILE, references: [], vials: [], checkStandards: [{ standardId, region: box(0) }] });
    expect(res, JSON.stringify(res)).toMatchObject({
      ok: true,
      message: expect.stringMatching(/^Check reading saved, no measurements \(only check standards were marked\)\. Recorded in the profile's check history: “Terracotta check tile” ΔE00 \d+\.\d\d to its known value\.$/),
      data: { ids: [] },
    });
    expect(rowsOf(photoId)).toEqual({ measurements: 0, drift: 0, checks: 1 });
    const reading = db().select().from(checkReadings).where(eq(checkReadings.photoId, photoId)).get()!;
    expect(reading).toMatchObject({ standardId, profileId: PROFILE, createdBy: PEOPLE.chemist.id });
    // Read through the identity profile, the tile comes out at its sRGB paint's CIELAB …
    expect(deltaE76([reading.l, reading.a, reading.b], TRUTH)).toBeLessThan(1);
    // … and the stored ΔE00 is CIEDE2000 to the registered value, computed independently.
    expect(reading.deltaE00).toBeCloseTo(ciede2000Reference([reading.l, reading.a, reading.b], KNOWN), 6);
    expect(checkHistory(db(), { profileId: PROFILE }).map((h) => h.reading.id)).toContain(reading.id);
    expect(db().select().from(photos).where(eq(photos.id, photoId)).get()!.lightingProfileId).toBe(PROFILE);
    expect(db().select().from(auditLog).where(and(eq(auditLog.entityId, reading.id), eq(auditLog.action, "check-reading.create"))).all()).toHaveLength(1);
  });

  it("still refuses a save with neither a vial nor a check standard, saying what to mark", async () => {
    const photoId = await photoOf([[40, 40, 40]], "nothing.png");
    await actAs("chemist");
    expect(await save({ photoId, lightingProfileId: PROFILE, references: [], vials: [], checkStandards: [] })).toMatchObject({ ok: false, code: "invalid_input", message: expect.stringMatching(/Mark at least one vial or check standard/) });
    expect(rowsOf(photoId)).toEqual({ measurements: 0, drift: 0, checks: 0 });
  });
});

describe("a check standard with no light correction chosen yet", { timeout: 120_000 }, () => {
  let photoId: string;
  const live = (body: Record<string, unknown>) =>
    measure(
      new Request(`http://localhost:3000/api/photos/${photoId}/measure`, {
        method: "POST",
        headers: { authorization: `Bearer ${tokenFor("chemist")}`, "content-type": "application/json" },
        body: JSON.stringify(body),
      }),
      { params: Promise.resolve({ id: photoId }) },
    );

  beforeAll(async () => {
    photoId = await photoOf([PAINT, [120, 120, 160]], "check-live.png");
  });

  it("the decision: a profile or an in-photo reference makes a check standard readable, nothing else does", () => {
    expect(checkStandardRefusal({ lightingProfileId: null, referenceCount: 0 })).toMatch(/choose a lighting profile or mark a white or grey reference/);
    expect(checkStandardRefusal({ lightingProfileId: PROFILE, referenceCount: 0 })).toBeNull();
    expect(checkStandardRefusal({ lightingProfileId: null, referenceCount: 1 })).toBeNull();
  });

  it("the live route answers 200: vials measured (flagged uncorrected), the check told in words what to do first", async () => {
    const res = await live({ lightingProfileId: null, references: [], vials: [{ key: "v1", region: box(1) }], checks: [{ key: "c1", region: box(0) }] });
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.vials).toEqual([expect.objectContaining({ key: "v1", ok: true, colour: expect.objectContaining({ flags: ["uncorrected"] }) })]);
    expect(body.checks).toEqual([{ key: "c1", ok: false, code: "needs-correction", error: expect.stringMatching(/^No light correction yet: choose a lighting profile or mark a white or grey reference of known CIELAB first/) }]);
  });

  it("with a reference or a profile, the check is read like a vial, close to its paint's CIELAB", async () => {
    for (const body of [
      { lightingProfileId: null, references: [{ region: whiteRegion, lab: labOf8(WHITE) }], vials: [], checks: [{ key: "c1", region: box(0) }] },
      { lightingProfileId: PROFILE, references: [], vials: [], checks: [{ key: "c1", region: box(0) }] },
    ]) {
      const res = await live(body);
      expect(res.status).toBe(200);
      const out = await res.json();
      expect(out.checks[0]).toMatchObject({ key: "c1", ok: true });
      expect(deltaE76(out.checks[0].colour.lab, TRUTH), JSON.stringify(body)).toBeLessThan(1);
    }
  });

  it("the save refuses a check standard with no correction, in the same words, and stores nothing", async () => {
    await actAs("chemist");
    const res = await save({ photoId, lightingProfileId: null, references: [], vials: [vial(1, { flagReason: "no light box today" })], checkStandards: [{ standardId, region: box(0) }] });
    expect(res).toMatchObject({ ok: false, code: "invalid_input", message: expect.stringMatching(/^No light correction yet: choose a lighting profile or mark a white or grey reference/) });
    expect(rowsOf(photoId)).toEqual({ measurements: 0, drift: 0, checks: 0 });
  });
});

describe("drift readings are written with the vials", { timeout: 120_000 }, () => {
  // The rack under a much warmer light than the profile's: its white tile drifts past the limit.
  const warm = (c: Rgb8) => [c[0], Math.round(c[1] * 0.8), Math.round(c[2] * 0.55)] as Rgb8;
  const payload = (photoId: string) => ({
    photoId,
    lightingProfileId: PROFILE,
    references: [{ region: whiteRegion, lab: labOf8(WHITE), label: "white tile" }],
    vials: [vial(0, { flagReason: "Known warm lamp" })],
    checkStandards: [{ standardId, region: box(1) }],
  });

  // A real SQLite failure injected on rows the save writes after the measurements: the drift readings
  // themselves, and the check readings that follow them.
  it.each(["drift_readings", "check_readings"])("a failure on %s, after the vials, leaves no vial, drift or check row and sends no mail", async (table) => {
    const photoId = await photoOf([warm([60, table === "drift_readings" ? 130 : 150, 90]), warm(PAINT)], `warm-fail-${table}.png`, warm(WHITE));
    const mails = mailCount();
    db().$client.exec(`CREATE TEMP TRIGGER inject_failure BEFORE INSERT ON ${table} BEGIN SELECT RAISE(ABORT, 'injected failure'); END`);
    try {
      await actAs("chemist");
      const res = await save(payload(photoId));
      expect(res).toMatchObject({ ok: false });
    } finally {
      db().$client.exec("DROP TRIGGER inject_failure");
    }
    expect(rowsOf(photoId)).toEqual({ measurements: 0, drift: 0, checks: 0 });
    expect(mailCount()).toBe(mails);
  });

  it("a good save stores the vial, the flagged drift reading and the check reading, then mails the admins", async () => {
    const photoId = await photoOf([warm([60, 141, 90]), warm(PAINT)], "warm-ok.png", warm(WHITE));
    const mails = mailCount();
    await actAs("chemist");
    const res = await save(payload(photoId));
    expect(res, JSON.stringify(res)).toMatchObject({ ok: true, message: expect.stringMatching(/^Saved 1 measurement; it waits/) });
    expect(rowsOf(photoId)).toEqual({ measurements: 1, drift: 1, checks: 1 });
    const drift = db().select().from(driftReadings).where(eq(driftReadings.photoId, photoId)).get()!;
    expect(drift).toMatchObject({ profileId: PROFILE, label: "white tile", flagged: true });
    expect(drift.deltaE00).toBeGreaterThan(drift.thresholdDeltaE00);
    // Audited under the chemist who saved the photo.
    expect(db().select({ actorId: auditLog.actorId }).from(auditLog).where(and(eq(auditLog.entityId, drift.id), eq(auditLog.action, "drift-reading.create"))).all()).toEqual([{ actorId: PEOPLE.chemist.id }]);
    const sent = fs.readdirSync(mailboxDir()).map((f) => JSON.parse(fs.readFileSync(path.join(mailboxDir(), f), "utf8")) as { to: string; subject: string; text: string });
    expect(sent.length).toBe(mails + 1);
    expect(sent.some((m) => m.to === PEOPLE.admin.email && /Light drift on “Identity box”/.test(m.subject) && m.text.includes(`/bench/photos/${photoId}`))).toBe(true);
  });
});

describe("editing and retiring check standards", { timeout: 120_000 }, () => {
  it("an admin edits a standard without readings, values included; the change is audited with before and after", async () => {
    await actAs("admin");
    expect(await createCheckStandardAction(null, form(standardForm({ name: "Blue vial", kind: "vial", l: "40", a: "10", b: "-45", whitePoint: "D50", sourceInstrument: "spectrophotometer A" })))).toMatchObject({ ok: true });
    const id = standardNamed("Blue vial").id;
    const res = await updateCheckStandardAction(null, form({ id, ...standardForm({ name: "Blue vial, lot 2", kind: "vial", l: "41.25", a: "9.5", b: "-44", whitePoint: "D65", sourceInstrument: "spectrophotometer B, 2026-11-30", notes: "re-measured" }) }));
    expect(res, JSON.stringify(res)).toMatchObject({ ok: true });
    expect(db().select().from(checkStandards).where(eq(checkStandards.id, id)).get()).toMatchObject({ name: "Blue vial, lot 2", l: 41.25, a: 9.5, b: -44, whitePoint: "D65", sourceInstrument: "spectrophotometer B, 2026-11-30", notes: "re-measured" });
    const audit = db().select().from(auditLog).where(and(eq(auditLog.entityId, id), eq(auditLog.action, "check-standard.update"))).get()!;
    expect(audit.actorId).toBe(PEOPLE.admin.id);
    expect(audit.before).toMatchObject({ name: "Blue vial", lab: [40, 10, -45], whitePoint: "D50" });
    expect(audit.after).toMatchObject({ name: "Blue vial, lot 2", lab: [41.25, 9.5, -44], whitePoint: "D65" });
    // Another standard's name is refused.
    expect(await updateCheckStandardAction(null, form({ id, ...standardForm({ name: "Terracotta check tile" }) }))).toMatchObject({ ok: false, code: "conflict", fieldErrors: { name: expect.any(Array) } });
  });

  it("a standard with readings keeps its known value (refused with what to do); its name and notes can still change", async () => {
    await actAs("admin");
    const before = standardNamed("Terracotta check tile");
    const refused = await updateCheckStandardAction(null, form({ id: standardId, ...standardForm({ l: String(KNOWN[0] + 0.5) }) }));
    expect(refused).toMatchObject({ ok: false, code: "conflict", message: expect.stringMatching(/already has \d+ readings? whose ΔE00 were computed against its known value.*Register the new value as a new check standard and retire this one/) });
    const whiteRefused = await updateCheckStandardAction(null, form({ id: standardId, ...standardForm({ whitePoint: "D50" }) }));
    expect(whiteRefused).toMatchObject({ ok: false, code: "conflict" });
    expect(standardNamed("Terracotta check tile")).toEqual(before);
    // The same known value sent back (as the edit form does, at full precision) with a new name and notes.
    const renamed = await updateCheckStandardAction(null, form({ id: standardId, ...standardForm({ name: "Terracotta tile, bench 1", notes: "kept in the dark drawer" }) }));
    expect(renamed, JSON.stringify(renamed)).toMatchObject({ ok: true });
    expect(db().select().from(checkStandards).where(eq(checkStandards.id, standardId)).get()).toMatchObject({ name: "Terracotta tile, bench 1", notes: "kept in the dark drawer", l: KNOWN[0], a: KNOWN[1], b: KNOWN[2] });
  });

  it("a retired standard is no longer offered or accepted on the bench; the history still shows its readings", async () => {
    await actAs("admin");
    const readingsBefore = checkHistory(db(), { profileId: PROFILE }).filter((h) => h.reading.standardId === standardId);
    expect(readingsBefore.length).toBeGreaterThan(0);
    // Marked before the retirement, saved after: refused at the save and inside its transaction.
    const photoId = await photoOf([PAINT, [30, 30, 200]], "after-retire.png");
    expect(await retireCheckStandardAction(null, form({ id: standardId }))).toMatchObject({ ok: true });
    const row = db().select().from(checkStandards).where(eq(checkStandards.id, standardId)).get()!;
    expect(row.retiredBy).toBe(PEOPLE.admin.id);
    expect(row.retiredAt).toBeInstanceOf(Date);
    expect(db().select().from(auditLog).where(and(eq(auditLog.entityId, standardId), eq(auditLog.action, "check-standard.retire"))).all()).toHaveLength(1);
    expect(await retireCheckStandardAction(null, form({ id: standardId }))).toMatchObject({ ok: false, code: "conflict", message: expect.stringMatching(/already retired/) });

    expect(benchCheckStandards(db()).map((s) => s.id)).not.toContain(standardId);
    expect(listCheckStandards(db()).find((s) => s.id === standardId)).toMatchObject({ retiredAt: expect.any(Date), readings: readingsBefore.length });
    const history = checkHistory(db(), { profileId: PROFILE }).filter((h) => h.reading.standardId === standardId);
    expect(history.map((h) => h.reading.id)).toEqual(readingsBefore.map((h) => h.reading.id));
    expect(history[0]).toMatchObject({ standard: "Terracotta tile, bench 1", standardRetiredAt: expect.any(Date) });

    await actAs("chemist");
    const res = await save({ photoId, lightingProfileId: PROFILE, references: [], vials: [], checkStandards: [{ standardId, region: box(0) }] });
    expect(res).toMatchObject({ ok: false, code: "invalid_input", message: expect.stringMatching(/“Terracotta tile, bench 1” was retired on \d{4}-\d\d-\d\d; pick one in use/) });
    // The query refuses it too, after writing the vial: the whole save is rolled back.
    expect(() =>
      saveMeasurements(db(), {
        actorId: PEOPLE.chemist.id,
        photoId,
        lightingProfileId: PROFILE,
        correction: { kind: "matrix-3x3", values: [1, 0, 0, 0, 1, 0, 0, 0, 1] },
        references: [],
        vials: [{ region: box(1), dyeId: "dye_t1", solventId: "solv-methanol", acidBase: "neutral", ph: null, concentrationUmolL: 20, rawLinearRgb: [0.01, 0.01, 0.6], xyz: [18, 8, 90], lab: [30, 60, -90], pixels: 100, rejected: 0, spread: 0, flags: [], flagReason: null }],
        checks: [{ standardId, labD65: TRUTH }],
      }),
    ).toThrow(/was retired on/);
    expect(rowsOf(photoId)).toEqual({ measurements: 0, drift: 0, checks: 0 });
  });

  describe.each(["chemist", "formulator"] as const)("a %s", (who) => {
    it("may not register, edit or retire a check standard; nothing changes", async () => {
      const id = standardNamed("Blue vial, lot 2").id;
      const before = db().select().from(checkStandards).all();
      const audits = db().select({ n: sql<number>`count(*)` }).from(auditLog).get()!.n;
      await actAs(who);
      expect(await createCheckStandardAction(null, form(standardForm({ name: `Tile by ${who}` })))).toMatchObject({ ok: false, code: "forbidden" });
      expect(await updateCheckStandardAction(null, form({ id, ...standardForm({ name: `Renamed by ${who}` }) }))).toMatchObject({ ok: false, code: "forbidden" });
      expect(await retireCheckStandardAction(null, form({ id }))).toMatchObject({ ok: false, code: "forbidden" });
      expect(db().select().from(checkStandards).all()).toEqual(before);
      expect(db().select({ n: sql<number>`count(*)` }).from(auditLog).get()!.n).toBe(audits);
    });
  });
});
