import { and, eq } from "drizzle-orm";
import { AppError } from "../../lib/errors";
import type { Db } from "../connection";
import { conditions, dyes, measurements, solvents, users, type Role } from "../schema";
import { recordAudit } from "./audit";

/**
 * Accepts or rejects a pending measurement. The author may never review their own work; the update is
 * conditional on the state still being pending, so two reviewers cannot both decide.
 */
export function decideMeasurement(
  db: Db,
  input: { reviewer: { id: string; role: Role }; measurementId: string; decision: "accepted" | "rejected"; note: string },
) {
  if (input.reviewer.role === "formulator") throw new AppError("forbidden", "Formulators read measurements but do not review them.");
  return db.transaction((tx) => {
    const m = tx.select().from(measurements).where(eq(measurements.id, input.measurementId)).get();
    if (!m) throw new AppError("not_found", "That measurement no longer exists.");
    if (m.createdBy === input.reviewer.id) throw new AppError("forbidden", "You cannot review your own measurement; another chemist or an admin must.");
    if (m.reviewState !== "pending") throw new AppError("conflict", `This measurement was already ${m.reviewState}.`);
    const reviewedAt = new Date();
    const changed = tx
      .update(measurements)
      .set({ reviewState: input.decision, reviewedBy: input.reviewer.id, reviewedAt, reviewNote: input.note || null })
      .where(and(eq(measurements.id, m.id), eq(measurements.reviewState, "pending")))
      .run();
    if (changed.changes !== 1) throw new AppError("conflict", "Someone else reviewed this measurement a moment ago.");
    recordAudit(tx, {
      actorId: input.reviewer.id,
      action: `measurement.${input.decision === "accepted" ? "accept" : "reject"}`,
      entity: "measurement",
      entityId: m.id,
      before: { reviewState: "pending" },
      after: { reviewState: input.decision, note: input.note },
    });
    return { authorId: m.createdBy };
  });
}

/** What the author is told about a decision: who they are, what was measured and by whom it was reviewed. */
export function reviewNotice(db: Db, { measurementId, reviewerId }: { measurementId: string; reviewerId: string }) {
  const row = db
    .select({ m: measurements, dye: dyes, solvent: solvents, condition: conditions, author: users })
    .from(measurements)
    .innerJoin(dyes, eq(measurements.dyeId, dyes.id))
    .innerJoin(conditions, eq(measurements.conditionId, conditions.id))
    .innerJoin(solvents, eq(conditions.solventId, solvents.id))
    .innerJoin(users, eq(measurements.createdBy, users.id))
    .where(eq(measurements.id, measurementId))
    .get();
  const reviewer = db.select({ name: users.name }).from(users).where(eq(users.id, reviewerId)).get();
  if (!row || !reviewer) return null;
  return { ...row, reviewerName: reviewer.name };
}

/**
 * Accepts every pending measurement of one photo that the reviewer did not make, in one transaction
 * with an audit entry each. The reviewer's own measurements stay pending for someone else.
 */
export function acceptPhoto(db: Db, input: { reviewer: { id: string; role: Role }; photoId: string; note: string }) {
  if (input.reviewer.role === "formulator") throw new AppError("forbidden", "Formulators read measurements but do not review them.");
  return db.transaction((tx) => {
    const pending = tx
      .select({ id: measurements.id, createdBy: measurements.createdBy })
      .from(measurements)
      .where(and(eq(measurements.photoId, input.photoId), eq(measurements.reviewState, "pending")))
      .all();
    const theirs = pending.filter((m) => m.createdBy !== input.reviewer.id);
    const own = pending.length - theirs.length;
    if (theirs.length === 0) {
      throw new AppError(
        "conflict",
        own > 0 ? "Every measurement waiting from this photo is your own; another chemist or an admin must review them." : "Nothing from this photo is waiting for review.",
      );
    }
    const reviewedAt = new Date();
    for (const m of theirs) {
      const changed = tx
        .update(measurements)
        .set({ reviewState: "accepted", reviewedBy: input.reviewer.id, reviewedAt, reviewNote: input.note || null })
        .where(and(eq(measurements.id, m.id), eq(measurements.reviewState, "pending")))
        .run();
      if (changed.changes !== 1) throw new AppError("conflict", "Someone else reviewed part of this photo a moment ago; reload and check again.");
      recordAudit(tx, {
        actorId: input.reviewer.id,
        action: "measurement.accept",
        entity: "measurement",
        entityId: m.id,
        before: { reviewState: "pending" },
        after: { reviewState: "accepted", note: input.note, photoId: input.photoId, acceptedWithPhoto: true },
      });
    }
    return { accepted: theirs.map((m) => ({ id: m.id, authorId: m.createdBy })), skippedOwn: own };
  });
}
