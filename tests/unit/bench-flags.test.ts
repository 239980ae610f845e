/**
 * The words shown for quality flag codes (lib/bench/flags.ts). No published source: the rules are the
 * product's (people read words, not codes; short words fit the bench table's Flags column).
 */
import { describe, expect, it } from "vitest";
import { FLAG_WORDS, flagWords } from "@/lib/bench/flags";

describe("flag words", () => {
  it("gives every known code words, not a hyphenated code, short enough for the Flags column", () => {
    const codeLike = /^[a-z0-9]+(-[a-z0-9]+)+$/;
    for (const [code, words] of Object.entries(FLAG_WORDS)) {
      expect(words.short, code).not.toMatch(codeLike);
      expect(words.long, code).not.toMatch(codeLike);
      // 16 characters of text-xs fit the 7.5rem column on one line (measured in tests/e2e/bench-day.test.ts).
      expect(words.short.length, code).toBeLessThanOrEqual(16);
    }
  });

  it("shows an unknown code with spaces rather than hiding it", () => {
    expect(flagWords("some-new-flag")).toEqual({ short: "some new flag", long: "some new flag" });
    expect(flagWords("non-uniform").long).toMatch(/not one colour/);
  });
});
