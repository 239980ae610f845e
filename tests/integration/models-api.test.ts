/**
 * Solvent models through the outside interface: GET /api/dyes/{id}/model and GET /api/search with
 * predicted=include, on a small lab whose dye colours are generated from one absorption band that
 * moves with the Kamlet–Taft parameters of the real solvent table (plus noise), then checked against the
 * colours of solvents held back from the lab.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { GET as modelRoute } from "@/app/api/dyes/[id]/model/route";
import { GET as search } from "@/app/api/search/route";
import { db } from "@/db/client";
import { ensureDyeModel, listPredictions } from "@/db/queries/models";
import { acceptedMeasurements } from "@/db/queries/bench";
import { conditions, dyeModels, dyes, measurements, solvents, type Solvent } from "@/db/schema";
import { bandLab } from "@/lib/color/band";
import { deltaE00 } from "@/lib/color/difference";
import type { Lab } from "@/lib/color/types";
import { ciede2000 } from "@/lib/search/ciede2000";
import { gaussian, mulberry32 } from "@/lib/random";
import { buildWorld, PEOPLE, tokenFor } from "../support/world";

let token = "";
let table: Solvent[] = [];
const MEASURED = ["Methanol", "Ethanol", "Acetone", "Acetonitrile", "Dimethyl sulfoxide", "Toluene", "Dichloromethane", "Water", "n-Hexane", "Ethyl acetate", "Tetrahydrofuran", "2-Propanol"];
const HELD_BACK = ["N,N-Dimethylformamide", "Chloroform", "Ethylene glycol"];
/** Invented dye: ν̃ = 17,000 − 1,200 π* + 2,600 α + 300 β cm⁻¹, one Gaussian band 4,200 cm⁻¹ wide, peak 1.1. */
const truthNu = (s: Solvent) => 17000 - 1200 * s.ktPiStar! + 2600 * s.ktAlpha! + 300 * s.ktBeta!;
const truthLab = (s: Solvent): Lab => bandLab({ wavenumberCm1: truthNu(s), fwhmCm1: 4200, peakAbsorbance: 1.1 });

function addColour(id: string, dyeId: string, solvent: Solvent, lab: Lab) {
  const conditionId = `cond_m_${solvent.id}`;
  if (!db().select().from(conditions).where(eq(conditions.id, conditionId)).get()) db().insert(conditions).values({ id: conditionId, solventId: solvent.id, acidBase: "neutral" }).run();
  db()
    .insert(measurements)
    .values({ id, dyeId, conditionId, rawR: 0.2, rawG: 0.1, rawB: 0.3, x: 10, y: 8, z: 20, l: lab[0], a: lab[1], b: lab[2], pixelCount: 1000, rejectedCount: 0, spread: 0.4, createdBy: PEOPLE.chemist.id, reviewState: "accepted" })
    .run();
}

beforeAll(async () => {
  await buildWorld();
  token = tokenFor("formulator");
  table = db().select().from(solvents).all();
  const byName = (n: string) => table.find((s) => s.name === n)!;
  db().insert(dyes).values({ id: "dye_m1", code: "M-001", name: "Model Test Dye", dyeClass: "merocyanine" }).run();
  db().insert(dyes).values({ id: "dye_m2", code: "M-002", name: "Three Solvent Dye", dyeClass: "azo" }).run();
  const random = mulberry32(99);
  MEASURED.forEach((n, i) => {
    const lab = truthLab(byName(n));
    addColour(`ms_m1_${i}`, "dye_m1", byName(n), [lab[0] + 0.4 * gaussian(random), lab[1] + 0.4 * gaussian(random), lab[2] + 0.4 * gaussian(random)]);
  });
  ["Methanol", "Toluene", "Acetone"].forEach((n, i) => addColour(`ms_m2_${i}`, "dye_m2", byName(n), truthLab(byName(n))));
}, 300_000);

async function getModel(id: string, auth = true) {
  const res = await modelRoute(new Request(`http://localhost:3000/api/dyes/${id}/model`, { headers: auth ? { authorization: `Bearer ${token}` } : {} }), { params: Promise.resolve({ id }) });
  return { status: res.status, body: await res.json() };
}
async function callSearch(query: string) {
  const res = await search(new Request(`http://localhost:3000/api/search?${query}`, { headers: { authorization: `Bearer ${token}` } }));
  return { status: res.status, body: await res.json() };
}

type Prediction = { solvent: { id: string; name: string }; lab: Lab; uncertaintyDeltaE00: number; extrapolated: boolean };

