/**
 * Review rules through the real server action: a second person decides, never the author; a
 * formulator cannot; a rejection needs a note; a decision is made once; the author is e-mailed
 * (local mailbox, DATA_DIR/mailbox); only accepted measurements reach search (the Lab R*Tree).
 */
import { beforeAll, describe, expect, it } from "vitest";
import { eq, sql } from "drizzle-orm";
import { reviewAction } from "@/app/actions/review";
import { db } from "@/db/client";
import { acceptedMeasurements } from "@/db/queries/bench";
import { decideMeasurement } from "@/db/queries/review";
import { auditLog, measurements } from "@/db/schema";
import { localMailbox } from "@/lib/mail";
import { actAs, addMeasurement, buildWorld, form, PEOPLE } from "../support/world";

beforeAll(async () => {
  await buildWorld();
});

const inRtree = (id: string) =>
  (db().$client.prepare("select count(*) n from measurement_lab_rtree where id = (select rowid from measurements where id = ?)").get(id) as { n: number }).n;

describe("review", () => {
  it("an admin accepts a chemist's measurement: it counts in search, is audited, and the chemist is e-mailed", async () => {
    addMeasurement("ms_rv_1", PEOPLE.chemist.id);
    expect(acceptedMeasurements(db()).map((r) => r.m.id)).not.toContain("ms_rv_1");
    await actAs("admin");
    const state = await reviewAction(null, form({ measurementId: "ms_rv_1", decision: "accepted", note: "" }));
    expect(state).toMatchObject({ ok: true });
    const row = db().select().from(measurements).where(eq(measurements.id, "ms_rv_1")).get()!;
    expect(row).toMatchObject({ reviewState: "accepted", reviewedBy: PEOPLE.admin.id });
    expect(acceptedMeasurements(db()).map((r) => r.m.id)).toContain("ms_rv_1");
    const audit = db().select().from(auditLog).where(eq(auditLog.entityId, "ms_rv_1")).all();
    expect(audit.map((a) => [a.action, a.actorId])).toEqual([["measurement.accept", PEOPLE.admin.id]]);
    const mail = localMailbox().find((m) => m.to === PEOPLE.chemist.email && /T-001/.test(m.subject));
    expect(mail?.subject).toBe("Measurement accepted: T-001 in Methanol");
    expect(mail?.text).toMatch(/Test Admin accepted your measurement of T-001 \(Test Violet\) in Methanol, neutral/);
    expect(mail?.text).toMatch(/L\* 34\.0, a\* 30\.0, b\* -35\.0/);
  });

  it("a chemist rejects another chemist's measurement with a note, which the author reads in the e-mail", async () => {
    addMeasurement("ms_rv_2", PEOPLE.chemist2.id);
    await actAs("chemist");
    expect(await reviewAction(null, form({ measurementId: "ms_rv_2", decision: "rejected", note: "" }))).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { note: expect.any(Array) } });
    expect(db().select().from(measurements).where(eq(measurements.id, "ms_rv_2")).get()!.reviewState).toBe("pending");
    expect(await reviewAction(null, form({ measurementId: "ms_rv_2", decision: "rejected", note: "Meniscus inside the region" }))).toMatchObject({ ok: true });
    const mail = localMailbox().find((m) => m.to === PEOPLE.chemist2.email);
    expect(mail?.subject).toMatch(/^Measurement rejected/);
    expect(mail?.text).toMatch(/Note from Test Chemist: Meniscus inside the region/);
    expect(inRtree("ms_rv_2")).toBe(0);
  });

  it("never lets the author decide their own measurement, as chemist or as admin", async () => {
    addMeasurement("ms_rv_3", PEOPLE.admin.id);
    await actAs("admin");
    expect(await reviewAction(null, form({ measurementId: "ms_rv_3", decision: "accepted", note: "" }))).toMatchObject({ ok: false, code: "forbidden", message: expect.stringMatching(/own/) });
    expect(() => decideMeasurement(db(), { reviewer: { id: PEOPLE.admin.id, role: "admin" }, measurementId: "ms_rv_3", decision: "accepted", note: "" })).toThrow(/own/);
    expect(db().select().from(measurements).where(eq(measurements.id, "ms_rv_3")).get()!.reviewState).toBe("pending");
  });

  it("refuses formulators, even when called below the action", async () => {
    addMeasurement("ms_rv_4", PEOPLE.chemist.id);
    await actAs("formulator");
    expect(await reviewAction(null, form({ measurementId: "ms_rv_4", decision: "accepted", note: "" }))).toMatchObject({ ok: false, code: "forbidden" });
    expect(() => decideMeasurement(db(), { reviewer: { id: PEOPLE.formulator.id, role: "formulator" }, measurementId: "ms_rv_4", decision: "accepted", note: "" })).toThrow(/Formulators/);
  });

  it("decides once: a second decision is a conflict and changes nothing", async () => {
    addMeasurement("ms_rv_5", PEOPLE.chemist.id);
    decideMeasurement(db(), { reviewer: { id: PEOPLE.chemist2.id, role: "chemist" }, measurementId: "ms_rv_5", decision: "accepted", note: "" });
    expect(() => decideMeasurement(db(), { reviewer: { id: PEOPLE.admin.id, role: "admin" }, measurementId: "ms_rv_5", decision: "rejected", note: "no" })).toThrow(/already accepted/);
    const n = db().select({ n: sql<number>`count(*)` }).from(auditLog).where(eq(auditLog.entityId, "ms_rv_5")).get()!.n;
    expect(n).toBe(1);
  });
});
