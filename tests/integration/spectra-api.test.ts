/**
 * Spectra through the outside interface: POST/GET /api/spectra for every caller, the dye page's upload
 * action, refusals that store nothing, and the solvent model recomputed when a spectrum arrives.
 * Real database, real tokens and sessions. Spectra are log-normal bands (Siano & Metzler 1969 shape,
 * tests/support/indicator-series.ts) placed by an invented law; colours are their CIE 015 colours.
 */
import { eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { GET as getSpectra, POST as postSpectrum } from "@/app/api/spectra/route";
import { uploadSpectrumAction } from "@/app/actions/spectra";
import { db } from "@/db/client";
import { ensureDyeModel } from "@/db/queries/models";
import { auditLog, conditions, dyeModels, dyes, measurements, solvents, spectra, type Solvent } from "@/db/schema";
import type { Lab } from "@/lib/color/types";
import { actAs, buildWorld, form, PEOPLE, tokenFor, type Who } from "../support/world";
import { formSpectrum, mixtureLab } from "../support/indicator-series";

type Caller = Who | "anonymous";
const auth = (who: Caller): Record<string, string> => (who === "anonymous" ? {} : { authorization: `Bearer ${tokenFor(who)}` });
const post = (who: Caller, body: unknown) =>
  postSpectrum(new Request("http://localhost:3000/api/spectra", { method: "POST", headers: { "content-type": "application/json", ...auth(who) }, body: JSON.stringify(body) }));
const count = (table: typeof spectra | typeof conditions) => db().select({ n: sql<number>`count(*)` }).from(table).get()!.n;
const auditCount = (action: string) => db().select({ n: sql<number>`count(*)` }).from(auditLog).where(eq(auditLog.action, action)).get()!.n;

/** A log-normal band with its maximum at `nm`, sampled 350–800 nm every `step` nm, as CSV. */
function bandCsv(nm: number, step = 1, header = "wavelength_nm,absorbance"): string {
  const s = formSpectrum([{ nuMax: 1e7 / nm, fwhm: 3800, rho: 1.3, peak: 0.8 }]);
  const rows = s.wavelengths.flatMap((w, i) => (w >= 350 && w <= 800 && (w - 350) % step === 0 ? [`${w},${s.values[i].toFixed(5)}`] : []));
  return [header, ...rows].join("\n") + "\n";
}
const GOOD = { dye: "T-001", condition: { solvent: "Acetonitrile" }, concentrationUmolL: 20, pathLengthMm: 10, instrument: "Test UV-Vis, 10 mm quartz" };

beforeAll(async () => {
  await buildWorld();
}, 60_000);

describe("POST /api/spectra: the role matrix", () => {
  it.each([
    ["anonymous", 401],
    ["retired", 401],
    ["formulator", 403],
    ["chemist", 201],
    ["admin", 201],
  ] as const)("%s → %i", async (who, status) => {
    const before = count(spectra);
    const res = await post(who, { ...GOOD, csv: bandCsv(540) });
    expect(res.status).toBe(status);
    const body = await res.json();
    if (status === 201) {
      expect(count(spectra)).toBe(before + 1);
      expect(body.spectrum.lambdaMaxNm).toBeCloseTo(540, 0);
      expect(body.report).toMatchObject({ unit: "nm", rangeNm: [350, 800], uniform: true });
    } else {
      expect(body.error.code).toBe(status === 401 ? "unauthenticated" : "forbidden");
      expect(count(spectra)).toBe(before);
    }
  });

  it("lets every role read a dye's spectra", async () => {
    const res = await getSpectra(new Request("http://localhost:3000/api/spectra?dyeId=dye_t1", { headers: auth("formulator") }));
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.spectra.length).toBeGreaterThanOrEqual(2);
    expect(body.spectra[0]).toMatchObject({ condition: { solvent: "Acetonitrile", acidBase: "neutral" }, concentrationUmolL: 20, pathLengthMm: 10, instrument: GOOD.instrument });
    expect((await getSpectra(new Request("http://localhost:3000/api/spectra?dyeId=nope", { headers: auth("formulator") }))).status).toBe(404);
  });
});

