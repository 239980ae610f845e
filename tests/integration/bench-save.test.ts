/**
 * Measuring and saving the vials of a stored rack photo: live measurement through POST
 * /api/photos/[id]/measure and the save action, both on the real colour engine, database and store.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { eq, inArray, sql } from "drizzle-orm";
import { POST as measure } from "@/app/api/photos/[id]/measure/route";
import { saveMeasurementsAction, saveTemplateAction } from "@/app/actions/bench";
import { db } from "@/db/client";
import { storePhoto } from "@/db/queries/photos";
import { listRackTemplates } from "@/db/queries/bench";
import { auditLog, conditions, lightingProfiles, measurements, photos } from "@/db/schema";
import { applyCorrection, correctionFromArray } from "@/lib/color/correction";
import { linearSrgbToLab } from "@/lib/color/convert";
import { objectStore } from "@/lib/storage";
import { deltaE76, labOf8 as labOf8Ref, srgbDecode8, srgbEncode } from "../support/srgb-reference";
import { actAs, buildWorld, form, PEOPLE, tokenFor } from "../support/world";
import { RACK, rackPhoto, type Rgb8 } from "../support/photos";

const decode = srgbDecode8;
const labOf8 = (c: Rgb8) => labOf8Ref(c);
const dE76 = deltaE76;

const VIALS: Rgb8[] = [
  [190, 60, 120],
  [40, 120, 190],
  [220, 190, 60],
  [110, 70, 160],
];
/** Each vial's region: inset from the painted vial, as a chemist would mark it. */
const vialRegion = (i: number) => ({ shape: "rect" as const, x: RACK.vial.x0 + i * RACK.vial.step + 15, y: RACK.vial.y + 20, w: RACK.vial.w - 30, h: RACK.vial.h - 40 });
const whiteRegion = { shape: "ellipse" as const, x: RACK.white.x + 20, y: RACK.white.y + 20, w: RACK.white.w - 40, h: RACK.white.h - 40 };

let photoId: string;
let dimPhotoId: string;
let profilePhotoId: string;
const WHITE_8: Rgb8 = [235, 235, 235];

beforeAll(async () => {
  await buildWorld();
  const limits = { maxBytes: 40 * 1048576, maxPixels: 100e6 };
  photoId = (await storePhoto(db(), objectStore(), { bytes: await rackPhoto(VIALS, { white: WHITE_8, format: "png" }), originalName: "rack.png", uploaderId: PEOPLE.chemist.id, limits })).photo.id;
  // The same rack under a dimmer, warmer light: every channel scaled in linear light.
  const gains = [0.8, 0.7, 0.55];
  const dim = (c: Rgb8) => c.map((v, k) => Math.round(255 * encode(decode(v) * gains[k]))) as Rgb8;
  profilePhotoId = (await storePhoto(db(), objectStore(), { bytes: await rackPhoto(VIALS, { white: WHITE_8, format: "png", backdrop: [20, 20, 20] }), originalName: "profiled.png", uploaderId: PEOPLE.chemist.id, limits })).photo.id;
  dimPhotoId = (await storePhoto(db(), objectStore(), { bytes: await rackPhoto(VIALS.map(dim), { white: dim(WHITE_8), format: "png" }), originalName: "dim.png", uploaderId: PEOPLE.chemist.id, limits })).photo.id;
});

const encode = srgbEncode;

const vial = (i: number, extra: Record<string, unknown> = {}) => ({ region: vialRegion(i), dyeId: "dye_t1", solventId: ["solv-methanol", "solv-acetonitrile", "solv-toluene", "solv-water"][i], acidBase: "neutral", ph: null, concentrationUmolL: 20, flagReason: "", ...extra });
const save = (payload: unknown) => saveMeasurementsAction(null, form({ payload: JSON.stringify(payload) }));
const counts = () => ({
  m: db().select({ n: sql<number>`count(*)` }).from(measurements).get()!.n,
  c: db().select({ n: sql<number>`count(*)` }).from(conditions).get()!.n,
  a: db().select({ n: sql<number>`count(*)` }).from(auditLog).get()!.n,
});

