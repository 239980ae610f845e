import { describe, expect, it } from "vitest";
import { SOLVENT_PANEL } from "@/db/seed/solvent-table";
import { boschRosesValue, fitBoschRoses, idealMixingValue } from "@/lib/models/blends";
import { ModelRefusal } from "@/lib/models/errors";
import { fitEt30, fitKamletTaft, fitPermittivity, kirkwoodOnsager, predictScaleModel, type ScaleObservation } from "@/lib/models/solvent-scales";
import { studentTCdf, studentTQuantile } from "@/lib/models/student-t";
import { gaussian, mulberry32 } from "@/lib/random";
import { readFixtureCsv } from "../support/fixtures";

/**
 * Independent least squares for the checks below: normal equations XᵀX b = Xᵀy solved by Gauss–Jordan
 * elimination with partial pivoting, written here and sharing no code with lib/models (which uses
 * ml-matrix QR and SVD).
 */
function gaussJordanLeastSquares(x: number[][], y: number[]): number[] {
  const p = x[0].length;
  const a = Array.from({ length: p }, (_, i) => [
    ...Array.from({ length: p }, (_, j) => x.reduce((s, r) => s + r[i] * r[j], 0)),
    x.reduce((s, r, k) => s + r[i] * y[k], 0),
  ]);
  for (let c = 0; c < p; c++) {
    let pivot = c;
    for (let r = c + 1; r < p; r++) if (Math.abs(a[r][c]) > Math.abs(a[pivot][c])) pivot = r;
    [a[c], a[pivot]] = [a[pivot], a[c]];
    for (let r = 0; r < p; r++) {
      if (r === c) continue;
      const f = a[r][c] / a[c][c];
      for (let k = c; k <= p; k++) a[r][k] -= f * a[c][k];
    }
  }
  return a.map((row, i) => row[p] / row[i]);
}

/** Kamlet–Taft file (tests/fixtures/solvents_kamlet_taft_secondary.csv, pcyep7/Solvent-selection) rows with α, β, π*, εr. */
const KT_ROWS = readFixtureCsv("solvents_kamlet_taft_secondary.csv").filter((r) => ["kt_alpha", "kt_beta", "kt_pi_star", "dielectric_constant"].every((c) => r[c] !== ""));
const ET_ROWS = readFixtureCsv("solvents_et30_secondary.csv");

function ktParameters(r: Record<string, string>) {
  return { alpha: Number(r.kt_alpha), beta: Number(r.kt_beta), piStar: Number(r.kt_pi_star), permittivity: Number(r.dielectric_constant) };
}

/**
 * Published ET(30) (tests/fixtures/solvents_et30_secondary.csv, v-saini/ET30-NN, Reichardt's compilations)
 * joined to the Kamlet–Taft file by the name pairs of the shipped solvent panel (db/seed/solvent-table.ts).
 */
const ET30_ON_KT: ScaleObservation[] = SOLVENT_PANEL.flatMap((p) => {
  const e = ET_ROWS.find((r) => r.solvent === p.et30Key);
  const k = KT_ROWS.find((r) => r.solvent === p.ktKey);
  return e && k ? [{ solvent: p.name, parameters: ktParameters(k), value: Number(e.ET30_kcal_per_mol) }] : [];
});

describe("Student's t quantile (computed, checked against closed forms and a printed table)", () => {
  it("matches the closed forms for ν = 1 (Cauchy: tan(π(p − ½))) and ν = 2 ((2p − 1)/√(2p(1 − p)))", () => {
    for (const p of [0.6, 0.9, 0.975, 0.995]) {
      expect(studentTQuantile(p, 1)).toBeCloseTo(Math.tan(Math.PI * (p - 0.5)), 8);
      expect(studentTQuantile(p, 2)).toBeCloseTo((2 * p - 1) / Math.sqrt(2 * p * (1 - p)), 8);
    }
  });

  it("gives the printed t(0.975) for ν = 5, 10, 30 (2.571, 2.228, 2.042; any statistics table, from memory) and → 1.95996 for large ν", () => {
    expect(studentTQuantile(0.975, 5)).toBeCloseTo(2.571, 3);
    expect(studentTQuantile(0.975, 10)).toBeCloseTo(2.228, 3);
    expect(studentTQuantile(0.975, 30)).toBeCloseTo(2.042, 3);
    expect(studentTQuantile(0.975, 1e6)).toBeCloseTo(1.959964, 4);
    expect(studentTCdf(0, 7)).toBeCloseTo(0.5, 12);
  });
});

