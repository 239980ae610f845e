/**
 * Colour words (lib/search/colour-words.ts) and shift scoring (lib/search/shift.ts).
 * Hue checks use the CIELAB D65 coordinates of sRGB colours (IEC 61966-2-1 conversion in lib/color).
 */
import { describe, expect, it } from "vitest";
import type { Lab } from "@/lib/color/types";
import { deltaE00ForViewer } from "@/lib/color/vision";
import { ciede2000 } from "@/lib/search/ciede2000";
import { COLOUR_WORDS, colourWordsFor, findColourWord, hueAngle, matchesColourWord, prototypeLab } from "@/lib/search/colour-words";
import { colourSearchQuerySchema, hexToLabD65, shiftSearchQuerySchema } from "@/lib/search/query";
import { scoreShifts, type ShiftDye, type ShiftQuery } from "@/lib/search/shift";

describe("colour words", () => {
  it.each([
    ["ff0000", "red"],
    ["ff8000", "orange"],
    ["ffff00", "yellow"],
    ["00ff00", "green"],
    ["00ffff", "cyan"],
    ["0080ff", "blue"],
    ["8000ff", "violet"],
    ["9400d3", "violet"],
    ["ff00ff", "purple"],
    ["ffc0cb", "pink"],
    ["8b4513", "brown"],
    ["808080", "grey"],
    ["ffffff", "colourless"],
    ["000000", "black"],
  ])("#%s is called %s", (hex, word) => {
    expect(colourWordsFor(...hexToLabD65(hex)!)).toContain(word);
  });

  // Anchors: CSS Color Module Level 4 (W3C) §6.1 named colours, converted with IEC 61966-2-1.
  it.each([
    ["lemonchiffon", "fffacd", "yellow"],
    ["lightgoldenrodyellow", "fafad2", "yellow"],
    ["lightyellow", "ffffe0", "yellow"],
    ["khaki", "f0e68c", "yellow"],
    ["gold", "ffd700", "yellow"],
    ["blue", "0000ff", "blue"],
    ["mediumblue", "0000cd", "blue"],
    ["navy", "000080", "blue"],
    ["royalblue", "4169e1", "blue"],
    ["slateblue", "6a5acd", "blue"],
    ["steelblue", "4682b4", "blue"],
    ["blueviolet", "8a2be2", "violet"],
    ["indigo", "4b0082", "violet"],
    ["darkviolet", "9400d3", "violet"],
    ["darkmagenta", "8b008b", "purple"],
    ["darkorange", "ff8c00", "orange"],
  ])("CSS named colour %s (#%s) is called %s", (_name, hex, word) => {
    expect(colourWordsFor(...hexToLabD65(hex)!)).toContain(word);
  });

  it("a pale yellow of L* 92, C* 25 is yellow, and the sRGB blue primary is blue, not violet", () => {
    const h = (100 * Math.PI) / 180;
    expect(colourWordsFor(92, 25 * Math.cos(h), 25 * Math.sin(h))).toEqual(["yellow"]);
    expect(colourWordsFor(...hexToLabD65("0000ff")!)).toEqual(["blue"]);
  });

  it("gives every hue word a prototype inside its own region", () => {
    for (const w of COLOUR_WORDS) expect(matchesColourWord(w, ...prototypeLab(w)), w.word).toBe(true);
  });

  it("covers every hue exactly once among the hue words at L* 65, C* 40 (no gaps, no overlaps)", () => {
    const hueWords = COLOUR_WORDS.filter((w) => w.hue && w.word !== "pink" && w.word !== "brown");
    for (let h = 0; h < 360; h += 0.5) {
      const lab: Lab = [65, 40 * Math.cos((h * Math.PI) / 180), 40 * Math.sin((h * Math.PI) / 180)];
      const n = hueWords.filter((w) => matchesColourWord(w, ...lab)).length;
      expect(n, `hue ${h}`).toBe(1);
    }
  });

  it("never names a grey by a hue (minimum chroma)", () => {
    for (const w of COLOUR_WORDS.filter((x) => x.hue)) expect(matchesColourWord(w, 50, 3, -3)).toBe(false);
  });

  it("finds words by synonym, case-insensitively, and computes hue angles in [0, 360)", () => {
    expect(findColourWord("  Magenta ")?.word).toBe("purple");
    expect(findColourWord("gray")?.word).toBe("grey");
    expect(findColourWord("chartreuse")).toBeUndefined();
    expect(hueAngle(0, -1)).toBeCloseTo(270, 12);
    expect(hueAngle(1, 0)).toBe(0);
  });

  it("parses a word target in the search query and refuses an unknown one", () => {
    const ok = colourSearchQuerySchema.parse({ word: "violet", medium: "aprotic" });
    expect(ok.target.word?.word).toBe("violet");
    expect(ok.filter.medium).toBe("aprotic");
    expect(colourSearchQuerySchema.safeParse({ word: "plaid" }).success).toBe(false);
  });
});

