import { describe, expect, it } from "vitest";
import { gaussian, mulberry32 as rng } from "@/lib/random";
import { ColorInputError } from "@/lib/color/errors";
import { WHITE_POINTS_2DEG, type WhitePointName } from "@/lib/color/illuminants";
import {
  absorbanceToXyz,
  illuminantWhiteXyz,
  interpolateAt,
  lambdaMax,
  parseAbsorbanceCsv,
  spectrumColour,
  transitionEnergyKcalMol,
  transmittanceToXyz,
} from "@/lib/color/spectrum";

/** CIE 015:2018 tabulates the white points to 3 decimals; the 1 nm summation must agree within 0.01. */
const WHITE_TOL = 0.01;

describe("CIE 015:2018 summation at 1 nm, CIE 1931 2° observer (tables in tests/fixtures from the CIE)", () => {
  it.each(["D65", "D50", "A"] as WhitePointName[])("a perfect transmitter under %s gives the CIE 015 white point (Table 9.1)", (ill) => {
    const xyz = transmittanceToXyz(() => 1, ill);
    const expected = WHITE_POINTS_2DEG[ill];
    for (let c = 0; c < 3; c++) expect(Math.abs(xyz[c] - expected[c])).toBeLessThan(WHITE_TOL);
    expect(xyz[1]).toBeCloseTo(100, 10);
  });

  it("D65 white is 95.047, 100, 108.883 within 0.01 (CIE 015:2018 Table 9.1)", () => {
    const [x, y, z] = illuminantWhiteXyz("D65");
    expect(Math.abs(x - 95.047)).toBeLessThan(WHITE_TOL);
    expect(Math.abs(y - 100)).toBeLessThan(WHITE_TOL);
    expect(Math.abs(z - 108.883)).toBeLessThan(WHITE_TOL);
  });

  it.each(["D65", "D50", "A"] as WhitePointName[])("a flat absorbance gives a neutral colour under %s (a* = b* = 0, Y = 100·10^(−A))", (ill) => {
    const flat = { wavelengths: [380, 780], values: [0.3, 0.3] };
    const colour = spectrumColour(flat, ill);
    expect(colour.xyz[1]).toBeCloseTo(100 * 10 ** -0.3, 8);
    expect(Math.abs(colour.lab[1])).toBeLessThan(1e-9);
    expect(Math.abs(colour.lab[2])).toBeLessThan(1e-9);
    // L* of Y/Yn = 10^(−0.3) by CIE 015 eq. 8.1: 116 (0.501187)^(1/3) − 16.
    expect(colour.lab[0]).toBeCloseTo(116 * Math.cbrt(10 ** -0.3) - 16, 8);
  });

  it("the perfect transmitter is L* = 100, a* = b* = 0 relative to the illuminant's own white", () => {
    const c = spectrumColour({ wavelengths: [360, 830], values: [0, 0] }, "A");
    expect(c.lab[0]).toBeCloseTo(100, 10);
    expect(Math.abs(c.lab[1]) + Math.abs(c.lab[2])).toBeLessThan(1e-9);
    expect(c.hex).toBe("#ffffff");
  });

  it("Beer–Lambert: --scale k is the same as absorbance multiplied by k", () => {
    const s = { wavelengths: [400, 500, 550, 600, 700], values: [0.1, 0.8, 1.2, 0.5, 0.05] };
    const doubled = { wavelengths: s.wavelengths, values: s.values.map((v) => 2 * v) };
    const a = absorbanceToXyz(s, "D65", 2);
    const b = absorbanceToXyz(doubled, "D65");
    for (let c = 0; c < 3; c++) expect(a[c]).toBeCloseTo(b[c], 10);
    // A band at 550 nm absorbs green: the solution looks magenta (a* > 0) and darker when more concentrated.
    const one = spectrumColour(s, "D65");
    const two = spectrumColour(s, "D65", 2);
    expect(one.lab[1]).toBeGreaterThan(10);
    expect(two.lab[0]).toBeLessThan(one.lab[0]);
  });

  it("interpolates linearly to 1 nm and holds the end values outside the measured range", () => {
    const s = { wavelengths: [400, 410, 430], values: [1, 2, 0] };
    expect(interpolateAt(s, 405)).toBeCloseTo(1.5, 12);
    expect(interpolateAt(s, 420)).toBeCloseTo(1, 12);
    expect(interpolateAt(s, 360)).toBe(1);
    expect(interpolateAt(s, 830)).toBe(0);
  });
});

