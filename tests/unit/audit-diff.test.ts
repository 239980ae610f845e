// How an audit entry's before/after is shown to an admin: changed fields only, secrets hidden.
// Presentation rules of Solvatlas (common practice, no source); the values are stored records as recordAudit writes them.
import { describe, expect, it } from "vitest";
import { auditDiff, fieldWords } from "@/lib/audit/diff";

describe("audit before/after as a readable difference", () => {
  it("lists only the fields that changed, in words, values as stored", () => {
    const before = { id: "dye_x", name: "Kestrel Azo 11", casNumber: null, molarMass: 327.3, synonyms: ["KA11"], updatedAt: "2026-01-01" };
    const after = { id: "dye_x", name: "Kestrel Azo 11", casNumber: "7732-18-5", molarMass: 327.33, synonyms: ["KA11", "K-11"], updatedAt: "2026-02-01" };
    expect(auditDiff(before, after)).toEqual([
      { field: "cas number", before: "—", after: "7732-18-5" },
      { field: "molar mass", before: "327.3", after: "327.33" },
      { field: "synonyms", before: "KA11", after: "KA11, K-11" },
    ]);
  });

  it("shows a creation as every field going from nothing to its value", () => {
    expect(auditDiff(null, { name: "Spring batch", notes: "" })).toEqual([{ field: "name", before: "—", after: "Spring batch" }]);
  });

  it("names a changed secret but never shows it", () => {
    expect(auditDiff({ passwordHashVersion: 1, tokenPrefix: "abc" }, { passwordHashVersion: 2, tokenPrefix: "def" })).toEqual([
      { field: "password hash version", before: "(hidden)", after: "(changed)" },
      { field: "token prefix", before: "(hidden)", after: "(changed)" },
    ]);
  });

  it("reports no change when nothing but bookkeeping moved", () => {
    expect(auditDiff({ a: 1, updatedAt: 1 }, { a: 1, updatedAt: 2 })).toEqual([]);
  });

  it("spaces stored names for reading", () => {
    expect(fieldWords("ktPiStar")).toBe("kt pi star");
    expect(fieldWords("second_solvent_id")).toBe("second solvent id");
  });
});
