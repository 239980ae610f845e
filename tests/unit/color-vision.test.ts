import { filterDeficiencyDeuter, filterDeficiencyProt, filterDeficiencyTrit } from "culori";
import { describe, expect, it } from "vitest";
import { labToLinearSrgb } from "@/lib/color/convert";
import { deltaE00 } from "@/lib/color/difference";
import { srgbEncode } from "@/lib/color/srgb";
import type { Lab } from "@/lib/color/types";
import { deltaE00ForViewer, simulateViewerLab, type ViewerKind } from "@/lib/color/vision";

const KINDS: ViewerKind[] = ["protan", "deutan", "tritan"];

describe("colour-vision check (Machado, Oliveira & Fernandes, IEEE TVCG 15 (2009) 1291, via culori)", () => {
  it.each(KINDS)("%s: a neutral grey looks the same (each row of the Machado matrices sums to 1)", (kind) => {
    const seen = simulateViewerLab([60, 0, 0], kind);
    expect(seen[0]).toBeCloseTo(60, 2);
    expect(Math.hypot(seen[1], seen[2])).toBeLessThan(0.3);
  });

  it("a red–green pair that is far apart for normal vision nearly merges for protan and deutan viewers, not for tritan", () => {
    // Two colours of similar lightness on the red–green axis (chosen for the test).
    const red: Lab = [55, 45, 30];
    const green: Lab = [55, -40, 35];
    const normal = deltaE00(red, green);
    expect(normal).toBeGreaterThan(40);
    expect(deltaE00ForViewer(red, green, "protan")).toBeLessThan(normal / 3);
    expect(deltaE00ForViewer(red, green, "deutan")).toBeLessThan(normal / 3);
    expect(deltaE00ForViewer(red, green, "tritan")).toBeGreaterThan(normal / 2);
  });

  it("a blue–green pair confused along the tritan line shrinks most for the tritan viewer", () => {
    const blue: Lab = [60, -20, -30];
    const green: Lab = [60, -30, 10];
    const tritan = deltaE00ForViewer(blue, green, "tritan");
    expect(tritan).toBeLessThan(deltaE00ForViewer(blue, green, "protan"));
    expect(tritan).toBeLessThan(deltaE00(blue, green) / 2);
  });

  it.each([
    ["protan", filterDeficiencyProt(1)],
    ["deutan", filterDeficiencyDeuter(1)],
    ["tritan", filterDeficiencyTrit(1)],
  ] as const)("%s agrees with culori's own filter on an in-gamut colour", (kind, filter) => {
    const lab: Lab = [50, 30, -20];
    const lin = labToLinearSrgb(lab, "D65");
    const expected = filter({ mode: "rgb", r: srgbEncode(lin[0]), g: srgbEncode(lin[1]), b: srgbEncode(lin[2]) });
    const seen = labToLinearSrgb(simulateViewerLab(lab, kind), "D65").map(srgbEncode);
    expect(seen[0]).toBeCloseTo(expected.r, 9);
    expect(seen[1]).toBeCloseTo(expected.g, 9);
    expect(seen[2]).toBeCloseTo(expected.b, 9);
  });
});