describe("POST /api/spectra: good and bad spectra", () => {
  it("stores a good one with its λmax, its condition and an audit entry; points in µm converted", async () => {
    const before = auditCount("spectrum.create");
    const points = formSpectrum([{ nuMax: 1e7 / 610, fwhm: 3800, rho: 1.3, peak: 0.8 }]);
    const um = points.wavelengths.flatMap((w, i) => (w >= 380 && w <= 780 && w % 2 === 0 ? [[w / 1000, points.values[i]] as [number, number]] : []));
    const res = await post("chemist", { ...GOOD, condition: { solvent: "toluene", temperatureC: 23 }, points: um, wavelengthUnit: "um" });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body.spectrum.lambdaMaxNm).toBeCloseTo(610, 0);
    expect(body.spectrum.sentIn).toBe("µm");
    expect(body.spectrum.points[0][0]).toBeCloseTo(380, 9);
    expect(body.spectrum.condition.solvent).toBe("Toluene");
    expect(auditCount("spectrum.create")).toBe(before + 1);
    const row = db().select().from(spectra).where(eq(spectra.id, body.spectrum.id)).get()!;
    expect(row.createdBy).toBe(PEOPLE.chemist.id);
    expect(db().select().from(conditions).where(eq(conditions.id, row.conditionId)).get()).toMatchObject({ temperatureC: 23, concentrationUmolL: 20, pathLengthMm: 10 });
  });

  it("stores a spectrum with only a UV tail with λmax null (no band in the visible)", async () => {
    const res = await post("chemist", { ...GOOD, csv: bandCsv(330) });
    expect(res.status).toBe(201);
    expect((await res.json()).spectrum.lambdaMaxNm).toBeNull();
  });

  it.each([
    ["a word in the absorbance column", bandCsv(540).replace("\n420,", "\n420,x"), /Line 72, column absorbance: “x.*” is not a number/],
    ["a gap of 20 nm in the visible", bandCsv(540, 20), /gap between .* nm .* is 20 nm/],
    ["a range that stops at 650 nm", bandCsv(540).split("\n").filter((l) => !/^(6[5-9]\d|7\d\d|800),/.test(l) || l.startsWith("650,")).join("\n"), /misses 650–700 nm/],
    ["wavelengths in cm⁻¹ under an nm header", ["wavelength_nm,absorbance", ...Array.from({ length: 120 }, (_, i) => `${13000 + 100 * i},0.2`)].join("\n"), /header says nm.*cm⁻¹/],
  ])("refuses %s with 422 naming line and column, storing nothing (not even a condition)", async (_what, csv, message) => {
    const before = [count(spectra), count(conditions), auditCount("spectrum.create"), auditCount("condition.create")];
    const res = await post("chemist", { ...GOOD, condition: { solvent: "Chloroform" }, csv });
    expect(res.status).toBe(422);
    const body = await res.json();
    expect(body.error.code).toBe("invalid_input");
    expect(body.error.message).toMatch(message);
    expect(body.error.message).toMatch(/nothing was stored/i);
    expect([count(spectra), count(conditions), auditCount("spectrum.create"), auditCount("condition.create")]).toEqual(before);
  });

  it("refuses an unknown solvent or dye, both points and csv, or a missing path length", async () => {
    const before = count(spectra);
    const unknown = await post("chemist", { ...GOOD, condition: { solvent: "unobtainium" }, csv: bandCsv(540) });
    expect(unknown.status).toBe(422);
    expect((await unknown.json()).error.message).toMatch(/^solvent: “unobtainium” is not in the solvent table/);
    const noDye = await post("chemist", { ...GOOD, dye: "NOPE-1", csv: bandCsv(540) });
    expect((await noDye.json()).error.message).toMatch(/No dye has the code or id “NOPE-1”/);
    const both = await post("chemist", { ...GOOD, csv: bandCsv(540), points: [[500, 0.1]] });
    expect(both.status).toBe(422);
    expect((await both.json()).error.message).toMatch(/either as points .* or as csv/);
    const { pathLengthMm: _omit, ...noPath } = GOOD;
    const noPathRes = await post("chemist", { ...noPath, csv: bandCsv(540) });
    expect((await noPathRes.json()).error.message).toMatch(/path length in mm/);
    expect(count(spectra)).toBe(before);
  });
});

describe("the dye page's upload (server action)", () => {
  const fields = (mode: string, csv = bandCsv(575)) =>
    form({ dye: "T-001", solvent: "solv-methanol", acidBase: "neutral", concentrationUmolL: "15", pathLengthMm: "10", instrument: "Bench UV-Vis", csv, fileName: "methanol.csv", mode });

  it("previews without storing, then saves; a formulator is refused", async () => {
    await actAs("chemist");
    const before = count(spectra);
    const preview = await uploadSpectrumAction(null, fields("preview"));
    expect(preview?.ok).toBe(true);
    const p = (preview!.data as { preview: { colour: { lambdaMaxNm: number; lab: Lab }; report: { points: number } } }).preview;
    expect(p.colour.lambdaMaxNm).toBeCloseTo(575, 0);
    expect(p.report.points).toBe(451);
    expect(count(spectra)).toBe(before);
    const saved = await uploadSpectrumAction(null, fields("save"));
    expect(saved?.ok).toBe(true);
    expect(saved?.message).toMatch(/λmax 575/);
    expect(count(spectra)).toBe(before + 1);
    expect(db().select().from(spectra).where(eq(spectra.originalName, "methanol.csv")).get()?.concentrationUmolL).toBe(15);
    await actAs("formulator");
    const refused = await uploadSpectrumAction(null, fields("save"));
    expect(refused?.ok).toBe(false);
    expect(refused?.code).toBe("forbidden");
    expect(count(spectra)).toBe(before + 1);
  });

  it("lists a bad file's problems by line and column and stores nothing", async () => {
    await actAs("chemist");
    const before = count(spectra);
    const bad = bandCsv(575).replace("\n500,", "\n499,").replace("\n600,", "\n600,n/a");
    const res = await uploadSpectrumAction(null, fields("save", bad));
    expect(res?.ok).toBe(false);
    const problems = (res!.data as { problems: { line: number; column: string }[] }).problems;
    expect(problems.map((p) => [p.line, p.column])).toEqual([
      [152, "wavelength_nm"],
      [252, "absorbance"],
    ]);
    expect(count(spectra)).toBe(before);
  });
});

