/**
 * Two-step indicators in the app: the chemist chooses two steps for a series (chemists and admins,
 * formulators refused), the fit is stored with that choice and keeps it when a vial changes, and the pH
 * search sees each step's transition.
 *
 * Truth values: thymol blue in tests/fixtures/ph_indicators_alberta_chem30.csv (Alberta Education,
 * Chemistry 30 Data Booklet, 2010, p. 10): Ka1 2.2e-2, Ka2 6.3e-10. Vial colours: tests/support/indicator-series.ts
 * (three log-normal forms mixed per wavelength, CIE 015 summation, noise), a different process from the
 * fit's band model; band positions from memory (red ≈ 545 nm, yellow ≈ 430 nm, blue ≈ 596 nm).
 */
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { savePhSeriesAction, setPhFitStepsAction } from "@/app/actions/ph-series";
import { db } from "@/db/client";
import { decideMeasurement } from "@/db/queries/review";
import { ensurePhSeriesFit, transitionCandidates } from "@/db/queries/ph-series";
import { auditLog, conditions, dyes, measurements } from "@/db/schema";
import { readFixtureCsv } from "../support/fixtures";
import { indicatorForm, twoStepIndicatorSeries } from "../support/indicator-series";
import { actAs, buildWorld, form, PEOPLE } from "../support/world";

const [PKA1, PKA2] = readFixtureCsv("ph_indicators_alberta_chem30.csv")
  .filter((r) => r.indicator === "thymol blue")
  .map((r) => -Math.log10(Number(r.Ka)))
  .sort((p, q) => p - q);
const pHs = Array.from({ length: 24 }, (_, i) => 0.5 * i);
const ids: string[] = [];
let seriesId = "";

beforeAll(async () => {
  await buildWorld();
  db().insert(dyes).values({ id: "dye_tb", code: "PH-TB", name: "Thymol blue (test)", dyeClass: "sulfonephthalein" }).run();
  twoStepIndicatorSeries([indicatorForm(545, 1.0), indicatorForm(430, 1.0), indicatorForm(596, 1.0)], PKA1, PKA2, pHs, 0.3, 31).forEach((p, i) => {
    db().insert(conditions).values({ id: `cond_tb_${i}`, solventId: "solv-water", acidBase: p.pH < 6 ? "acid" : p.pH > 8 ? "base" : "neutral", ph: p.pH, additive: "universal buffer" }).run();
    db()
      .insert(measurements)
      .values({ id: `ms_tb_${i}`, dyeId: "dye_tb", conditionId: `cond_tb_${i}`, rawR: 0.2, rawG: 0.2, rawB: 0.2, x: 10, y: 10, z: 10, l: p.lab[0], a: p.lab[1], b: p.lab[2], pixelCount: 1000, rejectedCount: 0, spread: 0.3, createdBy: PEOPLE.chemist2.id, reviewState: "accepted" })
      .run();
    ids.push(`ms_tb_${i}`);
  });
  await actAs("chemist");
  const r = await savePhSeriesAction(null, form({ payload: JSON.stringify({ head: { dyeId: "dye_tb", name: "Thymol blue in water", solventId: "solv-water", secondSolventId: null, secondSolventMoleFraction: null, ionicStrengthMolL: 0.1, notes: "" }, vials: ids.map((measurementId, i) => ({ measurementId, pH: pHs[i] })) }) }));
  expect(r?.ok, r?.message).toBe(true);
  seriesId = (r?.data as { id: string }).id;
}, 180_000);

describe("the chemist's choice of one or two steps", () => {
  it("is one step by default", () => {
    expect(ensurePhSeriesFit(db(), { seriesId }).steps).toBe(1);
  });

  it("refuses a formulator and a value other than 1 or 2, changing nothing", async () => {
    await actAs("formulator");
    expect((await setPhFitStepsAction(null, form({ id: seriesId, steps: "2" })))?.code).toBe("forbidden");
    await actAs("chemist");
    const bad = await setPhFitStepsAction(null, form({ id: seriesId, steps: "3" }));
    expect(bad?.ok).toBe(false);
    expect(bad?.message).toMatch(/one step or two/);
    expect(ensurePhSeriesFit(db(), { seriesId }).steps).toBe(1);
  });

  it("two steps: both pKa within 0.1 of the booklet, stored, audited, kept when a vial changes, and each step searchable", async () => {
    await actAs("chemist");
    const r = await setPhFitStepsAction(null, form({ id: seriesId, steps: "2" }));
    expect(r?.ok, r?.message).toBe(true);
    expect(r?.message).toMatch(/pKa₁ .* pKa₂/);
    const fit = ensurePhSeriesFit(db(), { seriesId });
    expect(fit.ok && fit.steps).toBe(2);
    if (!fit.ok || fit.steps !== 2) return;
    expect(Math.abs(fit.fit.pKas[0] - PKA1)).toBeLessThan(0.1);
    expect(Math.abs(fit.fit.pKas[1] - PKA2)).toBeLessThan(0.1);
    const audit = db().select().from(auditLog).where(eq(auditLog.action, "ph-fit.steps")).all();
    expect(audit.map((a) => a.actorId)).toEqual([PEOPLE.chemist.id]);

    const steps = transitionCandidates(db()).filter((c) => c.dye.id === "dye_tb");
    expect(steps.map((c) => c.pKa)).toEqual(fit.fit.pKas);
    expect(steps[0].baseLab).toEqual(steps[1].acidLab);

    // A vial is rejected in review: the fit is redone, still with two steps.
    db().update(measurements).set({ reviewState: "pending" }).where(eq(measurements.id, ids[12])).run();
    decideMeasurement(db(), { reviewer: { id: PEOPLE.admin.id, role: "admin" }, measurementId: ids[12], decision: "rejected", note: "scratched cuvette" });
    const again = ensurePhSeriesFit(db(), { seriesId });
    expect(again.vials).toBe(23);
    expect(again.ok && again.steps).toBe(2);
  }, 180_000);
});
