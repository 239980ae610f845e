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

type Notice = NonNullable<ReturnType<typeof reviewNotice>>;

/** One line per measurement: what was measured, where, and its colour. */
function measuredLine({ m, dye, solvent, condition }: Notice) {
  const where = `${solvent.name}, ${condition.acidBase}${condition.ph !== null ? `, pH ${condition.ph}` : ""}`;
  return `${dye.code} (${dye.name}) in ${where}: L* ${m.l.toFixed(1)}, a* ${m.a.toFixed(1)}, b* ${m.b.toFixed(1)} (CIELAB, ${m.illuminant}), measured ${m.createdAt.toISOString().slice(0, 16).replace("T", " ")} UTC.`;
}

/**
 * Tells each author by e-mail that their measurements were reviewed: one mail per author, listing
 * every measurement decided together (one, or all of a photo's). The decision is already committed;
 * a mail failure is logged and never undoes it.
 */
async function notifyAuthors(measurementIds: string[], reviewerId: string, decision: "accepted" | "rejected", note: string) {
  const byAuthor = new Map<string, Notice[]>();
  for (const id of measurementIds) {
    const notice = reviewNotice(db(), { measurementId: id, reviewerId });
    if (!notice || notice.author.deactivatedAt) continue;
    byAuthor.set(notice.author.id, [...(byAuthor.get(notice.author.id) ?? []), notice]);
  }
  for (const notices of byAuthor.values()) {
    const [first] = notices;
    const { author, reviewerName } = first;
    const one = notices.length === 1;
    const photoIds = [...new Set(notices.map((n) => n.m.photoId).filter((p): p is string => !!p))];
    const lines = [
      `Hello ${author.name},`,
      "",
      one ? `${reviewerName} ${decision} your measurement of ${measuredLine(first)}` : `${reviewerName} ${decision} ${notices.length} of your measurements${photoIds.length === 1 ? " from one photo" : ""}:`,
      ...(one ? [] : notices.map((n) => `- ${measuredLine(n)}`)),
      "",
      decision === "accepted"
        ? `${one ? "It now counts" : "They now count"} in search and in the solvent models.`
        : `${one ? "It does" : "They do"} not count in search or the models. Re-mark the vial on the bench and save it again if the reason can be fixed.`,
      ...(note ? ["", `Note from ${reviewerName}: ${note}`] : []),
      "",
      `Your measurements: ${appUrl()}/measurements?author=me`,
      ...photoIds.map((p) => `The photo: ${appUrl()}/bench/photos/${p}`),
    ];
    const subject = one ? `Measurement ${decision}: ${first.dye.code} in ${first.solvent.name}` : `${notices.length} measurements ${decision}${photoIds.length === 1 ? " from one photo" : ""}`;
    try {
      await send({ to: author.email, subject, text: lines.join("\n") });
    } catch (error) {
      console.error(`Could not send the review notice for ${notices.map((n) => n.m.id).join(", ")}:`, error);
    }
  }
}

export const reviewAction = formAction({ access: BENCH_ROLES, schema: decisionSchema }, async (input, { user }) => {
  decideMeasurement(db(), { reviewer: user, ...input });
  await notifyAuthors([input.measurementId], user.id, input.decision, input.note);
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
  await notifyAuthors(result.accepted.map((m) => m.id), user.id, "accepted", input.note);
  revalidatePath("/review");
  revalidatePath("/measurements");
  const n = result.accepted.length;
  return {
    ok: true,
    message: `Accepted ${n} measurement${n === 1 ? "" : "s"} from this photo.${result.skippedOwn ? ` ${result.skippedOwn} of your own stay${result.skippedOwn === 1 ? "s" : ""} for another reviewer.` : ""}`,
  };
});
