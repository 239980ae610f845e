import { describe, expect, it } from "vitest";
import { buildSolventTable } from "@/db/seed/solvent-table";
import { classifyMedium, etnFromEt30, transitionEnergyKcalMol } from "@/lib/solvents/parameters";
import { readFixtureCsv } from "../support/fixtures";

const TOL = 1e-9;

describe("ETN = (ET(30) − 30.7)/32.4 (Reichardt, Chem. Rev. 94 (1994) 2319)", () => {
  it("gives 0 for tetramethylsilane (30.7) and 1 for water (63.1)", () => {
    expect(etnFromEt30(30.7)).toBeCloseTo(0, 12);
    expect(etnFromEt30(63.1)).toBeCloseTo(1, 12);
  });

  it("gives Reichardt's tabulated ETN for methanol (55.4 → 0.762) and acetonitrile (45.6 → 0.460)", () => {
    // Reichardt 1994 Table 4 lists ETN 0.762 and 0.460 (from memory); the formula must reproduce them to 3 decimals.
    expect(etnFromEt30(55.4)).toBeCloseTo(0.762, 3);
    expect(etnFromEt30(45.6)).toBeCloseTo(0.46, 3);
  });

  it("refuses non-numbers", () => {
    expect(() => etnFromEt30(Number.NaN)).toThrow(RangeError);
  });
});

describe("transition energy ET = 28591/λmax (Reichardt's definition)", () => {
  it("turns 453 nm into 63.1 kcal/mol (water's ET(30) band, from memory)", () => {
    expect(transitionEnergyKcalMol(453)).toBeCloseTo(63.1, 1);
    expect(() => transitionEnergyKcalMol(0)).toThrow(RangeError);
  });
});

describe("medium class (common practice, no source)", () => {
  it("classes H-bond donors as protic and aprotic solvents by εr ≥ 5", () => {
    expect(classifyMedium({ hBondDonor: true, permittivity: 2 })).toBe("protic");
    expect(classifyMedium({ hBondDonor: false, permittivity: 46.8 })).toBe("dipolar-aprotic");
    expect(classifyMedium({ hBondDonor: false, permittivity: 2.3 })).toBe("nonpolar");
  });
});

describe("seeded solvent table against the reference files in tests/fixtures", () => {
  const table = buildSolventTable();
  const byName = new Map(table.map((s) => [s.name, s]));
  const et30 = new Map(readFixtureCsv("solvents_et30_secondary.csv").map((r) => [r.solvent, Number(r.ET30_kcal_per_mol)]));
  const kt = new Map(readFixtureCsv("solvents_kamlet_taft_secondary.csv").map((r) => [r.solvent, r]));
  const gu = new Map(readFixtureCsv("solvents_gu2004_properties.csv").map((r) => [r.solvent, r]));

  it("holds at least 30 solvents, each with a medium class and its source", () => {
    expect(table.length).toBeGreaterThanOrEqual(30);
    for (const s of table) {
      expect(s.mediumSource).toMatch(/common practice/);
      if (s.et30 !== null) expect(s.et30Source).toBeTruthy();
      if (s.ktAlpha !== null) expect(s.ktAlphaSource).toBeTruthy();
      if (s.permittivity !== null) expect(s.permittivitySource).toBeTruthy();
    }
  });

  it.each([
    ["Methanol", "methanol"],
    ["Acetonitrile", "acetonitrile"],
    ["Dimethyl sulfoxide", "dimethyl sulfoxide"],
    ["N,N-Dimethylformamide", "DMF"],
    ["Tetrahydrofuran", "oxolane"],
    ["Chloroform", "trichloromethane"],
    ["n-Hexane", "n-hexane"],
  ])("%s has ET(30) as in the ET(30) file (%s)", (name, key) => {
    const s = byName.get(name)!;
    expect(s.et30).toBeCloseTo(et30.get(key)!, 9);
    expect(s.etn).toBeCloseTo((et30.get(key)! - 30.7) / 32.4, 9);
  });

  it("uses Reichardt's 63.1 kcal/mol for water, marked from memory", () => {
    expect(byName.get("Water")!.et30).toBe(63.1);
    expect(byName.get("Water")!.et30Source).toMatch(/from memory/);
  });

  it.each(["Water", "Ethanol", "Dimethyl sulfoxide", "Toluene", "Acetone", "2,2,2-Trifluoroethanol"])("%s carries the Kamlet–Taft α, β, π* of the reference file", (name) => {
    const s = byName.get(name)!;
    const key = name === "2,2,2-Trifluoroethanol" ? "trifluoroethanol" : name;
    const row = kt.get(key)!;
    expect(Math.abs(s.ktAlpha! - Number(row.kt_alpha))).toBeLessThan(TOL);
    expect(Math.abs(s.ktBeta! - Number(row.kt_beta))).toBeLessThan(TOL);
    expect(Math.abs(s.ktPiStar! - Number(row.kt_pi_star))).toBeLessThan(TOL);
  });

  it("takes permittivity from Lide (1995) via Gu et al. where that file has it: water 78.36, DMSO 46.83", () => {
    expect(byName.get("Water")!.permittivity).toBe(Number(gu.get("Water")!.dielectric_constant));
    expect(byName.get("Water")!.permittivity).toBe(78.36);
    expect(byName.get("Dimethyl sulfoxide")!.permittivity).toBe(46.83);
  });

  it("classes the panel as a chemist would: alcohols protic, DMSO dipolar aprotic, hexane non-polar", () => {
    expect(byName.get("Ethanol")!.medium).toBe("protic");
    expect(byName.get("Acetic acid")!.medium).toBe("protic");
    expect(byName.get("Dimethyl sulfoxide")!.medium).toBe("dipolar-aprotic");
    expect(byName.get("Acetonitrile")!.medium).toBe("dipolar-aprotic");
    expect(byName.get("n-Hexane")!.medium).toBe("nonpolar");
    expect(byName.get("Toluene")!.medium).toBe("nonpolar");
  });
});
