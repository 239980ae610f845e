"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { db } from "@/db/client";
import { acceptPhoto, decideMeasurement, reviewNotice } from "@/db/queries/review";
import { formAction } from "@/lib/auth/guard";
import { BENCH_ROLES } from "@/lib/auth/roles";
import { appUrl } from "@/lib/config/env";
import { send } from "@/lib/mail";

const decisionSchema = z
  .object({
    measurementId: z.string().min(1).max(100),
    decision: z.enum(["accepted", "rejected"], { error: "Choose accept or reject." }),
    note: z.string().trim().max(2000).default(""),
  })
  .refine((v) => v.decision === "accepted" || v.note.length > 0, { error: "Say why you reject it, so the chemist can fix it.", path: ["note"] });

/**
 * Tells the author by e-mail that their measurement was reviewed. The decision is already committed;
 * a mail failure is logged and never undoes it.
 */
async function notifyAuthor(measurementId: string, reviewerId: string, decision: "accepted" | "rejected", note: string) {
  const notice = reviewNotice(db(), { measurementId, reviewerId });
  if (!notice || notice.author.deactivatedAt) return;
  const { m, dye, solvent, condition, author, reviewerName } = notice;
  const where = `${solvent.name}, ${condition.acidBase}${condition.ph !== null ? `, pH ${condition.ph}` : ""}`;
  const lines = [
    `Hello ${author.name},`,
    "",
    `${reviewerName} ${decision} your measurement of ${dye.code} (${dye.name}) in ${where}:`,
    `L* ${m.l.toFixed(1)}, a* ${m.a.toFixed(1)}, b* ${m.b.toFixed(1)} (CIELAB, ${m.illuminant}), measured ${m.createdAt.toISOString().slice(0, 16).replace("T", " ")} UTC.`,
    "",
    decision === "accepted"
      ? "It now counts in search and in the solvent models."
      : "It does not count in search or the models. Re-mark the vial on the bench and save it again if the reason can be fixed.",
    ...(note ? ["", `Note from ${reviewerName}: ${note}`] : []),
    "",
    `Your measurements: ${appUrl()}/measurements?author=me`,
    m.photoId ? `The photo: ${appUrl()}/bench/photos/${m.photoId}` : "",
  ].filter((line, i, all) => !(line === "" && i === all.length - 1));
  try {
    await send({ to: author.email, subject: `Measurement ${decision}: ${dye.code} in ${solvent.name}`, text: lines.join("\n") });
  } catch (error) {
    console.error(`Could not send the review notice for ${measurementId}:`, error);
  }
}

export const reviewAction = formAction({ access: BENCH_ROLES, schema: decisionSchema }, async (input, { user }) => {
  decideMeasurement(db(), { reviewer: user, ...input });
  await notifyAuthor(input.measurementId, user.id, input.decision, input.note);
  revalidatePath("/review");
  revalidatePath("/measurements");
  return { ok: true, message: input.decision === "accepted" ? "Accepted. The chemist has been told." : "Rejected with your note. The chemist has been told." };
});

const acceptPhotoSchema = z.object({
  photoId: z.string().min(1).max(100),
  checked: z.literal("yes", { error: "Tick that you have checked every region on the photo before accepting them all." }),
  note: z.string().trim().max(2000).default(""),
});

/** Accepts every waiting measurement of one photo after the reviewer says they checked the regions; never the reviewer's own. */
export const acceptPhotoAction = formAction({ access: BENCH_ROLES, schema: acceptPhotoSchema }, async (input, { user }) => {
  const result = acceptPhoto(db(), { reviewer: user, photoId: input.photoId, note: input.note });
  for (const m of result.accepted) await notifyAuthor(m.id, user.id, "accepted", input.note);
  revalidatePath("/review");
  revalidatePath("/measurements");
  const n = result.accepted.length;
  return {
    ok: true,
    message: `Accepted ${n} measurement${n === 1 ? "" : "s"} from this photo.${result.skippedOwn ? ` ${result.skippedOwn} of your own stay${result.skippedOwn === 1 ? "s" : ""} for another reviewer.` : ""}`,
  };
});
