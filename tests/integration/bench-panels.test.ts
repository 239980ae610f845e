/**
 * Solvent panels and the condition look-up: a panel keeps its ordered solvents and conditions; a
 * condition is reused only when every recorded field is the same (temperature, path length, blend,
 * acid/base amount), so replicates are only ever compared within one condition.
 */
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { deletePanelAction, savePanelAction } from "@/app/actions/bench";
import { db } from "@/db/client";
import { conditionFor, findCondition, listSolventPanels } from "@/db/queries/bench";
import { auditLog } from "@/db/schema";
import { actAs, buildWorld, form, PEOPLE } from "../support/world";

beforeAll(async () => {
  await buildWorld();
}, 60_000);

const entry = (solventId: string, extra: Record<string, unknown> = {}) => ({ solventId, acidBase: "neutral", ph: null, additive: "", additiveConcentrationMolL: null, temperatureC: 23, pathLengthMm: 10, secondSolventId: null, secondSolventMoleFraction: null, ...extra });

describe("solvent panels", () => {
  it("saves an ordered panel with its conditions, replaces it under the same name, deletes it, with audit entries", async () => {
    await actAs("chemist");
    const entries = [entry("solv-methanol"), entry("solv-water", { acidBase: "acid", ph: 2, additive: "HCl", additiveConcentrationMolL: 0.01 }), entry("solv-ethanol", { secondSolventId: "solv-water", secondSolventMoleFraction: 0.25 })];
    const saved = await savePanelAction(null, form({ payload: JSON.stringify({ name: "Three", entries }) }));
    expect(saved?.ok).toBe(true);
    const panel = listSolventPanels(db()).find((p) => p.name === "Three")!;
    expect(panel.entries.map((e) => e.solventId)).toEqual(["solv-methanol", "solv-water", "solv-ethanol"]);
    expect(panel.entries[1]).toMatchObject({ acidBase: "acid", ph: 2, additive: "HCl", additiveConcentrationMolL: 0.01 });
    expect(panel.entries[2]).toMatchObject({ secondSolventId: "solv-water", secondSolventMoleFraction: 0.25 });
    await savePanelAction(null, form({ payload: JSON.stringify({ name: "Three", entries: entries.slice(0, 1) }) }));
    expect(listSolventPanels(db()).find((p) => p.name === "Three")!.entries).toHaveLength(1);
    expect((await deletePanelAction(null, form({ id: panel.id })))?.ok).toBe(true);
    const actions = db().select({ a: auditLog.action }).from(auditLog).where(eq(auditLog.entityId, panel.id)).all().map((r) => r.a);
    expect(actions).toEqual(["solvent-panel.create", "solvent-panel.update", "solvent-panel.delete"]);
  });

  it("refuses a blend without its mole fraction, an amount without the acid named, and an unknown solvent, in words", async () => {
    await actAs("chemist");
    const noX = await savePanelAction(null, form({ payload: JSON.stringify({ name: "Bad", entries: [entry("solv-ethanol", { secondSolventId: "solv-water" })] }) }));
    expect(noX?.message).toMatch(/mole fraction, between 0 and 1/);
    const noAcid = await savePanelAction(null, form({ payload: JSON.stringify({ name: "Bad", entries: [entry("solv-water", { additiveConcentrationMolL: 0.1 })] }) }));
    expect(noAcid?.message).toMatch(/Name the acid or base/);
    const unknown = await savePanelAction(null, form({ payload: JSON.stringify({ name: "Bad", entries: [entry("solv-nope")] }) }));
    expect(unknown?.message).toMatch(/not in the solvent table/);
    expect(listSolventPanels(db()).some((p) => p.name === "Bad")).toBe(false);
    await actAs("formulator");
    expect((await savePanelAction(null, form({ payload: JSON.stringify({ name: "F", entries: [entry("solv-water")] }) })))?.code).toBe("forbidden");
  });
});

describe("solvent panels have an owner, like rack layouts", () => {
  it("another chemist can neither overwrite nor delete a panel; its owner and an admin can, each change audited", async () => {
    const panel = (name: string, n: number) => form({ payload: JSON.stringify({ name, entries: ["solv-methanol", "solv-ethanol", "solv-water"].slice(0, n).map((id) => entry(id)) }) });
    await actAs("chemist");
    const saved = await savePanelAction(null, panel("Owned", 3));
    expect(saved).toMatchObject({ ok: true });
    const id = (saved?.data as { id: string }).id;

    await actAs("chemist2");
    const overwrite = await savePanelAction(null, panel("Owned", 1));
    expect(overwrite).toMatchObject({ ok: false, code: "forbidden" });
    expect(overwrite?.message).toMatch(/The panel “Owned” belongs to Test Chemist; only they or an admin may change or delete it/);
    expect(await deletePanelAction(null, form({ id }))).toMatchObject({ ok: false, code: "forbidden" });
    expect(listSolventPanels(db()).find((p) => p.id === id)?.entries).toHaveLength(3);

    await actAs("chemist");
    expect(await savePanelAction(null, panel("Owned", 2))).toMatchObject({ ok: true });
    await actAs("admin");
    expect(await savePanelAction(null, panel("Owned", 1))).toMatchObject({ ok: true });
    expect(listSolventPanels(db()).find((p) => p.id === id)?.entries).toHaveLength(1);
    expect(await deletePanelAction(null, form({ id }))).toMatchObject({ ok: true });
    const log = db().select({ a: auditLog.action, who: auditLog.actorId }).from(auditLog).where(eq(auditLog.entityId, id)).all();
    expect(log).toEqual([
      { a: "solvent-panel.create", who: PEOPLE.chemist.id },
      { a: "solvent-panel.update", who: PEOPLE.chemist.id },
      { a: "solvent-panel.update", who: PEOPLE.admin.id },
      { a: "solvent-panel.delete", who: PEOPLE.admin.id },
    ]);
  });
});

describe("conditions are matched on every recorded field", () => {
  it("reuses a condition only when temperature, path length, blend and acid amount are all the same", () => {
    const handle = db();
    const base = { solventId: "solv-methanol", acidBase: "neutral" as const, ph: null, concentrationUmolL: 20, temperatureC: 25, pathLengthMm: 10 };
    const id = handle.transaction((tx) => conditionFor(tx, PEOPLE.chemist.id, base));
    expect(findCondition(handle, base)).toBe(id);
    expect(handle.transaction((tx) => conditionFor(tx, PEOPLE.chemist.id, { ...base }))).toBe(id);
    expect(findCondition(handle, { ...base, temperatureC: 40 })).toBeUndefined();
    expect(findCondition(handle, { ...base, pathLengthMm: 1 })).toBeUndefined();
    expect(findCondition(handle, { ...base, secondSolventId: "solv-water", secondSolventMoleFraction: 0.1 })).toBeUndefined();
    expect(findCondition(handle, { ...base, additive: "HCl", additiveConcentrationMolL: 0.01 })).toBeUndefined();
    const blend = handle.transaction((tx) => conditionFor(tx, PEOPLE.chemist.id, { ...base, secondSolventId: "solv-water", secondSolventMoleFraction: 0.1 }));
    expect(blend).not.toBe(id);
    expect(findCondition(handle, { ...base, secondSolventId: "solv-water", secondSolventMoleFraction: 0.1 })).toBe(blend);
  });
});