describe("Kamlet–Taft LSER on published ET(30) values (different generating process: real solvents)", () => {
  const fit = fitKamletTaft(ET30_ON_KT, { property: "ET(30)", unit: "kcal/mol" });

  it("uses the 30+ panel solvents found in both files", () => {
    expect(ET30_ON_KT.length).toBeGreaterThanOrEqual(30);
  });

  it("agrees with an independent normal-equation solve to 1e-8 kcal/mol", () => {
    const b = gaussJordanLeastSquares(ET30_ON_KT.map((d) => [1, d.parameters.piStar!, d.parameters.alpha!, d.parameters.beta!]), ET30_ON_KT.map((d) => d.value));
    expect(fit.coefficients.intercept.value).toBeCloseTo(b[0], 8);
    expect(fit.coefficients.pi_star.value).toBeCloseTo(b[1], 8);
    expect(fit.coefficients.alpha.value).toBeCloseTo(b[2], 8);
    expect(fit.coefficients.beta.value).toBeCloseTo(b[3], 8);
  });

  it("has a leave-one-out RMSE equal to refitting n times without each solvent (independent solver)", () => {
    const errors = ET30_ON_KT.map((d, i) => {
      const rest = ET30_ON_KT.filter((_, j) => j !== i);
      const b = gaussJordanLeastSquares(rest.map((r) => [1, r.parameters.piStar!, r.parameters.alpha!, r.parameters.beta!]), rest.map((r) => r.value));
      return d.value - (b[0] + b[1] * d.parameters.piStar! + b[2] * d.parameters.alpha! + b[3] * d.parameters.beta!);
    });
    expect(fit.looRmse).toBeCloseTo(Math.sqrt(errors.reduce((s, e) => s + e * e, 0) / errors.length), 8);
  });

  it("finds α carrying ET(30): the largest coefficient and t-value; a and s in the published ranges (from memory)", () => {
    // Kamlet, Abboud & Taft's regressions of ET(30) on π* and α give a ≈ 15–16.5 and s ≈ 11–15 kcal/mol
    // (from memory, Prog. Phys. Org. Chem. 13 (1981) 485); this data set is a different compilation, so wide ranges.
    const t = (name: string) => Math.abs(fit.coefficients[name].value / fit.coefficients[name].stdErr);
    expect(t("alpha")).toBeGreaterThan(t("pi_star"));
    expect(t("alpha")).toBeGreaterThan(t("beta"));
    expect(fit.coefficients.alpha.value).toBeGreaterThan(12);
    expect(fit.coefficients.alpha.value).toBeLessThan(18);
    expect(fit.coefficients.pi_star.value).toBeGreaterThan(8);
    expect(fit.coefficients.pi_star.value).toBeLessThan(16);
    expect(fit.r2).toBeGreaterThan(0.9);
  });

  it("permittivity alone explains ET(30) far worse; closed-form one-variable regression agrees", () => {
    const perm = fitPermittivity(ET30_ON_KT, { property: "ET(30)", unit: "kcal/mol" });
    const xs = ET30_ON_KT.map((d) => kirkwoodOnsager(d.parameters.permittivity!));
    const ys = ET30_ON_KT.map((d) => d.value);
    const n = xs.length;
    const mx = xs.reduce((s, v) => s + v, 0) / n;
    const my = ys.reduce((s, v) => s + v, 0) / n;
    const sxx = xs.reduce((s, v) => s + (v - mx) ** 2, 0);
    const syy = ys.reduce((s, v) => s + (v - my) ** 2, 0);
    const sxy = xs.reduce((s, v, i) => s + (v - mx) * (ys[i] - my), 0);
    const slope = sxy / sxx;
    const rss = syy - slope * sxy;
    // Closed forms: slope = Sxy/Sxx, SE(slope) = √(RSS/(n − 2)/Sxx), R² = Sxy²/(Sxx·Syy) (any regression text).
    expect(perm.coefficients.f_epsilon.value).toBeCloseTo(slope, 8);
    expect(perm.coefficients.intercept.value).toBeCloseTo(my - slope * mx, 8);
    expect(perm.coefficients.f_epsilon.stdErr).toBeCloseTo(Math.sqrt(rss / (n - 2) / sxx), 8);
    expect(perm.r2).toBeCloseTo((sxy * sxy) / (sxx * syy), 10);
    expect(perm.r2).toBeLessThan(fit.r2 - 0.25);
    expect(perm.looRmse).toBeGreaterThan(2 * fit.looRmse);
  });
});

