/**
 * The lighting workflow on the real database, actions and colour engine: targets from CSV, drafts
 * fitted from a card photo, approval (admins only, within tolerance), retirement and expiry refused on
 * the bench, re-derivation of exactly the affected measurements with the old values audited, drift
 * readings that flag and mail the admins.
 *
 * Known values: the card's Lab come from linear sRGB through the independent IEC 61966-2-1 / CIE 15
 * formulas in tests/support/srgb-reference.ts. Tolerances (mean 2, max 4 ΔE00) are common practice, no source.
 */
import fs from "node:fs";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq, sql } from "drizzle-orm";
import { approveProfileAction, createCheckStandardAction, fitProfileAction, rederiveAction, reopenProfileAction, retireProfileAction, saveProfileAction, saveTargetAction } from "@/app/actions/lighting";
import { saveMeasurementsAction } from "@/app/actions/bench";
import { GET as listProfilesRoute } from "@/app/api/lighting/profiles/route";
import { GET as searchRoute } from "@/app/api/search/route";
import { db } from "@/db/client";
import { checkHistory, previewRederive } from "@/db/queries/lighting";
import { storePhoto } from "@/db/queries/photos";
import { auditLog, calibrationTargets, checkReadings, checkStandards, driftReadings, dyes, lightingProfiles, measurements } from "@/db/schema";
import { mailboxDir } from "@/lib/mail";
import { objectStore } from "@/lib/storage";
import { CARD, cardCorners, cardCsv, cardPhoto, CARD_PATCHES } from "../support/card";
import { RACK, rackPhoto, type Rgb8 } from "../support/photos";
import { ciede2000Reference } from "../support/ciede2000-reference";
import { readFixtureCsv } from "../support/fixtures";
import { deltaE76, labOf8 } from "../support/srgb-reference";
import { CARD as SPECTRAL_CARD, sceneXyzD65, spectrumLab, VIALS } from "../support/spectral-card";
import { renderSwatches, SYNTHETIC_CAMERAS } from "@/lib/color/synthetic-camera";
import { deltaE00 } from "@/lib/color/difference";
import sharp from "sharp";
import { actAs, addMeasurement, buildWorld, form, PEOPLE, redirectOf, tokenFor } from "../support/world";

const limits = { maxBytes: 40 * 1048576, maxPixels: 100e6 };
let targetId: string;
let cardPhotoId: string;
let badCardPhotoId: string;
let warmCardPhotoId: string;

const profileFields = (name: string, extra: Record<string, string> = {}) => ({
  name,
  illuminant: "D65",
  lightSource: "Daylight LED panel behind a diffuser",
  colourTemperatureK: "6500",
  camera: "Bench camera",
  cameraSettings: "1/60 s, ISO 100, WB 6500 K, HDR off",
  targetId,
  method: "matrix-3x3",
  validFrom: "2020-01-01",
  validUntil: "",
  notes: "",
  ...extra,
});

async function draft(name: string, extra: Record<string, string> = {}): Promise<string> {
  await actAs("admin");
  // Creating a draft sends the admin to it, ready to be fitted.
  const to = await redirectOf(saveProfileAction(null, form(profileFields(name, extra))));
  const id = /^\/lighting\/profiles\/(lp_[^?]+)\?created=1$/.exec(to)?.[1];
  expect(id, to).toBeDefined();
  return id!;
}

async function fit(profileId: string, photoId: string) {
  await actAs("admin");
  return fitProfileAction(null, form({ payload: JSON.stringify({ profileId, photoId, corners: cardCorners() }) }));
}

const profileRow = (id: string) => db().select().from(lightingProfiles).where(eq(lightingProfiles.id, id)).get()!;

beforeAll(async () => {
  await buildWorld();
  cardPhotoId = (await storePhoto(db(), objectStore(), { bytes: await cardPhoto(), originalName: "card.png", uploaderId: PEOPLE.admin.id, limits })).photo.id;
  // A card whose "colour 3" patch was printed wrong (green instead of blue): no fit can predict it.
  badCardPhotoId = (await storePhoto(db(), objectStore(), { bytes: await cardPhoto(undefined, { 8: [0.07, 0.3, 0.06] }), originalName: "bad-card.png", uploaderId: PEOPLE.admin.id, limits })).photo.id;
  // The same card under a warmer light (each channel scaled in linear light, common practice for a light's colour).
  warmCardPhotoId = (await storePhoto(db(), objectStore(), { bytes: await cardPhoto((c) => [c[0] * 1.0, c[1] * 0.85, c[2] * 0.6]), originalName: "warm-card.png", uploaderId: PEOPLE.admin.id, limits })).photo.id;
});

