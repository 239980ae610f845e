/**
 * The absorbance-spectrum checker (lib/import/spectrum.ts): every refusal names its line and column,
 * units are recognised and converted, and a good file's step and range are reported.
 * Spectra here are built in the test (a Gaussian band, common practice, no source); the nm ↔ cm⁻¹
 * conversion λ = 10⁷/ν̃ is the definition of the wavenumber.
 */
import { describe, expect, it } from "vitest";
import { checkAbsorbanceCsv, checkAbsorbancePoints, problemsSentence } from "@/lib/import/spectrum";
import { lambdaMax } from "@/lib/color/spectrum";

const band = (nm: number) => 0.9 * Math.exp(-(((1e7 / nm - 1e7 / 550) / 2500) ** 2));

/** A CSV with a header and rows from `from` to `to` nm every `step` nm; `edit` can change rows (index 0 = line 2). */
function csv({ from = 380, to = 780, step = 1, header = "wavelength_nm,absorbance", edit }: { from?: number; to?: number; step?: number; header?: string; edit?: (rows: string[]) => void } = {}) {
  const rows: string[] = [];
  for (let nm = from; nm <= to + 1e-9; nm += step) rows.push(`${Number(nm.toFixed(3))},${band(nm).toFixed(5)}`);
  edit?.(rows);
  return [header, ...rows].join("\n") + "\n";
}

function refused(text: string) {
  const r = checkAbsorbanceCsv(text);
  if (r.ok) throw new Error("expected a refusal");
  return r.problems;
}

describe("absorbance CSV: a good file", () => {
  it("is read in nm, with range, step and λmax of its band reported", () => {
    const r = checkAbsorbanceCsv(csv({ step: 2 }));
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.report).toMatchObject({ points: 201, unit: "nm", descending: false, rangeNm: [380, 780], uniform: true });
    expect(r.report.stepNm.median).toBeCloseTo(2, 9);
    expect(lambdaMax(r.spectrum)).toBeCloseTo(550, 0);
    expect(r.warnings).toEqual([]);
  });

  it("accepts a file that runs from long to short wavelengths, stored ascending", () => {
    const r = checkAbsorbanceCsv(csv({ edit: (rows) => rows.reverse() }));
    expect(r.ok && r.report.descending).toBe(true);
    if (r.ok) expect(r.spectrum.wavelengths[0]).toBe(380);
  });

  it("converts µm (× 1000) and cm⁻¹ (λ = 10⁷/ν̃), saying so", () => {
    const um = checkAbsorbanceCsv(["wavelength_um,absorbance", ...Array.from({ length: 41 }, (_, i) => `${(0.38 + i * 0.01).toFixed(2)},${band(380 + i * 10).toFixed(5)}`)].join("\n"));
    expect(um.ok).toBe(true);
    if (um.ok) {
      expect(um.report.unit).toBe("µm");
      expect(um.spectrum.wavelengths[0]).toBeCloseTo(380, 9);
      expect(um.warnings.join(" ")).toMatch(/µm/);
    }
    const rows = [];
    for (let nu = 12500; nu <= 26000; nu += 100) rows.push(`${nu},${band(1e7 / nu).toFixed(5)}`);
    const cm = checkAbsorbanceCsv(["wavenumber_cm-1,absorbance", ...rows].join("\n"));
    expect(cm.ok).toBe(true);
    if (cm.ok) {
      expect(cm.report.unit).toBe("cm⁻¹");
      expect(cm.report.descending).toBe(true);
      expect(cm.spectrum.wavelengths[0]).toBeCloseTo(1e7 / 26000, 6);
      expect(cm.report.uniform).toBe(false);
      expect(lambdaMax(cm.spectrum)).toBeCloseTo(550, 0);
    }
  });

  it("reads semicolon files with a decimal comma and instrument-style headers", () => {
    const text = csv({ step: 5, header: "Wavelength (nm);Abs" }).replace(/,/g, ";").replace(/(\d)\.(\d)/g, "$1,$2");
    const r = checkAbsorbanceCsv(text);
    expect(r.ok).toBe(true);
  });

  it("reports a non-uniform step and readings past absorbance 4 as warnings, not refusals", () => {
    const r = checkAbsorbanceCsv(
      csv({
        edit: (rows) => {
          rows.splice(100, 4); // 480–483 nm missing: a 5 nm gap in a 1 nm file
          rows[200] = "584,4.6";
        },
      }),
    );
    expect(r.ok).toBe(true);
    if (r.ok) {
      expect(r.report.uniform).toBe(false);
      expect(r.report.stepNm.max).toBe(5);
      expect(r.warnings.join(" ")).toMatch(/not uniform/);
      expect(r.warnings.join(" ")).toMatch(/above absorbance 4/);
    }
  });
});