describe("λmax and transition energy", () => {
  it("finds the vertex of a sampled parabola exactly, between samples (uneven spacing too)", () => {
    const peak = 551.3;
    const wavelengths = [500, 520, 540, 545, 560, 580, 600];
    const s = { wavelengths, values: wavelengths.map((w) => 1 - ((w - peak) / 80) ** 2) };
    expect(lambdaMax(s)!).toBeCloseTo(peak, 9);
  });

  it("ignores a stronger UV band and takes the visible band's maximum", () => {
    const wavelengths = Array.from({ length: 56 }, (_, i) => 250 + 10 * i);
    const values = wavelengths.map((w) => 2 * Math.exp(-(((w - 280) / 20) ** 2)) + 0.8 * Math.exp(-(((w - 603) / 40) ** 2)));
    expect(Math.abs(lambdaMax({ wavelengths, values })! - 603)).toBeLessThan(1);
  });

  it("takes the longest-wavelength visible band, not a stronger near-UV band at 372 nm (E_T(30) definition, Reichardt 1994)", () => {
    // 1 nm data with noise; the band at 372 nm is 1.8× stronger than the visible charge-transfer band at 520 nm.
    const random = rng(11);
    const wavelengths = Array.from({ length: 551 }, (_, i) => 300 + i);
    const values = wavelengths.map(
      (w) => 1.8 * Math.exp(-(((w - 372) / 25) ** 2)) + 1.0 * Math.exp(-(((w - 520) / 45) ** 2)) + 0.002 * gaussian(random),
    );
    const peak = lambdaMax({ wavelengths, values });
    expect(peak).not.toBeNull();
    expect(Math.abs(peak! - 520)).toBeLessThan(2);
    const colour = spectrumColour({ wavelengths, values }, "D65");
    expect(Math.abs(colour.transitionEnergyKcalMol! - 28591 / 520)).toBeLessThan(0.3);
    // The old "strongest band" rule would have reported 372 nm, E_T ≈ 77 kcal/mol.
    expect(colour.transitionEnergyKcalMol!).toBeLessThan(60);
  });

  it("a rising UV tail only (no band maximum in the visible) gives λmax null and E_T null", () => {
    const random = rng(12);
    const wavelengths = Array.from({ length: 481 }, (_, i) => 300 + i);
    const values = wavelengths.map((w) => 2.5 * Math.exp(-(w - 300) / 30) + 0.002 * gaussian(random));
    expect(lambdaMax({ wavelengths, values })).toBeNull();
    const colour = spectrumColour({ wavelengths, values }, "D65");
    expect(colour.lambdaMaxNm).toBeNull();
    expect(colour.transitionEnergyKcalMol).toBeNull();
    // A band maximum at the edge of the measured range is not a band either.
    expect(lambdaMax({ wavelengths: [400, 450, 500], values: [1, 0.6, 0.2] })).toBeNull();
  });

  it("a weak visible band far longer than a strong one still counts; noise wiggles on a shoulder do not", () => {
    const random = rng(13);
    const wavelengths = Array.from({ length: 401 }, (_, i) => 380 + i);
    const values = wavelengths.map((w) => 1.2 * Math.exp(-(((w - 450) / 30) ** 2)) + 0.15 * Math.exp(-(((w - 640) / 30) ** 2)) + 0.002 * gaussian(random));
    expect(Math.abs(lambdaMax({ wavelengths, values })! - 640)).toBeLessThan(3);
    const single = wavelengths.map((w) => 1.2 * Math.exp(-(((w - 450) / 30) ** 2)) + 0.002 * gaussian(random));
    expect(Math.abs(lambdaMax({ wavelengths, values: single })! - 450)).toBeLessThan(2);
  });

  it("E_T = 28591/λmax kcal/mol (Reichardt, Chem. Rev. 94 (1994) 2319): 453 nm → 63.1", () => {
    expect(transitionEnergyKcalMol(453)).toBeCloseTo(63.115, 3);
    const c = spectrumColour({ wavelengths: [400, 450, 500], values: [0.2, 1, 0.2] }, "D65");
    expect(c.lambdaMaxNm).toBeCloseTo(450, 9);
    expect(c.transitionEnergyKcalMol).toBeCloseTo(28591 / 450, 9);
  });
});

describe("absorbance CSV", () => {
  it("reads the header, any column order, CRLF, a BOM and blank lines, and sorts by wavelength", () => {
    const s = parseAbsorbanceCsv("\uFEFFabsorbance,wavelength_nm,note\r\n0.5,500,a\r\n\r\n0.25,400,b\r\n");
    expect(s).toEqual({ wavelengths: [400, 500], values: [0.25, 0.5] });
  });

  it.each([
    ["", /empty/],
    ["wavelength,abs\n400,1\n500,2\n", /header/],
    ["wavelength_nm,absorbance\n400,1\n", /fewer than two/],
    ["wavelength_nm,absorbance\n400,1\n500,0,4\n", /Line 3/],
    ["wavelength_nm,absorbance\n400,abc\n500,1\n", /Line 2.*"abc"/],
    ["wavelength_nm,absorbance\n400,1\n500\n", /Line 3.*no absorbance/],
    ["wavelength_nm,absorbance\n400,1\n400,2\n", /twice/],
    ["wavelength_nm,absorbance\n100,1\n200,2\n", /outside the visible/],
    ["wavelength_nm,absorbance\n0x10,1\n500,2\n", /Line 2/],
  ])("refuses %j with a clear sentence", (text, message) => {
    expect(() => parseAbsorbanceCsv(text)).toThrow(ColorInputError);
    expect(() => parseAbsorbanceCsv(text)).toThrow(message);
  });

  it("refuses a negative or non-finite scale", () => {
    const s = { wavelengths: [400, 500], values: [0.1, 0.2] };
    expect(() => spectrumColour(s, "D65", -1)).toThrow(ColorInputError);
    expect(() => spectrumColour(s, "D65", Number.NaN)).toThrow(ColorInputError);
  });
});