// Generous timeouts: fits with leave-one-out run many small solves, and the test machine is shared.
describe("calibration targets", { timeout: 180_000 }, () => {
  it("an admin creates a target from CSV with a rows × columns layout; line/column errors are named", async () => {
    await actAs("admin");
    const bad = await saveTargetAction(null, form({ name: "Broken card", description: "", source: "", whitePoint: "D65", gridRows: "1", gridColumns: "2", csv: "name,L*,a*,b*,white point\nred,abc,1,2,D65\nblue,40,1,2,D77" }));
    expect(bad).toMatchObject({ ok: false, code: "invalid_input" });
    expect(bad!.message).toMatch(/Line 2, column 2/);
    expect(bad!.message).toMatch(/Line 3, column 5/);
    const res = await saveTargetAction(null, form({ name: "Test card 24", description: "", source: "computed from IEC 61966-2-1", whitePoint: "D65", gridRows: String(CARD.rows), gridColumns: String(CARD.columns), csv: cardCsv() }));
    expect(res, JSON.stringify(res)).toMatchObject({ ok: true });
    targetId = res!.data!.id as string;
    const row = db().select().from(calibrationTargets).where(eq(calibrationTargets.id, targetId)).get()!;
    expect(row.patches).toHaveLength(24);
    expect(row.gridRows).toBe(4);
    const wrongLayout = await saveTargetAction(null, form({ name: "Wrong layout", description: "", source: "", whitePoint: "D65", gridRows: "5", gridColumns: "6", csv: cardCsv() }));
    expect(wrongLayout).toMatchObject({ ok: false, message: expect.stringMatching(/5 × 6 grid holds 30 patches/) });
  });

  it("chemists cannot create targets", async () => {
    await actAs("chemist");
    expect(await saveTargetAction(null, form({ name: "X", description: "", source: "", whitePoint: "D65", gridRows: "", gridColumns: "", csv: cardCsv() }))).toMatchObject({ ok: false, code: "forbidden" });
  });
});

