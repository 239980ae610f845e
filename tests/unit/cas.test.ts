import { describe, expect, it } from "vitest";
import { casCheckDigit, checkCasNumber } from "@/lib/chem/cas";

// Source: CAS, "CAS Registry Number" check-digit rule (cas.org), worked example for water 7732-18-5.
describe("CAS Registry Number check digit", () => {
  it("accepts water 7732-18-5 (the CAS worked example)", () => {
    expect(casCheckDigit("773218")).toBe(5);
    expect(checkCasNumber("7732-18-5")).toEqual({ ok: true, normalized: "7732-18-5" });
  });

  it("accepts ethanol 64-17-5", () => {
    expect(casCheckDigit("6417")).toBe(5);
    expect(checkCasNumber(" 64-17-5 ").ok).toBe(true);
  });

  it("accepts a 7-digit first group: DMSO 67-68-5 and sucrose 57-50-1 (CAS numbers from the suppliers' SDS, from memory)", () => {
    expect(checkCasNumber("67-68-5").ok).toBe(true);
    expect(checkCasNumber("57-50-1").ok).toBe(true);
  });

  it("rejects a wrong check digit with the expected one in the message", () => {
    const result = checkCasNumber("7732-18-4");
    expect(result.ok).toBe(false);
    if (!result.ok) expect(result.reason).toContain("should be 5");
  });

  it("rejects malformed numbers", () => {
    for (const bad of ["7732185", "7732-18", "77-3218-5", "12345678-12-3", "abc-de-f", ""]) {
      expect(checkCasNumber(bad).ok, bad).toBe(false);
    }
  });
});
