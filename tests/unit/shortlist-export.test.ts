import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { conditionName, shortlistToCsv, summariseByCondition, type ConditionColour } from "@/lib/search/shortlist-csv";
import { count } from "@/lib/text/count";
import { readFixtureCsv } from "../support/fixtures";

// Sharma, Wu & Dalal (2005), "The CIEDE2000 colour-difference formula: implementation notes…", Table 1.
// Where a* = 0 the primed a′ equals a*, so the table's C′ and h′ are C*ab and hab of that colour (CIE 15:2004 §8.2.1).
const sharma = readFixtureCsv("ciede2000_sharma2005_table1.csv").filter((r) => Number(r.a2) === 0);
// Reichardt ET(30) of 1,4-dioxane, 36.0 kcal/mol (tests/fixtures/solvents_et30_secondary.csv, see SOURCES.md).
const dioxaneEt30 = Number(readFixtureCsv("solvents_et30_secondary.csv").find((r) => r.solvent === "1,4-dioxane")!.ET30_kcal_per_mol);
const TOLERANCE = 1e-4; // the table's 4 decimals

function colour(lab: [number, number, number], over: Partial<ConditionColour> = {}): ConditionColour {
  return {
    dyeCode: "KB-T-1",
    conditionId: "cond_dioxane",
    solvent: "1,4-Dioxane",
    medium: "nonpolar",
    acidBase: "neutral",
    ph: null,
    additive: "",
    temperatureC: null,
    secondSolvent: null,
    secondSolventMoleFraction: null,
    solventParameters: { et30: dioxaneEt30, etn: null, alpha: null, beta: null, piStar: null, permittivity: null },
    whitePoint: "D65, CIE 1931 2°",
    lab,
    ...over,
  };
}

describe("shortlist export: colours per condition", () => {
  it.each(sharma.map((r) => [r.pair, r] as const))("C*ab and hab of the mean match Sharma et al. (2005) pair %s", (_pair, r) => {
    const [summary] = summariseByCondition([colour([Number(r.L2), Number(r.a2), Number(r.b2)])]);
    expect(Math.abs(summary.chroma - Number(r.C2_prime))).toBeLessThan(TOLERANCE);
    expect(Math.abs(summary.hueDeg - Number(r.h2_prime))).toBeLessThan(TOLERANCE);
    expect(summary.n).toBe(1);
    expect(summary.sd).toBeNull();
  });

  it("keeps replicates as a mean with the sample standard deviation (n − 1; definition, no outside source)", () => {
    const [s] = summariseByCondition([colour([40, 10, -20]), colour([42, 14, -20]), colour([44, 12, -26])]);
    expect(s.n).toBe(3);
    expect(s.mean).toEqual([42, 12, -22]);
    expect(s.sd![0]).toBeCloseTo(2, 12);
    expect(s.sd![1]).toBeCloseTo(2, 12);
    expect(s.sd![2]).toBeCloseTo(Math.sqrt(12), 12);
  });

  it("gives the replicates' ΔE00 spread from their mean (CIEDE2000 S_L, Sharma, Wu & Dalal 2005, eq. 18), none for one replicate", () => {
    // Two greys 4 apart in L* around L* = 50: each is 2 in L* from the mean, C* = 0 so only the lightness
    // term counts, with L̄′ = 49 (or 51): S_L = 1 + 0.015 (L̄′ − 50)² / √(20 + (L̄′ − 50)²), k_L = 1.
    const [s] = summariseByCondition([colour([48, 0, 0]), colour([52, 0, 0])]);
    const sL = 1 + (0.015 * 1) / Math.sqrt(20 + 1);
    expect(s.spreadDeltaE00!).toBeCloseTo(2 / sL, 10);
    expect(summariseByCondition([colour([48, 0, 0])])[0].spreadDeltaE00).toBeNull();
  });

  it("does not pool different conditions or different dyes", () => {
    const rows = [colour([40, 10, -20]), colour([60, 0, 0], { conditionId: "cond_water", solvent: "Water", medium: "protic" }), colour([50, 5, 5], { dyeCode: "KB-T-2" })];
    expect(summariseByCondition(rows)).toHaveLength(3);
  });

  it("writes one row per dye and condition, the condition in words, the colour and the solvent's ET(30); a dye without colours keeps one row", () => {
    const csv = shortlistToCsv(
      [
        { code: "KB-T-1", name: "Test Violet", dyeClass: "betaine", casNumber: null, molarMass: 551.7, acceptedMeasurements: 2, note: "=HYPERLINK(\"x\")", hazards: "" },
        { code: "KB-T-9", name: "Unmeasured", dyeClass: "azo", casNumber: null, molarMass: null, acceptedMeasurements: 0, note: "", hazards: "" },
      ],
      summariseByCondition([colour([40, 10, -20]), colour([42, 14, -20])]),
    );
    const parsed = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true }).data;
    expect(parsed).toHaveLength(2);
    expect(parsed[0]).toMatchObject({ code: "KB-T-1", condition: "1,4-Dioxane, neutral", solvent: "1,4-Dioxane", replicates: "2", L: "41", a: "12", b: "-20", solvent_et30_kcal_mol: "36", white_point: "D65, CIE 1931 2°" });
    // A note that a spreadsheet would run as a formula is quoted (OWASP, CSV injection).
    expect(parsed[0].note.startsWith("'=")).toBe(true);
    expect(parsed[1]).toMatchObject({ code: "KB-T-9", condition: "", L: "" });
  });

  it("names blends, pH, additive and temperature in the condition", () => {
    expect(conditionName({ solvent: "Water", acidBase: "base", ph: 11, additive: "NaOH", temperatureC: 25, secondSolvent: "Ethanol", secondSolventMoleFraction: 0.2 })).toBe(
      "Water + Ethanol (x₂ = 0.2), base, pH 11, NaOH, 25 °C",
    );
  });
});

describe("counted nouns", () => {
  it("says 1 dye and 2 dyes", () => {
    expect(count(1, "dye")).toBe("1 dye");
    expect(count(2, "dye")).toBe("2 dyes");
    expect(count(0, "vial")).toBe("0 vials");
    expect(count(1200, "measurement")).toBe("1,200 measurements");
  });
});