describe("profile state machine", { timeout: 180_000 }, () => {
  it("draft → fitted → approved by an admin only; the bench refuses the draft and accepts the approved profile", async () => {
    const id = await draft("Bench box A");
    await actAs("chemist");
    expect(await fitProfileAction(null, form({ payload: JSON.stringify({ profileId: id, photoId: cardPhotoId, corners: cardCorners() }) }))).toMatchObject({ ok: false, code: "forbidden" });
    const fitted = await fit(id, cardPhotoId);
    expect(fitted, JSON.stringify(fitted)).toMatchObject({ ok: true });
    const row = profileRow(id);
    expect(row.state).toBe("draft");
    expect(row.residuals).toHaveLength(24);
    // An sRGB camera photographing an sRGB-defined card: the 3×3 is near identity and leave-one-out small.
    expect(row.looMeanDeltaE00!).toBeLessThan(0.5);
    expect(row.fitSamples).toHaveLength(24);

    // The bench refuses a draft, at upload and at save.
    await expect(storePhoto(db(), objectStore(), { bytes: await rackPhoto([[200, 50, 50]]), originalName: "r.jpg", lightingProfileId: id, uploaderId: PEOPLE.chemist.id, limits })).rejects.toThrow(/draft and not approved/);

    await actAs("chemist");
    expect(await approveProfileAction(null, form({ id, toleranceMean: "", toleranceMax: "" }))).toMatchObject({ ok: false, code: "forbidden" });
    expect(profileRow(id).state).toBe("draft");
    await actAs("admin");
    expect(await approveProfileAction(null, form({ id, toleranceMean: "", toleranceMax: "" }))).toMatchObject({ ok: true });
    const approved = profileRow(id);
    expect(approved).toMatchObject({ state: "approved", approvedBy: PEOPLE.admin.id });
    expect(approved.approvedAt).toBeInstanceOf(Date);
    expect(db().select().from(auditLog).where(and(eq(auditLog.entityId, id), eq(auditLog.action, "lighting-profile.approve"))).all()).toHaveLength(1);
    const ok = await storePhoto(db(), objectStore(), { bytes: await rackPhoto([[200, 60, 50]]), originalName: "r2.jpg", lightingProfileId: id, uploaderId: PEOPLE.chemist.id, limits });
    expect(ok.photo.lightingProfileId).toBe(id);
    // Approved profiles cannot be edited in place.
    expect(await saveProfileAction(null, form({ id, ...profileFields("Bench box A renamed") }))).toMatchObject({ ok: false, code: "conflict" });
  });

  it("refuses approval above the tolerance (a wrongly printed patch), with a sentence", async () => {
    const id = await draft("Bench box with bad card");
    expect(await fit(id, badCardPhotoId)).toMatchObject({ ok: true });
    const res = await approveProfileAction(null, form({ id, toleranceMean: "", toleranceMax: "" }));
    expect(res).toMatchObject({ ok: false, code: "conflict", message: expect.stringMatching(/Leave-one-out .* above the tolerance/) });
    expect(profileRow(id).state).toBe("draft");
  });

  it("a retired profile and an expired one are refused on the bench and shown as such in the API", async () => {
    const retiring = await draft("Bench box R");
    await fit(retiring, cardPhotoId);
    expect(await approveProfileAction(null, form({ id: retiring, toleranceMean: "", toleranceMax: "" }))).toMatchObject({ ok: true });
    expect(await retireProfileAction(null, form({ id: retiring }))).toMatchObject({ ok: true });
    expect(profileRow(retiring)).toMatchObject({ state: "retired", retiredBy: PEOPLE.admin.id });
    await expect(storePhoto(db(), objectStore(), { bytes: await rackPhoto([[10, 60, 50]]), originalName: "r3.jpg", lightingProfileId: retiring, uploaderId: PEOPLE.chemist.id, limits })).rejects.toThrow(/is retired/);

    const expiring = await draft("Bench box E", { validFrom: "2020-01-01", validUntil: "2021-01-01" });
    await fit(expiring, cardPhotoId);
    expect(await approveProfileAction(null, form({ id: expiring, toleranceMean: "", toleranceMax: "" }))).toMatchObject({ ok: true });
    await actAs("chemist");
    const photo = (await storePhoto(db(), objectStore(), { bytes: await rackPhoto([[10, 160, 50]], { format: "png" }), originalName: "r4.png", uploaderId: PEOPLE.chemist.id, limits })).photo;
    const vialRegion = { shape: "rect", x: RACK.vial.x0 + 15, y: RACK.vial.y + 20, w: RACK.vial.w - 30, h: RACK.vial.h - 40 };
    const res = await saveMeasurementsAction(null, form({ payload: JSON.stringify({ photoId: photo.id, lightingProfileId: expiring, references: [], vials: [{ region: vialRegion, dyeId: "dye_t1", solventId: "solv-methanol", acidBase: "neutral", ph: null, concentrationUmolL: 20, flagReason: "" }] }) }));
    expect(res).toMatchObject({ ok: false, message: expect.stringMatching(/expired on 2021-01-01/) });

    // A profile whose stored calibration is damaged is reported on its own; the list still answers.
    const damaged = await draft("Bench box X");
    db().update(lightingProfiles).set({ calibration: { format: "solvatlas-calibration", method: "matrix-3x3" } }).where(eq(lightingProfiles.id, damaged)).run();

    const api = await listProfilesRoute(new Request("http://localhost:3000/api/lighting/profiles", { headers: { authorization: `Bearer ${tokenFor("formulator")}` } }));
    expect(api.status).toBe(200);
    const body = await api.json();
    const byName = Object.fromEntries(body.profiles.map((p: { name: string }) => [p.name, p]));
    expect(byName["Bench box X"].residuals).toMatchObject({ methods: [], problem: expect.stringMatching(/could not be read.*fit the profile again/) });
    // The methods the fit tried (the one asked for here; "auto" lists all), with plain and hull leave-one-out
    // ΔE00 (hull patches are predicted beyond the others, so their mean is not below the plain one on this card).
    const tried = byName["Bench box A"].residuals.methods as { method: string; looMean: number; hullLooMean: number }[];
    expect(tried.map((m) => m.method)).toEqual(["matrix-3x3"]);
    const matrix = tried.find((m) => m.method === "matrix-3x3")!;
    expect(matrix.looMean).toBeCloseTo(byName["Bench box A"].residuals.looMean, 6);
    expect(matrix.hullLooMean).toBeGreaterThanOrEqual(matrix.looMean);
    expect(byName["Bench box A"].residuals.hullPatches.length).toBeGreaterThan(0);
    expect(byName["Bench box R"]).toMatchObject({ state: "retired", status: "retired", usableOnBench: false });
    expect(byName["Bench box E"]).toMatchObject({ state: "approved", status: "expired", usableOnBench: false });
    expect(byName["Bench box A"]).toMatchObject({ state: "approved", status: "approved", usableOnBench: true, method: "matrix-3x3", illuminant: "D65" });
    expect(byName["Bench box A"].residuals.patches[0]).toHaveProperty("looDeltaE00");
  });
});

