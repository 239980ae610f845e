/** Typo-tolerant text search over dyes (fuse.js): names, codes, synonyms, CAS numbers, classes, notes. */
import { describe, expect, it } from "vitest";
import { searchDyesByText, type SearchableDye } from "@/lib/search/text";

// Invented dyes; the CAS numbers are real registry numbers used only as strings here
// (10081-39-7 Reichardt's dye, 76-59-5 bromothymol blue) — check digits valid, from memory.
const DYES: SearchableDye[] = [
  { id: "1", code: "KB-BT-107", name: "Tidewater Betaine 1", synonyms: ["TB-1"], casNumber: "10081-39-7", dyeClass: "betaine", notes: "Strongly negative solvatochromism." },
  { id: "2", code: "KB-SP-205", name: "Harbour Sulfonephthalein A", synonyms: ["HSA"], casNumber: "76-59-5", dyeClass: "sulfonephthalein", notes: "Yellow in acid, blue in base." },
  { id: "3", code: "KB-MC-135", name: "Estuary Merocyanine A", synonyms: ["EMA", "Brook red"], casNumber: null, dyeClass: "merocyanine", notes: "Positive solvatochromism in nonpolar media." },
];
const codes = (q: string) => searchDyesByText(DYES, q).map((d) => d.code);

describe("searchDyesByText", () => {
  it.each([
    ["Tidewatr Betain", "KB-BT-107"],
    ["merocyanin", "KB-MC-135"],
    ["sulfonphthalein", "KB-SP-205"],
    ["Brok red", "KB-MC-135"],
    ["kb-sp-205", "KB-SP-205"],
    ["76-59-5", "KB-SP-205"],
    ["10081397", "KB-BT-107"],
    ["solvatochromizm", "KB-BT-107"],
  ])("finds %s → %s first", (q, code) => {
    expect(codes(q)[0]).toBe(code);
  });

  it("does not match everything for an unrelated word", () => {
    expect(codes("zirconium")).toEqual([]);
  });

  it("returns the whole list for an empty query, up to the limit", () => {
    expect(searchDyesByText(DYES, "  ", 2)).toHaveLength(2);
  });
});