describe("live measurement", () => {
  it("measures every vial and the white reference on the stored photo, close to the sRGB/CIELAB reference values", async () => {
    const res = await measure(
      new Request(`http://localhost:3000/api/photos/${photoId}/measure`, {
        method: "POST",
        headers: { authorization: `Bearer ${tokenFor("chemist")}`, "content-type": "application/json" },
        body: JSON.stringify({ references: [{ region: whiteRegion, lab: labOf8(WHITE_8) }], vials: VIALS.map((_, i) => ({ key: `v${i}`, region: vialRegion(i) })) }),
      }),
      { params: Promise.resolve({ id: photoId }) },
    );
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.correction.kind).toBe("white-scaling");
    for (const g of body.correction.values) expect(g).toBeCloseTo(1, 3);
    body.vials.forEach((v: { key: string; ok: boolean; colour: { lab: number[]; lch: number[]; flags: string[]; pixels: number } }, i: number) => {
      expect(v.key).toBe(`v${i}`);
      expect(v.ok).toBe(true);
      expect(dE76(v.colour.lab, labOf8(VIALS[i])), JSON.stringify(v.colour.lab)).toBeLessThan(0.2);
      expect(v.colour.flags).toEqual([]);
      expect(v.colour.pixels).toBe((RACK.vial.w - 30) * (RACK.vial.h - 40));
    });
  });

  it("answers per vial when a region is off the photo, and refuses formulators", async () => {
    const call = (who: "chemist" | "formulator") =>
      measure(
        new Request(`http://localhost:3000/api/photos/${photoId}/measure`, {
          method: "POST",
          headers: { authorization: `Bearer ${tokenFor(who)}`, "content-type": "application/json" },
          body: JSON.stringify({ vials: [{ key: "a", region: vialRegion(0) }, { key: "b", region: { shape: "rect", x: 900, y: 10, w: 200, h: 50 } }] }),
        }),
        { params: Promise.resolve({ id: photoId }) },
      );
    const body = await (await call("chemist")).json();
    expect(body.vials[0]).toMatchObject({ ok: true, colour: { flags: ["uncorrected"] } });
    expect(body.vials[1]).toMatchObject({ ok: false, error: expect.stringMatching(/outside the 960×400 image/) });
    expect((await call("formulator")).status).toBe(403);
  });
});