describe("Kamlet–Taft LSER recovers known coefficients on the real solvent table with noise", () => {
  const truth = { intercept: 19000, pi_star: -1200, alpha: 2500, beta: -400 };
  const noiseCm1 = 150;
  const simulate = (seed: number): ScaleObservation[] => {
    const random = mulberry32(seed);
    return KT_ROWS.map((r) => {
      const p = ktParameters(r);
      const value = truth.intercept + truth.pi_star * p.piStar + truth.alpha * p.alpha + truth.beta * p.beta + noiseCm1 * gaussian(random);
      return { solvent: r.solvent, parameters: p, value };
    });
  };

  it("(same model generates and fits: this checks the algebra) gets every coefficient within 3 standard errors", () => {
    const fit = fitKamletTaft(simulate(7));
    for (const [name, value] of Object.entries(truth)) {
      expect(Math.abs(fit.coefficients[name].value - value)).toBeLessThan(3 * fit.coefficients[name].stdErr);
    }
    expect(fit.residualStdErr).toBeGreaterThan(0.7 * noiseCm1);
    expect(fit.residualStdErr).toBeLessThan(1.3 * noiseCm1);
  });

  it("has honest standard errors and prediction intervals: 95 % coverage over 300 noisy data sets", () => {
    let coefHits = 0;
    let coefTotal = 0;
    let predHits = 0;
    const held = KT_ROWS.length - 1;
    for (let seed = 1; seed <= 300; seed++) {
      const data = simulate(1000 + seed);
      const fit = fitKamletTaft(data.slice(0, held));
      const t = studentTQuantile(0.975, fit.dof);
      for (const [name, value] of Object.entries(truth)) {
        coefTotal++;
        if (Math.abs(fit.coefficients[name].value - value) <= t * fit.coefficients[name].stdErr) coefHits++;
      }
      const pred = predictScaleModel(fit, data[held].parameters);
      if (data[held].value >= pred.lower && data[held].value <= pred.upper) predHits++;
    }
    expect(coefHits / coefTotal).toBeGreaterThan(0.92);
    expect(coefHits / coefTotal).toBeLessThan(0.98);
    expect(predHits / 300).toBeGreaterThan(0.91);
    expect(predHits / 300).toBeLessThan(0.99);
  });

  it("(different generating process: specific solvation in three solvents) shows those solvents as the worst leave-one-out errors", () => {
    const data = simulate(42).map((d) => (["Water", "Methanol", "Dimethyl sulfoxide"].includes(d.solvent) ? { ...d, value: d.value + 1500 } : d));
    const fit = fitKamletTaft(data);
    const loo = data.map((d, i) => ({ solvent: d.solvent, error: Math.abs(d.value - fit.looPredicted[i]) })).sort((a, b) => b.error - a.error);
    expect(loo.slice(0, 3).map((e) => e.solvent).sort()).toEqual(["Dimethyl sulfoxide", "Methanol", "Water"]);
    expect(fit.residualStdErr).toBeGreaterThan(2 * noiseCm1);
  });

  it("flags a solvent outside the fitted region as an extrapolation", () => {
    const aprotic = simulate(3).filter((d) => d.parameters.alpha! < 0.2);
    const data = [...aprotic.slice(0, 12), ...simulate(3).filter((d) => d.parameters.alpha! > 0.5 && d.parameters.alpha! < 0.9).slice(0, 3)];
    const fit = fitKamletTaft(data);
    const water = ktParameters(KT_ROWS.find((r) => r.solvent === "Water")!);
    const pWater = predictScaleModel(fit, water);
    expect(pWater.extrapolated).toBe(true);
    const inside = predictScaleModel(fit, data[0].parameters);
    expect(inside.extrapolated).toBe(false);
    expect(pWater.halfWidth).toBeGreaterThan(inside.halfWidth);
  });
});

