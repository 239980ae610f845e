/**
 * The `fit` command run as a lab script would (a child process), against ../shared/CONTRACT.md: JSON on
 * stdout and nothing else; on bad input a non-zero exit, nothing on stdout and one sentence on stderr.
 */
import { execFile } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { readFixtureCsv } from "../support/fixtures";

const ROOT = process.cwd();
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-fit-"));
const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), "solvatlas-fit-data-"));
const file = (name: string, text: string) => {
  const p = path.join(dir, name);
  fs.writeFileSync(p, text);
  return p;
};

type Run = { code: number; stdout: string; stderr: string };
function cli(args: string[], viaNpm = false): Promise<Run> {
  const [cmd, argv] = viaNpm
    ? ["npm", ["run", "--silent", "cli", "--", ...args]]
    : [process.execPath, ["--import", "tsx", path.join(ROOT, "lib/cli/main.ts"), ...args]];
  return new Promise((resolve) => {
    execFile(cmd, argv, { cwd: ROOT, env: { ...process.env, NODE_NO_WARNINGS: "1", DATA_DIR: dataDir } }, (error, stdout, stderr) => {
      resolve({ code: error ? ((error as { code?: number }).code ?? 1) : 0, stdout, stderr });
    });
  });
}

function expectRefusal(run: Run, pattern: RegExp) {
  expect(run.code).not.toBe(0);
  expect(run.stdout).toBe("");
  const lines = run.stderr.trim().split("\n");
  expect(lines).toHaveLength(1);
  expect(lines[0]).toMatch(/^[A-Z].*[.]$/);
  expect(lines[0]).toMatch(pattern);
}

/** ET(30) of nine panel solvents as printed in tests/fixtures/solvents_et30_secondary.csv (water: Reichardt 1994, from memory). */
const ET = readFixtureCsv("solvents_et30_secondary.csv");
const et = (name: string) => ET.find((r) => r.solvent === name)!.ET30_kcal_per_mol;
const NINE = [
  ["methanol", et("methanol")],
  ["ETHANOL", et("ethanol")],
  ["DMSO", et("dimethyl sulfoxide")],
  ["acetonitrile", et("acetonitrile")],
  ["Toluene", et("toluene")],
  ["hexane", et("n-hexane")],
  ['"1,2-dichloroethane"', et("1,2-dichloroethane")],
  ["water", "63.1"],
  ["acetone", et("acetone")],
];
const csv = (rows: string[][], header = "solvent,ET") => [header, ...rows.map((r) => r.join(","))].join("\n") + "\n";