describe("absorbance CSV: each refusal names line and column", () => {
  it("an empty file", () => {
    expect(refused("")[0]).toMatchObject({ line: 1, column: "file" });
  });

  it("no header row", () => {
    expect(refused("500,0.5\n510,0.4\n")[0]).toMatchObject({ line: 1, column: "header", message: expect.stringMatching(/header row/) });
  });

  it("no wavelength column, and no absorbance column (transmittance named as such)", () => {
    expect(refused("x,absorbance\n500,0.5\n")[0]).toMatchObject({ line: 1, column: "header", message: expect.stringMatching(/wavelength/) });
    expect(refused("wavelength_nm,%T\n500,50\n")[0]).toMatchObject({ line: 1, column: "%T", message: expect.stringMatching(/transmittance.*−log10/) });
  });

  it("a wavelength or absorbance that is not a number, or missing", () => {
    const p = refused(csv({ edit: (rows) => ((rows[10] = "390,OVER"), (rows[20] = "4OO,0.1"), (rows[30] = "410,")) }));
    expect(p).toEqual([
      expect.objectContaining({ line: 12, column: "absorbance", message: expect.stringMatching(/“OVER” is not a number/) }),
      expect.objectContaining({ line: 22, column: "wavelength_nm", message: expect.stringMatching(/not a number/) }),
      expect.objectContaining({ line: 32, column: "absorbance", message: expect.stringMatching(/missing/) }),
    ]);
    expect(problemsSentence(p, "line")).toMatch(/^Line 12, column absorbance: .*3 problems in all/);
  });

  it("a decimal comma in a comma-separated file", () => {
    expect(refused(csv({ edit: (rows) => (rows[5] = "385,0,12") }))[0]).toMatchObject({ line: 7, column: "file", message: expect.stringMatching(/decimal separator/) });
  });

  it("a wavelength twice", () => {
    expect(refused(csv({ edit: (rows) => rows.splice(51, 0, rows[50]) }))[0]).toMatchObject({ line: 53, column: "wavelength_nm", message: expect.stringMatching(/already on line 52/) });
  });

  it("wavelengths that change direction", () => {
    expect(refused(csv({ edit: (rows) => ([rows[60], rows[61]] = [rows[61], rows[60]]) }))[0]).toMatchObject({ line: 63, column: "wavelength_nm", message: expect.stringMatching(/breaks the order/) });
  });

  it("a range that misses part of 400–700 nm, saying which part", () => {
    expect(refused(csv({ from: 420, to: 800 }))[0].message).toMatch(/covers 420–800 nm and misses 400–420 nm/);
    expect(refused(csv({ from: 350, to: 650 }))[0].message).toMatch(/misses 650–700 nm/);
  });

  it("a step too coarse inside the visible, naming the gap's lines", () => {
    const p = refused(csv({ edit: (rows) => rows.splice(150, 15) }));
    expect(p[0]).toMatchObject({ line: 152, column: "wavelength_nm", message: expect.stringMatching(/gap between 529 and 545 nm \(lines 151 and 152\) is 16 nm/) });
  });

  it("units the header names but the values contradict, and values in no unit", () => {
    const rows = [];
    for (let nu = 12500; nu <= 26000; nu += 100) rows.push(`${nu},0.1`);
    expect(refused(["wavelength_nm,absorbance", ...rows].join("\n"))[0]).toMatchObject({ line: 1, column: "wavelength_nm", message: expect.stringMatching(/header says nm.*look like cm⁻¹/) });
    expect(refused("wavelength,absorbance\n100000,0.1\n100001,0.2\n")[0].message).toMatch(/fit no unit/);
  });

  it("absorbance beyond a photometer or far below the baseline", () => {
    expect(refused(csv({ edit: (rows) => (rows[40] = "420,12") }))[0]).toMatchObject({ line: 42, column: "absorbance", message: expect.stringMatching(/beyond any photometer/) });
    expect(refused(csv({ edit: (rows) => (rows[40] = "420,-0.9") }))[0]).toMatchObject({ line: 42, column: "absorbance", message: expect.stringMatching(/below zero/) });
  });
});

describe("absorbance points (JSON)", () => {
  it("checks the same way and names the point", () => {
    const points: [number, number][] = [];
    for (let nm = 380; nm <= 780; nm += 5) points.push([nm, band(nm)]);
    expect(checkAbsorbancePoints(points).ok).toBe(true);
    const twice: [number, number][] = [...points.slice(0, 10), points[9], ...points.slice(10)];
    const r = checkAbsorbancePoints(twice);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(problemsSentence(r.problems, "point")).toMatch(/^Point 11, column wavelength: The wavelength 425 nm is already on point 10/);
    const inCm = checkAbsorbancePoints(points.map(([nm, a]) => [1e7 / nm, a]), "cm⁻¹");
    expect(inCm.ok && inCm.report.unit).toBe("cm⁻¹");
    const wrongUnit = checkAbsorbancePoints(points, "cm⁻¹");
    expect(!wrongUnit.ok && wrongUnit.problems[0].message).toMatch(/unit given is cm⁻¹.*look like nm/);
  });
});