describe("refusals", () => {
  const row = (alpha: number, beta: number, piStar: number, value: number, solvent = `s${value}`): ScaleObservation => ({ solvent, parameters: { alpha, beta, piStar }, value });

  it("refuses fewer solvents than terms + 2 and accepts exactly terms + 2", () => {
    const six = [row(0, 0.1, 0.2, 1), row(0.5, 0.4, 0.6, 2), row(0.9, 0.2, 0.5, 3), row(0.1, 0.8, 0.9, 4), row(0.3, 0.5, 0.1, 5), row(0.7, 0.9, 0.3, 7)];
    expect(() => fitKamletTaft(six.slice(0, 5))).toThrow(ModelRefusal);
    try {
      fitKamletTaft(six.slice(0, 5));
    } catch (e) {
      expect((e as ModelRefusal).code).toBe("too-few-solvents");
      expect((e as ModelRefusal).message).toMatch(/at least 6 solvents/);
    }
    expect(fitKamletTaft(six).n).toBe(6);
    expect(() => fitEt30([1, 2, 3].map((v) => ({ solvent: `s${v}`, parameters: { et30: 30 + v }, value: v })))).toThrow(/at least 4 solvents/);
  });

  it("refuses a set of aprotic solvents from the real table (α the same in all) with a sentence naming α", () => {
    const aprotic = KT_ROWS.filter((r) => Number(r.kt_alpha) === 0).map((r, i) => ({ solvent: r.solvent, parameters: ktParameters(r), value: 20000 + i }));
    expect(aprotic.length).toBeGreaterThan(6);
    expect(() => fitKamletTaft(aprotic)).toThrow(/α is the same in every solvent/);
  });

  it("refuses β that follows π* across the set (collinear, VIF above 10)", () => {
    const data = [0.1, 0.3, 0.45, 0.6, 0.8, 0.95, 1.0].map((pi, i) => row(i % 2 === 0 ? 0 : 0.8, 0.5 * pi + 0.1 + (i % 3) * 0.005, pi, 20000 + 100 * i));
    try {
      fitKamletTaft(data);
      expect.unreachable();
    } catch (e) {
      expect((e as ModelRefusal).code).toBe("collinear-parameters");
    }
  });

  it("refuses solvents whose parameters are missing and says which", () => {
    const data = [row(0, 0.1, 0.2, 1), row(0.5, 0.4, 0.6, 2), row(0.9, 0.2, 0.5, 3), row(0.1, 0.8, 0.9, 4), row(0.3, 0.5, 0.1, 5), { solvent: "Formamide", parameters: { et30: 55.8 }, value: 6 }];
    expect(() => fitKamletTaft(data)).toThrow(/Formamide/);
  });
});

describe("binary mixtures (Bosch & Rosés preferential solvation)", () => {
  it("reduces to ideal mixing when f₂/₁ = 1, f₁₂/₁ = 2 and Y₁₂ = (Y₁ + Y₂)/2 (bulk composition in the shell)", () => {
    for (const x2 of [0, 0.1, 0.37, 0.5, 0.9, 1]) {
      expect(boschRosesValue({ y1: 18000, y2: 21000, y12: 19500, f21: 1, f121: 2 }, x2)).toBeCloseTo(idealMixingValue(18000, 21000, x2), 8);
    }
  });

  it("recovers strong preferential solvation by solvent 2 from five compositions", () => {
    const truth = { y1: 18000, y2: 21000, y12: 20000, f21: 6, f121: 3 };
    const points = [0.1, 0.2, 0.35, 0.5, 0.7, 0.85].map((x2) => ({ x2, value: boschRosesValue(truth, x2) }));
    const fit = fitBoschRoses(points, truth.y1, truth.y2);
    expect(fit.rmse).toBeLessThan(5);
    // Far from the ideal line at x₂ = 0.2: the model bends toward solvent 2.
    expect(boschRosesValue(fit, 0.2) - idealMixingValue(18000, 21000, 0.2)).toBeGreaterThan(500);
  });
});