describe("the solvent model follows the spectra", () => {
  const SOLVENTS = ["Methanol", "Ethanol", "Acetone", "Acetonitrile", "Dimethyl sulfoxide", "Toluene", "Dichloromethane", "n-Hexane", "Ethyl acetate", "Tetrahydrofuran"];
  /** Invented dye: band maximum ν̃ = 17,500 − 1,000 π* + 2,000 α cm⁻¹. */
  const nuOf = (s: Solvent) => 17500 - 1000 * s.ktPiStar! + 2000 * s.ktAlpha!;

  it("recomputes when a spectrum arrives and fits on spectra once six solvents have them", async () => {
    const table = db().select().from(solvents).all();
    const byName = (n: string) => table.find((s) => s.name === n)!;
    db().insert(dyes).values({ id: "dye_sp", code: "SP-001", name: "Spectra Model Dye", dyeClass: "merocyanine" }).run();
    SOLVENTS.forEach((n, i) => {
      const s = byName(n);
      const band = formSpectrum([{ nuMax: nuOf(s), fwhm: 3800, rho: 1.3, peak: 0.9 }]);
      const lab = mixtureLab(band, band, 0);
      const conditionId = `cond_sp_${i}`;
      db().insert(conditions).values({ id: conditionId, solventId: s.id, acidBase: "neutral" }).run();
      db()
        .insert(measurements)
        .values({ id: `ms_sp_${i}`, dyeId: "dye_sp", conditionId, rawR: 0.2, rawG: 0.1, rawB: 0.3, x: 10, y: 8, z: 20, l: lab[0], a: lab[1], b: lab[2], pixelCount: 1000, rejectedCount: 0, spread: 0.4, createdBy: PEOPLE.chemist.id, reviewState: "accepted" })
        .run();
    });
    const first = ensureDyeModel(db(), { dyeId: "dye_sp" });
    expect(first.scales.find((s) => s.model === "kamlet-taft")!.source).toBe("colour");
    const key = () => db().select().from(dyeModels).where(eq(dyeModels.dyeId, "dye_sp")).get()!.cacheKey;
    const k1 = key();
    // Reading again without a change recomputes nothing.
    const recomputes = auditCount("dye_model.recompute");
    ensureDyeModel(db(), { dyeId: "dye_sp" });
    expect(auditCount("dye_model.recompute")).toBe(recomputes);

    for (const [i, n] of SOLVENTS.slice(0, 6).entries()) {
      const res = await post("chemist", { ...GOOD, dye: "SP-001", condition: { solvent: n }, csv: bandCsv(1e7 / nuOf(byName(n))) });
      expect(res.status).toBe(201);
      const model = ensureDyeModel(db(), { dyeId: "dye_sp" });
      expect(auditCount("dye_model.recompute")).toBe(recomputes + i + 1);
      expect(model.spectra.length).toBe(i + 1);
      expect(model.scales.find((s) => s.model === "kamlet-taft")!.source).toBe(i + 1 >= 6 ? "spectrum" : "colour");
    }
    expect(key()).not.toBe(k1);
    const kt = ensureDyeModel(db(), { dyeId: "dye_sp" }).scales.find((s) => s.model === "kamlet-taft")!;
    // Noise-free band maxima on the law: α and π* come back to within 60 cm⁻¹ (λmax sampled at 1 nm).
    expect(Math.abs(kt.fit!.coefficients.alpha.value - 2000)).toBeLessThan(60);
    expect(Math.abs(kt.fit!.coefficients.pi_star.value + 1000)).toBeLessThan(60);
    // A spectrum in an acid condition is not a neutral band position: it leaves the model alone.
    const beforeAcid = key();
    expect((await post("chemist", { ...GOOD, dye: "SP-001", condition: { solvent: "Methanol", acidBase: "acid", additive: "HCl" }, csv: bandCsv(450) })).status).toBe(201);
    ensureDyeModel(db(), { dyeId: "dye_sp" });
    expect(key()).toBe(beforeAcid);
  });
});