describe("re-derivation", { timeout: 180_000 }, () => {
  it("after a re-fit, changes exactly the measurements under the profile, after a preview, and audits the old values", async () => {
    const id = await draft("Bench box D");
    await fit(id, cardPhotoId);
    expect(await approveProfileAction(null, form({ id, toleranceMean: "", toleranceMax: "" }))).toMatchObject({ ok: true });
    // Three measurements under this profile, one under none (made by the world), one under another profile.
    for (const m of ["ms_rd1", "ms_rd2", "ms_rd3", "ms_other"]) addMeasurement(m, PEOPLE.chemist.id, "accepted");
    db().update(measurements).set({ lightingProfileId: id }).where(sql`${measurements.id} in ('ms_rd1','ms_rd2','ms_rd3')`).run();
    const other = db().select({ id: lightingProfiles.id }).from(lightingProfiles).where(eq(lightingProfiles.name, "Bench box A")).get()!.id;
    db().update(measurements).set({ lightingProfileId: other }).where(eq(measurements.id, "ms_other")).run();
    const before = db().select().from(measurements).all();

    // Re-fit the profile from the warm-light card: its matrix changes, so do the colours it gives.
    expect(await reopenProfileAction(null, form({ id }))).toMatchObject({ ok: true });
    expect(await fit(id, warmCardPhotoId)).toMatchObject({ ok: true });
    expect(await approveProfileAction(null, form({ id, toleranceMean: "", toleranceMax: "" }))).toMatchObject({ ok: true });

    const preview = previewRederive(db(), { profileId: id });
    expect(preview.total).toBe(3);
    expect(preview.summary.changed).toBe(3);
    // Nothing has changed yet: the preview writes nothing.
    expect(db().select().from(measurements).all()).toEqual(before);

    await actAs("chemist");
    expect(await rederiveAction(null, form({ id, expected: "3" }))).toMatchObject({ ok: false, code: "forbidden" });
    await actAs("admin");
    expect(await rederiveAction(null, form({ id, expected: "2" }))).toMatchObject({ ok: false, code: "conflict" });
    expect(await rederiveAction(null, form({ id, expected: "3" }))).toMatchObject({ ok: true });

    const after = new Map(db().select().from(measurements).all().map((m) => [m.id, m]));
    for (const b of before) {
      const a = after.get(b.id)!;
      if (["ms_rd1", "ms_rd2", "ms_rd3"].includes(b.id)) {
        expect(a.l).not.toBeCloseTo(b.l, 3);
        const log = db().select().from(auditLog).where(and(eq(auditLog.entityId, b.id), eq(auditLog.action, "measurement.rederive"))).get()!;
        expect((log.before as { lab: number[] }).lab).toEqual([b.l, b.a, b.b]);
        expect((log.after as { lab: number[] }).lab).toEqual([a.l, a.a, a.b]);
      } else {
        expect(a).toEqual(b);
      }
    }
    expect(previewRederive(db(), { profileId: id }).summary.changed).toBe(0);
  });
});