const colour = (lab: Lab, solventId = "s1") => ({ lab, solventId, payload: null });
const BASE: ShiftQuery = { minShift: 0, sameSolvent: false, viewers: [], viewerMinShift: 10 };
const noViewer = () => {
  throw new Error("no viewer check expected");
};

describe("scoreShifts", () => {
  const yellow: Lab = [85, 0, 80];
  const violet: Lab = [40, 45, -50];
  const grey: Lab = [50, 0, 0];
  const dyes: ShiftDye<null>[] = [
    { dyeId: "big", a: [colour(yellow), colour(grey, "s2")], b: [colour(violet), colour(grey, "s2")] },
    { dyeId: "small", a: [colour([50, 5, 5])], b: [colour([52, 6, 4])] },
    { dyeId: "none-b", a: [colour(grey)], b: [] },
  ];

  it("ranks by the largest shift when no colours are asked for, with the exact ΔE00 of the chosen pair", () => {
    const { results, failures } = scoreShifts(dyes, BASE, noViewer);
    expect(results.map((r) => r.dyeId)).toEqual(["big", "small"]);
    expect(results[0].shift).toBe(ciede2000(...yellow, ...violet));
    expect(failures).toEqual([{ dyeId: "none-b", reason: "No accepted colour under the second condition.", best: null }]);
  });

  it("applies the minimum shift and says what the largest shift was", () => {
    const { results, failures } = scoreShifts(dyes, { ...BASE, minShift: 5 }, noViewer);
    expect(results.map((r) => r.dyeId)).toEqual(["big"]);
    expect(failures.find((f) => f.dyeId === "small")?.reason).toMatch(/Largest shift is ΔE00 \d+\.\d, below the minimum 5/);
  });

  it("with targets at both ends, picks the pair closest to X in A and Y in B", () => {
    const { results } = scoreShifts(dyes, { ...BASE, from: yellow, to: violet }, noViewer);
    expect(results[0]).toMatchObject({ dyeId: "big", fromDeltaE00: 0, toDeltaE00: 0 });
    const reversed = scoreShifts(dyes, { ...BASE, from: grey, to: grey }, noViewer).results.find((r) => r.dyeId === "big")!;
    expect(reversed.a.lab).toEqual(grey);
    expect(reversed.b.lab).toEqual(grey);
  });

  it("pairs within one solvent when asked", () => {
    const { results } = scoreShifts(dyes, { ...BASE, sameSolvent: true }, noViewer);
    const big = results.find((r) => r.dyeId === "big")!;
    expect(big.a.solventId).toBe(big.b.solventId);
    expect(big.shift).toBe(ciede2000(...yellow, ...violet));
    const other = scoreShifts([{ dyeId: "x", a: [colour(grey, "s1")], b: [colour(violet, "s2")] }], { ...BASE, sameSolvent: true }, noViewer);
    expect(other.failures[0].reason).toMatch(/same solvent/);
  });

  it("fails a red–green shift for protan and deutan viewers with the reason, and keeps a yellow–violet one (Machado 2009 simulation)", () => {
    const red = hexToLabD65("b06040")!;
    const green = hexToLabD65("708040")!;
    const pairs: ShiftDye<null>[] = [
      { dyeId: "red-green", a: [colour(red)], b: [colour(green)] },
      { dyeId: "yellow-violet", a: [colour(yellow)], b: [colour(violet)] },
    ];
    const q: ShiftQuery = { ...BASE, viewers: ["protan", "deutan"], viewerMinShift: 10 };
    const { results, failures } = scoreShifts(pairs, q, deltaE00ForViewer);
    // #b06040 → #708040: ΔE00 ≈ 34 for normal vision, ≈ 8.5 protan and ≈ 1.5 deutan (computed here, not published)
    expect(ciede2000(...red, ...green)).toBeGreaterThan(20);
    expect(results.map((r) => r.dyeId)).toEqual(["yellow-violet"]);
    expect(results[0].viewers.every((v) => v.passes && v.deltaE00 >= 10)).toBe(true);
    expect(failures[0].dyeId).toBe("red-green");
    expect(failures[0].reason).toMatch(/for (protan|deutan) viewers/);
    expect(failures[0].best?.viewers.some((v) => !v.passes)).toBe(true);
  });

  it("parses the shift query with its defaults and refuses bad viewers", () => {
    const q = shiftSearchQuerySchema.parse({ aMedium: "protic", bMedium: "aprotic", from: "violet", viewers: "protan,tritan" });
    expect(q.a.medium).toBe("protic");
    expect(q.query.from).toEqual(prototypeLab(findColourWord("violet")!));
    expect(q.query.viewers).toEqual(["protan", "tritan"]);
    expect(q.query.minShift).toBe(0);
    const bad = shiftSearchQuerySchema.safeParse({ viewers: "owl" });
    expect(bad.success).toBe(false);
    expect(shiftSearchQuerySchema.safeParse({ from: "not a colour" }).success).toBe(false);
  });
});