describe("fit <csv> (CONTRACT.md: command line)", () => {
  it("fits Kamlet–Taft by default with names, synonyms and abbreviations in any case; α carries ET(30)", async () => {
    const run = await cli(["fit", file("et.csv", csv(NINE))], true);
    expect(run.stderr).toBe("");
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(out.model).toBe("kamlet-taft");
    expect(out.n).toBe(9);
    const fit = out.fits[0];
    expect(fit.property).toBe("ET");
    expect(Object.keys(fit.coefficients).sort()).toEqual(["alpha", "beta", "intercept", "pi_star"]);
    for (const c of Object.values(fit.coefficients) as { value: number; stdErr: number }[]) {
      expect(Number.isFinite(c.value)).toBe(true);
      expect(c.stdErr).toBeGreaterThan(0);
    }
    // Kamlet–Abboud–Taft ET(30) regressions give a ≈ 15–16.5 kcal/mol per unit α (from memory); wide band here.
    expect(fit.coefficients.alpha.value).toBeGreaterThan(11);
    expect(fit.coefficients.alpha.value).toBeLessThan(19);
    expect(fit.r2).toBeGreaterThan(0.9);
    expect(fit.looRmse).toBeGreaterThan(0);
  });

  it("fits one scale (et30) to reproduce the closed-form slope 1 when the property is ET(30) itself", async () => {
    const run = await cli(["fit", file("self.csv", csv(NINE.filter((r) => r[0] !== "water"))), "--model", "et30"]);
    const fit = JSON.parse(run.stdout).fits[0];
    // The table's ET(30) is the file's ET(30): slope 1, intercept 0, R² 1 up to rounding.
    expect(fit.coefficients.et30.value).toBeCloseTo(1, 6);
    expect(fit.coefficients.intercept.value).toBeCloseTo(0, 4);
    expect(fit.r2).toBeCloseTo(1, 8);
  });

  it("fits the permittivity model on f(εr) and explains ET(30) worse than Kamlet–Taft", async () => {
    const kt = JSON.parse((await cli(["fit", file("et2.csv", csv(NINE))])).stdout).fits[0];
    const pe = JSON.parse((await cli(["fit", file("et2.csv", csv(NINE)), "--model", "permittivity"])).stdout);
    expect(pe.model).toBe("permittivity");
    expect(Object.keys(pe.fits[0].coefficients).sort()).toEqual(["f_epsilon", "intercept"]);
    expect(pe.fits[0].r2).toBeLessThan(kt.r2);
  });

  it("fits several property columns (L,a,b) and accepts a solvent outside the table when its parameters are given", async () => {
    const rows = [
      ["Methanol", "50", "60", "-10", "", "", ""],
      ["Acetone", "55", "40", "10", "", "", ""],
      ["Toluene", "60", "20", "30", "", "", ""],
      ["Water", "45", "70", "-20", "", "", ""],
      ["DMSO", "52", "45", "5", "", "", ""],
      ["Ethyl acetate", "58", "30", "20", "", "", ""],
      ["Solvent X", "51", "55", "-5", "0.7", "0.5", "0.6"],
    ];
    const run = await cli(["fit", file("lab.csv", csv(rows, "solvent,L,a,b,pi_star,alpha,beta"))]);
    expect(run.code).toBe(0);
    const out = JSON.parse(run.stdout);
    expect(out.n).toBe(7);
    expect(out.fits.map((f: { property: string }) => f.property)).toEqual(["L", "a", "b"]);
  });

  it("refuses an unknown solvent, a missing parameter, a malformed number, too few solvents, collinear parameters, a bad model and a missing file", { timeout: 180_000 }, async () => {
    const aprotic = [["toluene", "33.9"], ["hexane", "31"], ["cyclohexane", "30.9"], ["benzene", "34.3"], ["carbon tetrachloride", "32.4"], ["p-xylene", "33.1"], ["acetone", "42.2"], ["DMSO", "45.1"]];
    // Formamide is in the table with ET(30) but without Kamlet–Taft values.
    const cases: [Promise<Run>, RegExp][] = [
      [cli(["fit", file("unknown.csv", csv([...NINE, ["unobtainium", "40"]]))]), /unobtainium/],
      [cli(["fit", file("formamide.csv", csv([...NINE, ["formamide", "55.8"]]))]), /Formamide/],
      [cli(["fit", file("bad.csv", csv([...NINE.slice(0, 8), ["acetone", "4,2"]]))]), /Line|number|columns/],
      [cli(["fit", file("bad2.csv", csv([...NINE.slice(0, 8), ["acetone", "0x2A"]]))]), /plain numbers/],
      [cli(["fit", file("few.csv", csv(NINE.slice(0, 5)))]), /at least 6 solvents/],
      [cli(["fit", file("collinear.csv", csv(aprotic))]), /cannot tell the solvent parameters apart/],
      [cli(["fit", file("et3.csv", csv(NINE)), "--model", "hildebrand"]), /Unknown model/],
      [cli(["fit", path.join(dir, "nope.csv")]), /does not exist/],
      [cli(["fit", file("nosolvent.csv", "name,ET\nmethanol,55\n")]), /solvent column/],
    ];
    for (const [run, pattern] of cases) expectRefusal(await run, pattern);
  });
});