describe("GET /api/dyes/{id}/model", () => {
  it("answers 401 without credentials and 404 for an unknown dye", async () => {
    expect((await getModel("dye_m1", false)).status).toBe(401);
    expect((await getModel("dye_nope")).status).toBe(404);
  }, 120_000);

  it("fits the band route side by side with the direct CIELAB baseline and predicts every unmeasured solvent with ± ΔE00", async () => {
    const { status, body } = await getModel("dye_m1");
    expect(status).toBe(200);
    expect(body.dye.code).toBe("M-001");
    const fits = body.model.fits as { model: string; property: string; n: number; coefficients: Record<string, { value: number; stdErr: number }>; r2: number; looRmse: number; route: string }[];
    for (const f of fits) for (const key of ["model", "property", "n", "coefficients", "r2", "looRmse"]) expect(f).toHaveProperty(key);
    const kt = fits.find((f) => f.route === "band" && f.model === "kamlet-taft")!;
    expect(kt.property).toBe("wavenumber");
    // The generating α coefficient is 2,600 cm⁻¹; the apparent band of a Gaussian band is that band, so a ≈ 2,600.
    expect(Math.abs(kt.coefficients.alpha.value - 2600)).toBeLessThan(4 * kt.coefficients.alpha.stdErr + 150);
    expect(body.model.chosen.route).toBe("band");
    const band = body.model.routes.find((r: { route: string; model: string }) => r.route === "band" && r.model === "kamlet-taft");
    const direct = body.model.routes.find((r: { route: string }) => r.route === "cielab");
    expect(band.looDeltaE00).toBeLessThan(direct.looDeltaE00);
    expect(body.model.sentence).toMatch(/hydrogen-bond donation \(α\)/);

    const predictions = body.predictions as Prediction[];
    const measuredIds = new Set(MEASURED.map((n) => table.find((s) => s.name === n)!.id));
    const expectedSolvents = table.filter((s) => !measuredIds.has(s.id) && s.ktAlpha !== null && s.ktBeta !== null && s.ktPiStar !== null);
    expect(predictions.map((p) => p.solvent.id).sort()).toEqual(expectedSolvents.map((s) => s.id).sort());
    for (const p of predictions) {
      expect(p.uncertaintyDeltaE00).toBeGreaterThan(0);
      expect(typeof p.extrapolated).toBe("boolean");
    }
    // Held-back solvents: the predicted colour lies within 3 u (+ 1 ΔE00 for the noise) of the generating colour.
    for (const name of HELD_BACK) {
      const s = table.find((t) => t.name === name)!;
      const p = predictions.find((q) => q.solvent.id === s.id)!;
      expect(deltaE00(p.lab, truthLab(s))).toBeLessThan(3 * p.uncertaintyDeltaE00 + 1);
    }
  }, 300_000);

  it("says why when there is no model (three solvents for four Kamlet–Taft terms)", async () => {
    const { status, body } = await getModel("dye_m2");
    expect(status).toBe(200);
    expect(body.model).toBeNull();
    expect(body.reason).toMatch(/at least/);
    expect(body.predictions).toEqual([]);
  }, 300_000);
});

describe("GET /api/search with predicted=include", () => {
  it("never returns predictions unless asked, and then ranks exactly over measured and predicted colours", async () => {
    const ethanolFree = listPredictions(db(), { dyeId: "dye_m1" });
    expect(ethanolFree.length).toBeGreaterThan(0);
    const target = ethanolFree.find((p) => p.solvent === "Chloroform")!.lab;
    const measuredOnly = await callSearch(`lab=${target.join(",")}&limit=50`);
    expect(measuredOnly.status).toBe(200);
    expect(measuredOnly.body.results.every((r: { predicted: boolean }) => r.predicted === false)).toBe(true);

    const withPredictions = await callSearch(`lab=${target.join(",")}&limit=50&predicted=include`);
    expect(withPredictions.status).toBe(200);
    const first = withPredictions.body.results[0];
    expect(first.dye.id).toBe("dye_m1");
    expect(first.predicted).toBe(true);
    expect(first.uncertaintyDeltaE00).toBeGreaterThan(0);
    expect(first.deltaE00).toBeCloseTo(0, 6);

    // Brute force over the union: every accepted measurement and every stored prediction, best per dye.
    const best = new Map<string, number>();
    const consider = (dyeId: string, lab: Lab) => {
      const d = ciede2000(target[0], target[1], target[2], lab[0], lab[1], lab[2]);
      if (!best.has(dyeId) || d < best.get(dyeId)!) best.set(dyeId, d);
    };
    for (const r of acceptedMeasurements(db())) consider(r.dye.id, [r.m.l, r.m.a, r.m.b]);
    for (const p of listPredictions(db())) consider(p.dye.id, p.lab);
    const expected = [...best.entries()].sort((a, b) => a[1] - b[1]);
    expect(withPredictions.body.results.map((r: { dye: { id: string } }) => r.dye.id)).toEqual(expected.map((e) => e[0]));
    withPredictions.body.results.forEach((r: { deltaE00: number; predicted: boolean; uncertaintyDeltaE00?: number }, i: number) => {
      expect(r.deltaE00).toBeCloseTo(expected[i][1], 9);
      if (r.predicted) expect(r.uncertaintyDeltaE00).toBeGreaterThan(0);
    });
    // An acid/base filter excludes predictions (they are of the neutral form).
    const acid = await callSearch(`lab=${target.join(",")}&acidBase=acid&predicted=include`);
    expect(acid.body.results.every((r: { predicted: boolean }) => !r.predicted)).toBe(true);
    expect((await callSearch(`lab=${target.join(",")}&predicted=maybe`)).status).toBe(422);
  }, 300_000);

  it("recomputes the model when the dye's accepted colours change: a newly measured solvent is no longer predicted", async () => {
    const before = db().select().from(dyeModels).where(eq(dyeModels.dyeId, "dye_m1")).get()!;
    const chloroform = table.find((s) => s.name === "Chloroform")!;
    addColour("ms_m1_new", "dye_m1", chloroform, truthLab(chloroform));
    ensureDyeModel(db(), { dyeId: "dye_m1" });
    const after = db().select().from(dyeModels).where(eq(dyeModels.dyeId, "dye_m1")).get()!;
    expect(after.cacheKey).not.toBe(before.cacheKey);
    expect(listPredictions(db(), { dyeId: "dye_m1" }).some((p) => p.solventId === chloroform.id)).toBe(false);
    expect(acceptedMeasurements(db()).some((r) => r.m.id === "ms_m1_new")).toBe(true);
  }, 300_000);
});
