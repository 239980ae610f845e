import { describe, expect, it } from "vitest";
import { colorTargetSchema, hexToLabD65 } from "@/lib/search/query";
import { casNumberSchema, dyeEditSchema, emailSchema, inviteSchema, newPasswordSchema, nextPathSchema, signInSchema } from "@/lib/validation/schemas";

describe("input schemas", () => {
  it("normalises e-mail addresses and refuses malformed ones", () => {
    expect(emailSchema.parse("  Chemist@Demo.TEST ")).toBe("chemist@demo.test");
    expect(emailSchema.safeParse("not-an-address").success).toBe(false);
  });

  it("keeps post-sign-in redirects on this site", () => {
    expect(nextPathSchema.parse("/catalogue")).toBe("/catalogue");
    expect(nextPathSchema.parse("//evil.example")).toBe("/");
    expect(nextPathSchema.parse("https://evil.example")).toBe("/");
    expect(nextPathSchema.parse(undefined)).toBe("/");
  });

  it("requires both password fields to agree and at least 10 characters", () => {
    const token = "x".repeat(30);
    expect(newPasswordSchema.safeParse({ token, password: "short", confirm: "short" }).success).toBe(false);
    const differ = newPasswordSchema.safeParse({ token, password: "long enough one", confirm: "long enough two" });
    expect(differ.success).toBe(false);
    if (!differ.success) expect(differ.error.issues[0].path).toEqual(["confirm"]);
    expect(newPasswordSchema.safeParse({ token, password: "long enough one", confirm: "long enough one" }).success).toBe(true);
  });

  it("accepts only the three roles in an invitation", () => {
    expect(inviteSchema.safeParse({ email: "a@b.test", name: "A", role: "chemist" }).success).toBe(true);
    expect(inviteSchema.safeParse({ email: "a@b.test", name: "A", role: "owner" }).success).toBe(false);
  });

  it("validates CAS numbers with the check digit (CAS rule; water 7732-18-5)", () => {
    expect(casNumberSchema.parse("7732-18-5")).toBe("7732-18-5");
    expect(casNumberSchema.parse("")).toBeNull();
    expect(casNumberSchema.safeParse("7732-18-6").success).toBe(false);
  });

  it("parses dye edits: molar mass positive, synonyms split", () => {
    const ok = dyeEditSchema.parse({ name: "X", dyeClass: "azo", casNumber: "", molarMass: "327.33", synonyms: "a, b;c", notes: "", hazards: "" });
    expect(ok.molarMass).toBe(327.33);
    expect(ok.synonyms).toEqual(["a", "b", "c"]);
    expect(dyeEditSchema.safeParse({ name: "X", dyeClass: "azo", casNumber: "", molarMass: "-3", synonyms: "", notes: "", hazards: "" }).success).toBe(false);
  });

  it("signs in only with both fields", () => {
    expect(signInSchema.safeParse({ email: "a@b.test", password: "" }).success).toBe(false);
  });

  it("reads a colour target as Lab or hex, and says what is wrong otherwise", () => {
    expect(colorTargetSchema.parse({ lab: "40,45,-50" }).lab).toEqual([40, 45, -50]);
    // sRGB white ffffff is D65 white: L* = 100, a* = b* = 0 (IEC 61966-2-1 white point is D65).
    const white = colorTargetSchema.parse({ hex: "ffffff" }).lab;
    expect(white[0]).toBeCloseTo(100, 2);
    expect(Math.abs(white[1])).toBeLessThan(0.01);
    expect(Math.abs(white[2])).toBeLessThan(0.01);
    expect(colorTargetSchema.safeParse({ lab: "40,45" }).success).toBe(false);
    expect(colorTargetSchema.safeParse({ lab: "140,0,0" }).success).toBe(false);
    expect(colorTargetSchema.safeParse({ hex: "12345" }).success).toBe(false);
    expect(colorTargetSchema.safeParse({}).success).toBe(false);
    expect(hexToLabD65("zzzzzz")).toBeNull();
  });
});