describe("drift", { timeout: 180_000 }, () => {
  it("a bench reference far from the profile's expectation is recorded, flags the measurements and mails the admins", async () => {
    const id = db().select({ id: lightingProfiles.id }).from(lightingProfiles).where(eq(lightingProfiles.name, "Bench box A")).get()!.id;
    await actAs("chemist");
    const white: Rgb8 = [235, 235, 235];
    // The rack photographed under a much warmer light than the profile's: its white tile drifts.
    const warm = (c: Rgb8) => [c[0], Math.round(c[1] * 0.8), Math.round(c[2] * 0.55)] as Rgb8;
    const photo = (await storePhoto(db(), objectStore(), { bytes: await rackPhoto([warm([120, 120, 160])], { white: warm(white), format: "png" }), originalName: "warm-rack.png", lightingProfileId: id, uploaderId: PEOPLE.chemist.id, limits })).photo;
    const vialRegion = { shape: "rect", x: RACK.vial.x0 + 15, y: RACK.vial.y + 20, w: RACK.vial.w - 30, h: RACK.vial.h - 40 };
    const whiteRegion = { shape: "ellipse", x: RACK.white.x + 20, y: RACK.white.y + 20, w: RACK.white.w - 40, h: RACK.white.h - 40 };
    const mailsBefore = fs.existsSync(mailboxDir()) ? fs.readdirSync(mailboxDir()).length : 0;
    const res = await saveMeasurementsAction(
      null,
      form({ payload: JSON.stringify({ photoId: photo.id, lightingProfileId: id, references: [{ region: whiteRegion, lab: labOf8(white), label: "white tile" }], vials: [{ region: vialRegion, dyeId: "dye_t1", solventId: "solv-methanol", acidBase: "neutral", ph: null, concentrationUmolL: 20, flagReason: "Known warm lamp" }] }) }),
    );
    expect(res, JSON.stringify(res)).toMatchObject({ ok: true });
    const m = db().select().from(measurements).where(eq(measurements.id, (res!.data!.ids as string[])[0])).get()!;
    expect(m.flags).toContain("reference-drift");
    // Every new measurement carries its uncertainty.
    expect(m.uDeltaE00).toBeGreaterThan(0);
    expect(m.uL).toBeGreaterThan(0);
    const readings = db().select().from(driftReadings).where(eq(driftReadings.photoId, photo.id)).all();
    expect(readings).toHaveLength(1);
    expect(readings[0]).toMatchObject({ profileId: id, flagged: true, label: "white tile" });
    const mails = fs.readdirSync(mailboxDir()).map((f) => JSON.parse(fs.readFileSync(path.join(mailboxDir(), f), "utf8")));
    expect(mails.length).toBeGreaterThan(mailsBefore);
    expect(mails.some((x: { to: string; subject: string }) => x.to === PEOPLE.admin.email && /Light drift/.test(x.subject))).toBe(true);
  });
});

