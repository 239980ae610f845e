import { beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { updateSolventAction } from "@/app/actions/solvents";
import { db } from "@/db/client";
import { auditLog, solvents } from "@/db/schema";
import { actAs, buildWorld, form } from "../support/world";

beforeAll(async () => {
  await buildWorld();
});

const methanolEdit = (over: Record<string, string> = {}) =>
  form({
    id: "solv-methanol",
    medium: "protic",
    mediumSource: "O–H donor",
    cautions: "Toxic; flammable.",
    et30Value: "55.5",
    et30Source: "Reichardt 1994, Table 4",
    alphaValue: "0.98",
    alphaSource: "Marcus 1993",
    betaValue: "0.66",
    betaSource: "Marcus 1993",
    piStarValue: "0.60",
    piStarSource: "Marcus 1993",
    permittivityValue: "32.61",
    permittivitySource: "Lide 1995",
    ...over,
  });

describe("editing the solvent table", () => {
  it.each(["anonymous", "chemist", "formulator", "retired"] as const)("is refused to %s", async (who) => {
    await actAs(who);
    const state = await updateSolventAction(null, methanolEdit());
    expect(state).toMatchObject({ ok: false, code: who === "anonymous" || who === "retired" ? "unauthenticated" : "forbidden" });
  });

  it("lets an admin change a value with its source, recomputes ETN and records before/after", async () => {
    await actAs("admin");
    const before = db().select().from(solvents).where(eq(solvents.id, "solv-methanol")).get()!;
    const state = await updateSolventAction(null, methanolEdit());
    expect(state).toMatchObject({ ok: true });
    const after = db().select().from(solvents).where(eq(solvents.id, "solv-methanol")).get()!;
    expect(after.et30).toBe(55.5);
    expect(after.etn).toBeCloseTo((55.5 - 30.7) / 32.4, 12);
    expect(after.et30Source).toBe("Reichardt 1994, Table 4");
    const entry = db().select().from(auditLog).where(eq(auditLog.entityId, "solv-methanol")).all().at(-1)!;
    expect((entry.before as { et30: number }).et30).toBe(before.et30);
    expect((entry.after as { et30: number }).et30).toBe(55.5);
  });

  it("refuses a value without a source, or out of range, and changes nothing", async () => {
    await actAs("admin");
    const noSource = await updateSolventAction(null, methanolEdit({ et30Value: "56", et30Source: "" }));
    expect(noSource).toMatchObject({ ok: false, code: "invalid_input" });
    expect(noSource?.fieldErrors?.et30Source?.[0]).toMatch(/source/);
    const outOfRange = await updateSolventAction(null, methanolEdit({ alphaValue: "7" }));
    expect(outOfRange?.fieldErrors?.alphaValue?.[0]).toMatch(/α must be a number/);
    expect(db().select().from(solvents).where(eq(solvents.id, "solv-methanol")).get()!.et30).toBe(55.5);
  });
});