describe("tune (constructed case)", () => {
  it("finds the 50:50 blend of two solvents whose band positions bracket the target, ahead of either neat solvent", async () => {
    const { tune } = await import("@/lib/models/tune");
    const { bandLab } = await import("@/lib/color/band");
    const band = { fwhmCm1: 4000, peakAbsorbance: 1.2, rmsDeltaE00: 0.3 };
    const at = (nu: number) => bandLab({ wavenumberCm1: nu, fwhmCm1: band.fwhmCm1, peakAbsorbance: band.peakAbsorbance });
    const solvent = (id: string, nu: number) => ({ solventId: id, solvent: id, cautions: "", medium: "protic", lab: at(nu), measured: true, uncertaintyDeltaE00: 0, wavenumberCm1: nu, wavenumberStdErrCm1: 50, extrapolated: false });
    const dye = { dye: { id: "d", code: "D", name: "D" }, band, neat: [solvent("A", 16000), solvent("B", 20000), solvent("C", 23000)] };
    const ranked = tune(at(18000), [dye], { limit: 5 });
    expect(ranked[0].kind).toBe("blend");
    expect(ranked[0].solvents.map((s) => s.solventId)).toEqual(["A", "B"]);
    expect(ranked[0].x2).toBeCloseTo(0.5, 10);
    expect(ranked[0].deltaE00).toBeLessThan(0.2);
    expect(ranked[0].basis).toMatch(/ideal mixing/);
    // A blend's uncertainty is wider than that of its measured ends (the ideal-mixing allowance).
    expect(ranked[0].uncertaintyDeltaE00).toBeGreaterThan(band.rmsDeltaE00);
    const neatB = tune(at(18000), [dye], { limit: 100 }).find((c) => c.kind === "neat" && c.solvents[0].solventId === "B")!;
    expect(neatB.deltaE00).toBeGreaterThan(ranked[0].deltaE00 + 2);
    // The target of a neat solvent's own colour ranks that solvent first.
    expect(tune(at(23000), [dye], { limit: 1 })[0]).toMatchObject({ kind: "neat", measured: true });
  });

  it("uses the preferential-solvation curve when three compositions of the pair were measured", async () => {
    const { tune } = await import("@/lib/models/tune");
    const { bandLab } = await import("@/lib/color/band");
    const band = { fwhmCm1: 4000, peakAbsorbance: 1.2, rmsDeltaE00: 0.3 };
    const at = (nu: number) => bandLab({ wavenumberCm1: nu, fwhmCm1: band.fwhmCm1, peakAbsorbance: band.peakAbsorbance });
    const truth = { y1: 16000, y2: 20000, y12: 19000, f21: 5, f121: 2 };
    const solvent = (id: string, nu: number) => ({ solventId: id, solvent: id, cautions: "", medium: "protic", lab: at(nu), measured: true, uncertaintyDeltaE00: 0, wavenumberCm1: nu, wavenumberStdErrCm1: 50, extrapolated: false });
    const points = [0.2, 0.4, 0.6, 0.8].map((x2) => ({ x2, value: boschRosesValue(truth, x2) }));
    const dye = { dye: { id: "d", code: "D", name: "D" }, band, neat: [solvent("A", 16000), solvent("B", 20000)], blends: [{ solventId1: "A", solventId2: "B", points }] };
    const target = at(boschRosesValue(truth, 0.3));
    const best = tune(target, [dye], { limit: 1 })[0];
    expect(best.basis).toBe("preferential solvation fit");
    expect(best.x2).toBeCloseTo(0.3, 10);
  });
});