describe("check standards on the bench", { timeout: 180_000 }, () => {
  it("the reference CIEDE2000 used below reproduces Sharma, Wu & Dalal (2005) Table 1", () => {
    // Sharma, Wu & Dalal 2005, Table 1 (tests/fixtures/ciede2000_sharma2005_table1.csv), to its 4 decimals.
    for (const r of readFixtureCsv("ciede2000_sharma2005_table1.csv")) {
      expect(ciede2000Reference([+r.L1, +r.a1, +r.b1], [+r.L2, +r.a2, +r.b2]), `pair ${r.pair}`).toBeCloseTo(+r.dE00, 4);
    }
  });

  it("a region marked as a registered check standard records its ΔE00 to the known value in the profile's check history, with the vials, in one save", async () => {
    const profileId = db().select({ id: lightingProfiles.id }).from(lightingProfiles).where(eq(lightingProfiles.name, "Bench box A")).get()!.id;
    // The check tile's true colour: its 8-bit sRGB paint through IEC 61966-2-1 and CIE 015:2018 (srgb-reference.ts).
    const paint: Rgb8 = [176, 92, 64];
    const truth = labOf8(paint);
    // Its registered value, as if the spectrophotometer read it 2 L* darker and a little redder (invented offset).
    const known: [number, number, number] = [truth[0] - 2, truth[1] + 1.5, truth[2] - 0.8];
    await actAs("admin");
    const created = await createCheckStandardAction(null, form({ name: "Terracotta tile", kind: "tile", l: String(known[0]), a: String(known[1]), b: String(known[2]), whitePoint: "D65", sourceInstrument: "test: computed offset", notes: "" }));
    expect(created, JSON.stringify(created)).toMatchObject({ ok: true });
    const standardId = db().select().from(checkStandards).where(eq(checkStandards.name, "Terracotta tile")).get()!.id;

    await actAs("chemist");
    const photo = (await storePhoto(db(), objectStore(), { bytes: await rackPhoto([[120, 120, 160], paint], { format: "png" }), originalName: "rack-with-check.png", lightingProfileId: profileId, uploaderId: PEOPLE.chemist.id, limits })).photo;
    const box = (i: number) => ({ shape: "rect", x: RACK.vial.x0 + i * RACK.vial.step + 15, y: RACK.vial.y + 20, w: RACK.vial.w - 30, h: RACK.vial.h - 40 });
    const payload = (standard: string) =>
      form({
        payload: JSON.stringify({
          photoId: photo.id,
          lightingProfileId: profileId,
          references: [],
          checkStandards: [{ standardId: standard, region: box(1) }],
          vials: [{ region: box(0), dyeId: "dye_t1", solventId: "solv-methanol", acidBase: "neutral", ph: null, concentrationUmolL: 20, flagReason: "synthetic vial" }],
        }),
      });

    // An unregistered standard is refused and nothing of the photo is saved.
    const refused = await saveMeasurementsAction(null, payload("cs_nope"));
    expect(refused).toMatchObject({ ok: false, code: "invalid_input", message: expect.stringMatching(/not registered/) });
    expect(db().select().from(measurements).where(eq(measurements.photoId, photo.id)).all()).toHaveLength(0);

    const res = await saveMeasurementsAction(null, payload(standardId));
    expect(res, JSON.stringify(res)).toMatchObject({ ok: true, message: expect.stringMatching(/Saved 1 measurement; it waits .* Recorded in the profile's check history: “Terracotta tile” ΔE00 \d+\.\d\d to its known value\./) });
    const readings = db().select().from(checkReadings).where(eq(checkReadings.photoId, photo.id)).all();
    expect(readings).toHaveLength(1);
    const reading = readings[0];
    expect(reading).toMatchObject({ standardId, profileId, createdBy: PEOPLE.chemist.id });
    // The profile (fitted on an sRGB card) reads the tile close to its true colour (ΔE*ab < 1, common practice, no source) …
    expect(deltaE76([reading.l, reading.a, reading.b], truth)).toBeLessThan(1);
    // … and the stored ΔE00 is CIEDE2000 between that reading and the registered value, computed here independently.
    expect(reading.deltaE00).toBeCloseTo(ciede2000Reference([reading.l, reading.a, reading.b], known), 6);
    expect(Math.abs(reading.deltaE00 - ciede2000Reference(truth, known))).toBeLessThan(0.5);
    // The lighting page's history reads it, under the standard's name.
    const history = checkHistory(db(), { profileId });
    expect(history.find((h) => h.reading.id === reading.id)).toMatchObject({ standard: "Terracotta tile" });
    expect(db().select().from(auditLog).where(and(eq(auditLog.entityId, reading.id), eq(auditLog.action, "check-reading.create"))).all()).toHaveLength(1);
  });
});

describe("accuracy through the app on a camera that is not sRGB", { timeout: 180_000 }, () => {
  // The card and vials are invented smooth spectra; their true Lab come from the CIE tables in
  // tests/fixtures (CIE 018:2019 colour-matching functions, CIE D65/D50), not from lib/color
  // (tests/support/spectral-card.ts). The camera has cross-talk, a warm light, an exposure error and
  // a phone-like S-curve (lib/color/synthetic-camera.ts): a fit that ignored the tone curve fails here.
  const SIZE = 48;
  const GAP = 10;
  const COLUMNS = 6;
  const INSET = 8;

  async function spectralPhoto(seed: number) {
    const swatches = [...SPECTRAL_CARD.map((p) => sceneXyzD65(p.reflectance, "D65")), ...VIALS.map((v) => sceneXyzD65(v.transmittance, "D65"))];
    const r = renderSwatches(SYNTHETIC_CAMERAS.warmPhone, { swatches, columns: COLUMNS, size: SIZE, gap: GAP }, seed);
    const png = await sharp(Buffer.from(r.data), { raw: { width: r.width, height: r.height, channels: 3 } }).png().toBuffer();
    return { png, boxes: r.boxes };
  }

  for (const white of ["D65", "D50"] as const) {
    it(`fits a ${white} card photo in the workflow, approves it, and measures hold-out vials within 1.5 ΔE00 with ± values`, async () => {
      const { png, boxes } = await spectralPhoto(white === "D65" ? 5 : 6);
      const rows = SPECTRAL_CARD.length / COLUMNS;
      await actAs("admin");
      const csv = ["name,L*,a*,b*,white point", ...SPECTRAL_CARD.map((p) => `${p.name},${spectrumLab(p.reflectance, white).map((v) => v.toFixed(4)).join(",")},${white}`)].join("\n");
      const t = await saveTargetAction(null, form({ name: `Spectral card ${white}`, description: "", source: "CIE 018:2019 tables", whitePoint: white, gridRows: String(rows), gridColumns: String(COLUMNS), csv }));
      expect(t, JSON.stringify(t)).toMatchObject({ ok: true });
      const id = await draft(`Phone ${white}`, { targetId: t!.data!.id as string, method: "auto" });
      const photo = (await storePhoto(db(), objectStore(), { bytes: png, originalName: `phone-${white}.png`, uploaderId: PEOPLE.admin.id, limits })).photo;
      const right = GAP + COLUMNS * (SIZE + GAP) - GAP;
      const bottom = GAP + rows * (SIZE + GAP) - GAP;
      const res = await fitProfileAction(null, form({ payload: JSON.stringify({ profileId: id, photoId: photo.id, corners: [[GAP, GAP], [right, GAP], [right, bottom], [GAP, bottom]] }) }));
      expect(res, JSON.stringify(res)).toMatchObject({ ok: true });
      const row = profileRow(id);
      expect(row.calibration).toMatchObject({ format: "solvatlas-calibration", whitePoint: white });
      expect(row.looMeanDeltaE00!).toBeLessThan(2);
      expect(await approveProfileAction(null, form({ id, toleranceMean: "", toleranceMax: "" }))).toMatchObject({ ok: true });

      await actAs("chemist");
      // The bench photo is another shot of the same scene (other noise), so the vials are hold-out colours.
      const bench = await spectralPhoto(white === "D65" ? 15 : 16);
      const benchPhoto = (await storePhoto(db(), objectStore(), { bytes: bench.png, originalName: `phone-${white}-bench.png`, lightingProfileId: id, uploaderId: PEOPLE.chemist.id, limits })).photo;
      const vialBoxes = boxes.slice(SPECTRAL_CARD.length);
      // The last vial doubles as a sealed check standard, registered with its D50 value (as a spectrophotometer would give it).
      await actAs("admin");
      const checkLab = spectrumLab(VIALS[VIALS.length - 1].transmittance, "D50");
      expect(
        await createCheckStandardAction(null, form({ name: `Check vial ${white}`, kind: "vial", l: String(checkLab[0]), a: String(checkLab[1]), b: String(checkLab[2]), whitePoint: "D50", sourceInstrument: "computed from CIE 018:2019 tables", notes: "" })),
      ).toMatchObject({ ok: true });
      const standardId = db().select().from(checkStandards).where(eq(checkStandards.name, `Check vial ${white}`)).get()!.id;
      await actAs("chemist");
      const [cx, cy, cw, ch] = vialBoxes[vialBoxes.length - 1];
      const save = await saveMeasurementsAction(
        null,
        form({
          payload: JSON.stringify({
            photoId: benchPhoto.id,
            lightingProfileId: id,
            references: [],
            checkStandards: [{ standardId, region: { shape: "rect", x: cx + INSET, y: cy + INSET, w: cw - 2 * INSET, h: ch - 2 * INSET } }],
            vials: vialBoxes.map(([x, y, w, h]) => ({ region: { shape: "rect", x: x + INSET, y: y + INSET, w: w - 2 * INSET, h: h - 2 * INSET }, dyeId: "dye_t1", solventId: "solv-methanol", acidBase: "neutral", ph: null, concentrationUmolL: 20, flagReason: "synthetic test vial" })),
          }),
        }),
      );
      expect(save, JSON.stringify(save)).toMatchObject({ ok: true });
      const saved = (save!.data!.ids as string[]).map((mid) => db().select().from(measurements).where(eq(measurements.id, mid)).get()!);
      const errors = saved.map((m, i) => deltaE00([m.l, m.a, m.b], spectrumLab(VIALS[i].transmittance, "D65") as [number, number, number]));
      for (const [i, e] of errors.entries()) expect(e, `${VIALS[i].name}: ${errors.map((x) => x.toFixed(2)).join(" ")}`).toBeLessThan(1.5);
      const reading = db().select().from(checkReadings).where(eq(checkReadings.standardId, standardId)).get()!;
      expect(reading).toMatchObject({ profileId: id, photoId: benchPhoto.id });
      expect(reading.deltaE00).toBeLessThan(1.5);
      expect(reading.deltaE00).toBeCloseTo(deltaE00([reading.l, reading.a, reading.b], checkLab as [number, number, number]), 6);
      for (const m of saved) {
        expect(m.correctionKind).toBe("calibration");
        expect(m.uDeltaE00).toBeGreaterThan(0);
        expect(m.uL).toBeGreaterThan(0);
      }
      console.info(`accuracy ${white} card, warmPhone camera, method ${row.method}→${(row.calibration as { method: string }).method}: vial ΔE00 mean ${(errors.reduce((a, b) => a + b, 0) / errors.length).toFixed(2)}, max ${Math.max(...errors).toFixed(2)}; LOO mean ${row.looMeanDeltaE00!.toFixed(2)}, max ${row.looMaxDeltaE00!.toFixed(2)}; u(ΔE00) ${saved.map((m) => m.uDeltaE00!.toFixed(2)).join(" ")}`);
    });
  }
});

describe("search ties", { timeout: 180_000 }, () => {
  it("marks a result whose ΔE00 differs from the one above by less than their combined uncertainty", async () => {
    // Two dyes 0.3 ΔE00 apart in distance with ± 0.5 each: a tie (|Δ| < √(0.5² + 0.5²)); a third far away is not.
    db().insert(dyes).values([{ id: "dye_tie_a", code: "TIE-A", name: "Tie A", dyeClass: "azo", synonyms: [] }, { id: "dye_tie_b", code: "TIE-B", name: "Tie B", dyeClass: "azo", synonyms: [] }, { id: "dye_far", code: "FAR-1", name: "Far", dyeClass: "azo", synonyms: [] }]).run();
    const base = { conditionId: "cond_t1", rawR: 0.2, rawG: 0.2, rawB: 0.2, x: 18, y: 18, z: 18, pixelCount: 1000, rejectedCount: 0, spread: 0.4, createdBy: PEOPLE.chemist.id, reviewState: "accepted" as const };
    db().insert(measurements).values([
      { ...base, id: "ms_tie_a", dyeId: "dye_tie_a", l: 50, a: 21, b: 0, uDeltaE00: 0.5 },
      { ...base, id: "ms_tie_b", dyeId: "dye_tie_b", l: 50, a: 21.4, b: 0, uDeltaE00: 0.5 },
      { ...base, id: "ms_far", dyeId: "dye_far", l: 80, a: -30, b: 40, uDeltaE00: 0.5 },
    ]).run();
    const res = await searchRoute(new Request("http://localhost:3000/api/search?lab=50,20,0&limit=20", { headers: { authorization: `Bearer ${tokenFor("formulator")}` } }));
    expect(res.status).toBe(200);
    const body = await res.json();
    const codes = body.results.map((r: { dye: { code: string } }) => r.dye.code);
    const at = (code: string) => body.results[codes.indexOf(code)];
    expect(codes.indexOf("TIE-B")).toBe(codes.indexOf("TIE-A") + 1);
    expect(at("TIE-A").uncertaintyDeltaE00).toBe(0.5);
    expect(at("TIE-B").tieWithPrevious).toBe(true);
    expect(at("FAR-1").tieWithPrevious).toBe(false);
  });
});

void CARD_PATCHES;