describe("saving measurements", () => {
  it("saves four vials with raw linear RGB, corrected XYZ/Lab, the correction and references, in one transaction with audit entries", async () => {
    await actAs("chemist");
    const before = counts();
    const state = await save({ photoId: dimPhotoId, lightingProfileId: null, references: [{ region: whiteRegion, lab: labOf8(WHITE_8), label: "white tile" }], vials: VIALS.map((_, i) => vial(i)) });
    expect(state, JSON.stringify(state)).toMatchObject({ ok: true });
    const ids = state!.data!.ids as string[];
    expect(ids).toHaveLength(4);
    const rows = db().select().from(measurements).where(inArray(measurements.id, ids)).all();
    const byRegion = (i: number) => rows.find((r) => r.region!.x === vialRegion(i).x)!;
    for (let i = 0; i < 4; i++) {
      const r = byRegion(i);
      // The white reference undoes the dim, warm light: colours come back to those of the bright photo.
      expect(dE76([r.l, r.a, r.b], labOf8(VIALS[i])), `vial ${i}: ${[r.l, r.a, r.b]}`).toBeLessThan(1.5);
      expect(r).toMatchObject({ reviewState: "pending", createdBy: PEOPLE.chemist.id, illuminant: "D65", observer: "CIE 1931 2°", photoId: dimPhotoId, correctionKind: "white-scaling", flags: [] });
      // Raw values are the dim photo's, before correction.
      expect(r.rawB).toBeLessThan(decode(VIALS[i][2]) * 0.6);
      // The stored correction re-derives the stored colour from the raw values.
      const again = linearSrgbToLab(applyCorrection(correctionFromArray(r.correctionKind!, r.correction!), [r.rawR, r.rawG, r.rawB]), "D65");
      expect(dE76(again, [r.l, r.a, r.b])).toBeLessThan(1e-9);
      expect(r.referencePatches).toEqual([expect.objectContaining({ label: "white tile", lab: labOf8(WHITE_8) })]);
      expect(r.y).toBeGreaterThan(0);
    }
    const after = counts();
    expect(after.m - before.m).toBe(4);
    const audits = db().select().from(auditLog).where(inArray(auditLog.entityId, ids)).all();
    expect(audits.map((a) => a.action)).toEqual(["measurement.create", "measurement.create", "measurement.create", "measurement.create"]);
  });

  it("refuses a flagged vial without a reason, saving nothing; saves it with one", async () => {
    await actAs("chemist");
    const before = counts();
    // No profile and no reference: every colour is flagged "uncorrected".
    const refused = await save({ photoId, lightingProfileId: null, references: [], vials: [vial(0), vial(1)] });
    expect(refused).toMatchObject({ ok: false, code: "invalid_input", message: expect.stringMatching(/Vial 1 is flagged \(uncorrected\)/), fieldErrors: { "vials.0.flagReason": expect.any(Array) } });
    expect(counts()).toEqual(before);
    const saved = await save({ photoId, lightingProfileId: null, references: [], vials: [vial(0, { flagReason: "Reference tile missing from this shot; camera is the calibrated one." })] });
    expect(saved).toMatchObject({ ok: true });
    const row = db().select().from(measurements).where(eq(measurements.id, (saved!.data!.ids as string[])[0])).get()!;
    expect(row).toMatchObject({ flags: ["uncorrected"], flagReason: expect.stringMatching(/Reference tile missing/), correctionKind: "none" });
  });

  it("saves nothing when one vial of several is bad (unknown dye, region off the photo)", async () => {
    await actAs("chemist");
    const before = counts();
    const refs = [{ region: whiteRegion, lab: labOf8(WHITE_8) }];
    const unknownDye = await save({ photoId, references: refs, vials: [vial(0), vial(1), vial(2, { dyeId: "dye_nope" })] });
    expect(unknownDye).toMatchObject({ ok: false, code: "invalid_input", message: expect.stringMatching(/Vial 3: that dye/) });
    const offPhoto = await save({ photoId, references: refs, vials: [vial(0), { ...vial(1), region: { shape: "rect", x: 950, y: 0, w: 50, h: 50 } }] });
    expect(offPhoto).toMatchObject({ ok: false, code: "invalid_input", message: expect.stringMatching(/Vial 2 cannot be measured/) });
    expect(counts()).toEqual(before);
  });

  it("with a lighting profile: stores the profile matrix folded with the reference scaling, sets the photo's profile, audits it", async () => {
    db().insert(lightingProfiles).values({ id: "lp_t", name: "Test box", illuminant: "D65", lightSource: "LED", camera: "cam", correctionKind: "matrix-3x3", correction: [1.1, 0, 0, 0, 1, 0, 0, 0, 0.9], validFrom: new Date("2020-01-01"), state: "approved" }).run();
    await actAs("admin");
    const refs = [{ region: whiteRegion, lab: labOf8(WHITE_8) }];
    // This photo's light is not the profile's: the white seen through the profile is off by more than
    // the drift limit, so every vial is flagged and needs a reason.
    const drift = await save({ photoId: profilePhotoId, lightingProfileId: "lp_t", references: refs, vials: [vial(0, { acidBase: "acid", ph: 2.5 })] });
    expect(drift).toMatchObject({ ok: false, message: expect.stringMatching(/reference-drift/) });
    const state = await save({ photoId: profilePhotoId, lightingProfileId: "lp_t", references: refs, vials: [vial(0, { acidBase: "acid", ph: 2.5, flagReason: "Lamp replaced yesterday; the white tile corrects it." })] });
    expect(state, JSON.stringify(state)).toMatchObject({ ok: true });
    const row = db().select().from(measurements).where(eq(measurements.id, (state!.data!.ids as string[])[0])).get()!;
    expect(row.correctionKind).toBe("matrix-3x3");
    expect(row.flags).toEqual(["reference-drift"]);
    // diag(g)·diag(1.1, 1, 0.9) with g undoing the profile on this white: back to about the identity.
    [1, 0, 0, 0, 1, 0, 0, 0, 1].forEach((v, k) => expect(row.correction![k]).toBeCloseTo(v, 2));
    expect(dE76([row.l, row.a, row.b], labOf8(VIALS[0]))).toBeLessThan(0.2);
    expect(db().select().from(photos).where(eq(photos.id, profilePhotoId)).get()!.lightingProfileId).toBe("lp_t");
    const cond = db().select().from(conditions).where(eq(conditions.id, row.conditionId)).get()!;
    expect(cond).toMatchObject({ acidBase: "acid", ph: 2.5, concentrationUmolL: 20, solventId: "solv-methanol" });
    expect(db().select().from(auditLog).where(eq(auditLog.entityId, profilePhotoId)).all().map((a) => a.action)).toContain("photo.set-profile");
  });

  it("never mixes two lighting profiles among one photo's standing measurements", async () => {
    await actAs("chemist");
    const before = counts();
    // photoId already has a pending measurement made without a profile (above).
    const mixed = await save({ photoId, lightingProfileId: "lp_t", references: [{ region: whiteRegion, lab: labOf8(WHITE_8) }], vials: [vial(1, { flagReason: "drift is known" })] });
    expect(mixed).toMatchObject({ ok: false, code: "conflict", message: expect.stringMatching(/no lighting profile; use the same here/) });
    expect(counts()).toEqual(before);
  });

  it("refuses formulators", async () => {
    await actAs("formulator");
    expect(await save({ photoId, vials: [vial(0)] })).toMatchObject({ ok: false, code: "forbidden" });
  });
});

describe("rack layout templates", () => {
  it("saves a layout by name, replaces it when saved again, and refuses an empty one", async () => {
    await actAs("chemist");
    const regions = [{ shape: "rect", x: 0.1, y: 0.2, w: 0.1, h: 0.5, role: "vial", label: "Vial 1" }, { shape: "ellipse", x: 0.8, y: 0.3, w: 0.1, h: 0.3, role: "reference", label: "White" }];
    expect(await saveTemplateAction(null, form({ payload: JSON.stringify({ name: "Rack of 4", regions }) }))).toMatchObject({ ok: true });
    expect(await saveTemplateAction(null, form({ payload: JSON.stringify({ name: "Rack of 4", regions: regions.slice(0, 1) }) }))).toMatchObject({ ok: true });
    const saved = listRackTemplates(db()).filter((t) => t.name === "Rack of 4");
    expect(saved).toHaveLength(1);
    expect(saved[0].regions).toHaveLength(1);
    expect(await saveTemplateAction(null, form({ payload: JSON.stringify({ name: "Empty", regions: [] }) }))).toMatchObject({ ok: false, code: "invalid_input" });
  });
});
